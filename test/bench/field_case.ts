/**
 * The benchmark case of the gridded-field area, shared by field_bench.ts, field_run.ts and
 * field_medians.ts: a 5° field (36 × 72 = 2,592 cells), 600 months, lags 0..24, 1,000
 * phase-randomised surrogates, best-lag statistic. Invented data with fixed seeds: a predictor
 * with an 11-year cycle and AR(1) noise, a field of spatially correlated AR(1) noise (three
 * large-scale patterns and local noise) with a response planted in one box (20° S–50° N,
 * 60°–200° E, about a fifth of the area).
 *
 * `writeFieldCase(dir)` writes the same numbers for the numpy peer (field_numpy.py):
 * field.f32 (600 × 2,592 float32, time-major), predictor.f64, weights.f64 (cos latitude).
 *
 * @module
 */
import { type RandomStream, randomStream } from "../../core/random/random_stream.ts";
import { ar1Surrogate } from "../../core/climate/surrogates.ts";
import { fieldAreaWeights, type GriddedField } from "../../core/field/mod.ts";

export const N_LAT = 36, N_LON = 72, N_TIME = 600, MAX_LAG = 24, SURROGATES = 1000;
export const SEED = 17;

const ar1 = (n: number, phi: number, s: RandomStream) => ar1Surrogate(n, phi, 1, s);

/** The field, predictor and cos-latitude weights. */
export function fieldCase(): { field: GriddedField; x: Float64Array; weights: Float64Array } {
  const s = randomStream(2024, 0);
  const n = N_TIME, G = N_LAT * N_LON;
  const lat = Float64Array.from({ length: N_LAT }, (_, i) => -87.5 + 5 * i);
  const lon = Float64Array.from({ length: N_LON }, (_, j) => 2.5 + 5 * j);
  const noise = ar1(n, 0.6, s);
  const x = Float64Array.from(noise, (v, t) => Math.sin((2 * Math.PI * t) / 132) + 0.5 * v);
  const modes = [0, 1, 2].map(() => ar1(n, 0.5, s));
  const values = new Float32Array(n * G);
  const local = new Float64Array(n);
  for (let i = 0; i < N_LAT; i++) {
    for (let j = 0; j < N_LON; j++) {
      const c = i * N_LON + j, la = (lat[i] * Math.PI) / 180, lo = (lon[j] * Math.PI) / 180;
      const p = [Math.cos(la), Math.sin(la) * Math.cos(lo), Math.cos(la) * Math.sin(2 * lo)];
      local.set(ar1(n, 0.4, s));
      const box = lat[i] >= -20 && lat[i] <= 50 && lon[j] >= 60 && lon[j] <= 200;
      for (let t = 0; t < n; t++) {
        let v = 0.5 * (p[0] * modes[0][t] + p[1] * modes[1][t] + p[2] * modes[2][t]) +
          0.8 * local[t];
        if (box && t >= 6) v += 0.8 * x[t - 6];
        values[t * G + c] = v;
      }
    }
  }
  const field: GriddedField = { values, nTime: n, lat, lon };
  return { field, x, weights: fieldAreaWeights(field) };
}

/** Write the case as raw little-endian arrays for the numpy peer. */
export async function writeFieldCase(dir: string): Promise<void> {
  const { field, x, weights } = fieldCase();
  await Deno.mkdir(dir, { recursive: true });
  await Deno.writeFile(`${dir}/field.f32`, new Uint8Array(field.values.buffer));
  await Deno.writeFile(`${dir}/predictor.f64`, new Uint8Array(x.buffer));
  await Deno.writeFile(`${dir}/weights.f64`, new Uint8Array(weights.buffer));
}
