/**
 * Invented fields for recovery tests: a predictor with AR(1) noise and a field of spatially
 * correlated AR(1) noise (a few large-scale patterns plus local noise), optionally with a
 * response to the predictor planted in a latitude–longitude box.
 */
import { type RandomStream, randomStream } from "../../../core/random/random_stream.ts";
import { ar1Surrogate } from "../../../core/climate/surrogates.ts";
import type { GriddedField } from "../../../core/field/mod.ts";

export interface SyntheticOptions {
  seed: number;
  nLat?: number;
  nLon?: number;
  n?: number;
  /** Planted response: slope, lag and box (degrees). */
  planted?: {
    slope: number;
    lag: number;
    south: number;
    north: number;
    west: number;
    east: number;
  };
}

const ar1 = (n: number, phi: number, s: RandomStream) => ar1Surrogate(n, phi, 1, s);

export function syntheticField(o: SyntheticOptions): { field: GriddedField; x: Float64Array } {
  const nLat = o.nLat ?? 6, nLon = o.nLon ?? 12, n = o.n ?? 240;
  const s = randomStream(o.seed, 0);
  const lat = Float64Array.from({ length: nLat }, (_, i) => -90 + (180 / nLat) * (i + 0.5));
  const lon = Float64Array.from({ length: nLon }, (_, j) => (360 / nLon) * j);
  const x = ar1(n, 0.7, s);
  const G = nLat * nLon;
  const values = new Float32Array(n * G);
  // three large-scale patterns with AR(1) amplitudes keep neighbouring cells correlated
  const modes = [0, 1, 2].map(() => ar1(n, 0.5, s));
  const local = Array.from({ length: G }, () => ar1(n, 0.4, s));
  for (let i = 0; i < nLat; i++) {
    for (let j = 0; j < nLon; j++) {
      const c = i * nLon + j, la = (lat[i] * Math.PI) / 180, lo = (lon[j] * Math.PI) / 180;
      const p = [Math.cos(la), Math.sin(la) * Math.cos(lo), Math.cos(la) * Math.sin(2 * lo)];
      const pl = o.planted;
      const inBox = pl !== undefined && lat[i] >= pl.south && lat[i] <= pl.north &&
        lon[j] >= pl.west && lon[j] <= pl.east;
      for (let t = 0; t < n; t++) {
        let v = 0.5 * (p[0] * modes[0][t] + p[1] * modes[1][t] + p[2] * modes[2][t]) +
          0.8 * local[c][t];
        if (inBox && t >= pl!.lag) v += pl!.slope * x[t - pl!.lag];
        values[t * G + c] = v;
      }
    }
  }
  return { field: { values, nTime: n, lat, lon }, x };
}
