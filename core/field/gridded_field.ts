/**
 * A gridded field on a regular latitude–longitude grid: values time × cells in one
 * `Float32Array` (time-major: the value of cell c at time step t is `values[t · nCells + c]`),
 * cells ordered latitude-major (c = i · nLon + j for latitude i, longitude j), NaN marking a
 * missing value. Coordinates are cell centres in degrees north and degrees east (any longitude
 * convention, e.g. 0..360 or −180..180); optional bounds give each cell's edges (CF
 * conventions §7.1 "cell boundaries", one pair per coordinate value).
 *
 * @module
 */

/** A gridded field (see the module documentation for the layout). */
export interface GriddedField {
  /** Values, time-major, `nTime · lat.length · lon.length` entries; NaN = missing. */
  values: Float32Array;
  /** Number of time steps. */
  nTime: number;
  /** Latitudes of the cell centres, degrees north, strictly monotonic, within [−90, 90]. */
  lat: Float64Array;
  /** Longitudes of the cell centres, degrees east, strictly monotonic, finite. */
  lon: Float64Array;
  /** Latitude bounds, degrees north: `[south₀, north₀, south₁, north₁, ...]`, optional. */
  latBounds?: Float64Array;
  /** Longitude bounds, degrees east: `[west₀, east₀, west₁, east₁, ...]`, optional. */
  lonBounds?: Float64Array;
}

function monotonic(x: Float64Array): boolean {
  if (x.length < 2) return true;
  const up = x[1] > x[0];
  for (let i = 1; i < x.length; i++) {
    if (up ? !(x[i] > x[i - 1]) : !(x[i] < x[i - 1])) return false;
  }
  return true;
}

/**
 * Check a field's shape and coordinates and return its number of cells.
 *
 * @param fn what was being done, for messages (e.g. "compute area-weighted mean")
 * @param field the field
 * @returns number of cells `lat.length · lon.length`
 * @throws {RangeError} when the value count does not match the shape, a coordinate is not
 *   finite or not strictly monotonic, a latitude is outside [−90, 90], or bounds have the
 *   wrong length
 * @example
 * ```ts
 * import { checkGriddedField } from "./gridded_field.ts";
 * import assert from "node:assert/strict";
 * const field = {
 *   values: new Float32Array(2 * 3 * 4), nTime: 2,
 *   lat: Float64Array.of(-30, 0, 30), lon: Float64Array.of(0, 90, 180, 270),
 * };
 * assert.equal(checkGriddedField("analyse field", field), 12);
 * assert.throws(() => checkGriddedField("analyse field", { ...field, nTime: 3 }), /values/);
 * ```
 */
export function checkGriddedField(fn: string, field: GriddedField): number {
  const { lat, lon, nTime, values } = field;
  if (!Number.isInteger(nTime) || nTime < 1) {
    throw new RangeError(`Cannot ${fn}: nTime must be a positive integer, got ${nTime}`);
  }
  if (lat.length < 1 || lon.length < 1) {
    throw new RangeError(
      `Cannot ${fn}: the grid needs at least one latitude and one longitude, got ${lat.length} × ${lon.length}`,
    );
  }
  for (const [name, c] of [["lat", lat], ["lon", lon]] as const) {
    for (let i = 0; i < c.length; i++) {
      if (!Number.isFinite(c[i])) {
        throw new RangeError(`Cannot ${fn}: ${name}[${i}] is not finite (${c[i]})`);
      }
    }
    if (!monotonic(c)) {
      throw new RangeError(`Cannot ${fn}: ${name} must be strictly monotonic`);
    }
  }
  for (let i = 0; i < lat.length; i++) {
    if (Math.abs(lat[i]) > 90) {
      throw new RangeError(`Cannot ${fn}: lat[${i}] = ${lat[i]} is outside [−90, 90]`);
    }
  }
  const nCells = lat.length * lon.length;
  if (values.length !== nTime * nCells) {
    throw new RangeError(
      `Cannot ${fn}: values has ${values.length} entries, expected nTime × nLat × nLon = ${nTime} × ${lat.length} × ${lon.length} = ${
        nTime * nCells
      }`,
    );
  }
  for (
    const [name, b, n] of [["latBounds", field.latBounds, lat.length], [
      "lonBounds",
      field.lonBounds,
      lon.length,
    ]] as const
  ) {
    if (b === undefined) continue;
    if (b.length !== 2 * n) {
      throw new RangeError(`Cannot ${fn}: ${name} needs 2 × ${n} values, got ${b.length}`);
    }
    for (let i = 0; i < b.length; i++) {
      if (!Number.isFinite(b[i])) {
        throw new RangeError(`Cannot ${fn}: ${name}[${i}] is not finite (${b[i]})`);
      }
    }
  }
  return nCells;
}
