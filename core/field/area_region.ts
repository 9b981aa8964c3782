/**
 * Regions of a regular latitude–longitude grid: the globe, a zonal band, a latitude–longitude
 * box (longitudes may wrap across 0°/360° or ±180°) or a mask. A cell belongs to a band or box
 * when its centre does (common practice, as in most climate-data operators' box selection);
 * bounds are inclusive.
 *
 * @module
 */
import { checkGriddedField, type GriddedField } from "./gridded_field.ts";

/** A region of the grid. */
export type AreaRegion =
  | { kind: "globe" }
  /** Latitudes south ≤ φ ≤ north (degrees north). */
  | { kind: "band"; south: number; north: number }
  /**
   * Latitudes south ≤ φ ≤ north and longitudes from west eastward to east (degrees east, any
   * convention): west = 350, east = 10 is a 20° box across the prime meridian; west = 170,
   * east = −170 a 20° box across the date line. east − west ≥ 360 takes every longitude.
   */
  | { kind: "box"; south: number; north: number; west: number; east: number }
  /** One value per cell in [0, 1]: 0 outside, 1 inside, fractions (e.g. land fraction) between. */
  | { kind: "mask"; mask: ArrayLike<number> };

/**
 * Whether longitude λ lies on the arc from west eastward to east (degrees, any convention).
 *
 * @param lon longitude, degrees east
 * @param west western edge
 * @param east eastern edge (reached going east from west)
 * @returns true when inside (edges included)
 * @example
 * ```ts
 * import { longitudeInArc } from "./area_region.ts";
 * import assert from "node:assert/strict";
 * assert.ok(longitudeInArc(355, -10, 10));
 * assert.ok(longitudeInArc(-175, 170, -170));
 * assert.ok(!longitudeInArc(180, -10, 10));
 * ```
 */
export function longitudeInArc(lon: number, west: number, east: number): boolean {
  if (east - west >= 360) return true;
  const width = (((east - west) % 360) + 360) % 360;
  const offset = (((lon - west) % 360) + 360) % 360;
  return offset <= width;
}

/**
 * Membership of every cell in a region, as a factor in [0, 1] (latitude-major order).
 *
 * @param field the field (only its grid is read)
 * @param region the region
 * @returns one factor per cell: 1 inside, 0 outside, the mask value for a mask
 * @throws {RangeError} when the region's bounds are not finite, south > north, the mask has
 *   the wrong length or a value outside [0, 1], or no cell is inside
 * @example
 * ```ts
 * import { regionMembership } from "./area_region.ts";
 * import assert from "node:assert/strict";
 * const field = {
 *   values: new Float32Array(8), nTime: 1,
 *   lat: Float64Array.of(-45, 45), lon: Float64Array.of(0, 90, 180, 270),
 * };
 * const m = regionMembership(field, { kind: "box", south: 0, north: 90, west: 260, east: 100 });
 * assert.deepEqual(Array.from(m), [0, 0, 0, 0, 1, 1, 0, 1]);
 * ```
 */
export function regionMembership(field: GriddedField, region: AreaRegion): Float64Array {
  const fn = "select region";
  const nCells = checkGriddedField(fn, field);
  const { lat, lon } = field;
  const nLon = lon.length;
  const out = new Float64Array(nCells);
  switch (region.kind) {
    case "globe":
      out.fill(1);
      break;
    case "band":
    case "box": {
      const { south, north } = region;
      const edges: [string, number][] = [["south", south], ["north", north]];
      if (region.kind === "box") edges.push(["west", region.west], ["east", region.east]);
      for (const [name, v] of edges) {
        if (!Number.isFinite(v)) throw new RangeError(`Cannot ${fn}: ${name} is not finite (${v})`);
      }
      if (south > north) {
        throw new RangeError(`Cannot ${fn}: south (${south}) is north of north (${north})`);
      }
      for (let i = 0; i < lat.length; i++) {
        if (lat[i] < south || lat[i] > north) continue;
        for (let j = 0; j < nLon; j++) {
          if (region.kind === "box" && !longitudeInArc(lon[j], region.west, region.east)) continue;
          out[i * nLon + j] = 1;
        }
      }
      break;
    }
    case "mask": {
      const m = region.mask;
      if (m.length !== nCells) {
        throw new RangeError(`Cannot ${fn}: mask has ${m.length} values, the grid ${nCells} cells`);
      }
      for (let c = 0; c < nCells; c++) {
        if (!(m[c] >= 0 && m[c] <= 1)) {
          throw new RangeError(`Cannot ${fn}: mask[${c}] must be in [0, 1], got ${m[c]}`);
        }
        out[c] = m[c];
      }
      break;
    }
    default:
      throw new RangeError(
        `Cannot ${fn}: unknown region kind ${(region as { kind: string }).kind}`,
      );
  }
  if (!out.some((v) => v > 0)) throw new RangeError(`Cannot ${fn}: no cell lies in the region`);
  return out;
}
