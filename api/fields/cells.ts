/**
 * Locating a point and a time in a stored field: the grid cell whose centre is nearest to a
 * latitude/longitude (longitudes compared modulo 360°, so −170 finds the cell at 190), and the
 * time step of a date.
 *
 * @module
 */
import { InputProblem } from "../runs/kind.ts";

/** Signed difference of two longitudes, in (−180, 180]. */
export function lonDelta(a: number, b: number): number {
  const d = ((a - b) % 360 + 540) % 360 - 180;
  return d === -180 ? 180 : d;
}

/** Largest spacing between neighbouring coordinate values (the grid step for a regular grid). */
function step(c: ArrayLike<number>): number {
  let s = 0;
  for (let i = 1; i < c.length; i++) s = Math.max(s, Math.abs(c[i] - c[i - 1]));
  return s;
}

/**
 * The cell nearest to (lat, lon): the nearest latitude row and the nearest longitude column
 * (modulo 360°).
 *
 * @param grid the field's cell centres, degrees north and east
 * @param lat latitude asked for, degrees north
 * @param lon longitude asked for, degrees east (any convention)
 * @returns row i, column j, cell index i·nLon + j and the cell's centre
 * @throws {InputProblem} at /lat or /lon when the point is more than one grid step outside a
 *   regional grid
 * @example
 * ```ts
 * import { nearestCell } from "./cells.ts";
 * import assert from "node:assert/strict";
 * const grid = { lat: Float64Array.of(-45, 0, 45), lon: Float64Array.of(0, 90, 180, 270) };
 * assert.deepEqual(nearestCell(grid, 40, -80), { i: 2, j: 3, cell: 11, lat: 45, lon: 270 });
 * ```
 */
export function nearestCell(
  grid: { lat: ArrayLike<number>; lon: ArrayLike<number> },
  lat: number,
  lon: number,
): { i: number; j: number; cell: number; lat: number; lon: number } {
  let i = 0, j = 0;
  for (let k = 1; k < grid.lat.length; k++) {
    if (Math.abs(grid.lat[k] - lat) < Math.abs(grid.lat[i] - lat)) i = k;
  }
  for (let k = 1; k < grid.lon.length; k++) {
    if (Math.abs(lonDelta(grid.lon[k], lon)) < Math.abs(lonDelta(grid.lon[j], lon))) j = k;
  }
  const sLat = step(grid.lat) || 180, sLon = step(grid.lon) || 360;
  if (Math.abs(grid.lat[i] - lat) > sLat) {
    throw new InputProblem(
      "/lat",
      `latitude ${lat} is outside the field's grid (nearest row at ${grid.lat[i]})`,
    );
  }
  if (Math.abs(lonDelta(grid.lon[j], lon)) > sLon) {
    throw new InputProblem(
      "/lon",
      `longitude ${lon} is outside the field's grid (nearest column at ${grid.lon[j]})`,
    );
  }
  return { i, j, cell: i * grid.lon.length + j, lat: grid.lat[i], lon: grid.lon[j] };
}

/**
 * The time step nearest to a decimal year.
 *
 * @param time the field's times, decimal years, increasing
 * @param t the time asked for
 * @returns the step index
 * @throws {InputProblem} at /time when t is more than one step outside the field's span
 */
export function nearestStep(time: ArrayLike<number>, t: number): number {
  let lo = 0, hi = time.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (time[mid] <= t) lo = mid;
    else hi = mid;
  }
  const k = Math.abs(time[hi] - t) < Math.abs(time[lo] - t) ? hi : lo;
  const dt = time.length > 1 ? (time[time.length - 1] - time[0]) / (time.length - 1) : 1;
  if (Math.abs(time[k] - t) > dt) {
    throw new InputProblem(
      "/time",
      `time ${t.toFixed(4)} is outside the field's span ${time[0].toFixed(4)}..${
        time[time.length - 1].toFixed(4)
      }`,
    );
  }
  return k;
}
