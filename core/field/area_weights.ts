/**
 * Area weights of the cells of a regular latitude–longitude grid.
 *
 * - Without bounds: w = cos φ at the cell-centre latitude φ (common practice for regular
 *   grids: a cell's area on the sphere is proportional to cos φ when all cells have the same
 *   angular size). A cell centred on a pole gets weight 0; give bounds for such grids.
 * - With bounds: the exact area of the spherical cell between latitudes φ₁ < φ₂ and
 *   longitudes λ₁, λ₂ on the unit sphere, A = (sin φ₂ − sin φ₁)(λ₂ − λ₁) with λ in radians
 *   (integrate cos φ dφ dλ; derived), in steradians (multiply by R² for m²).
 *
 * @module
 */
import { checkGriddedField, type GriddedField } from "./gridded_field.ts";

const RAD = Math.PI / 180;

/**
 * cos(latitude) weight of every cell (latitude-major order, nLat · nLon values).
 *
 * @param lat cell-centre latitudes, degrees north, within [−90, 90]
 * @param nLon number of longitudes (every cell of a latitude row gets the same weight)
 * @returns weights in [0, 1], dimensionless
 * @throws {RangeError} when a latitude is not finite or outside [−90, 90], or nLon < 1
 * @example
 * ```ts
 * import { cosLatitudeWeights } from "./area_weights.ts";
 * import assert from "node:assert/strict";
 * const w = cosLatitudeWeights(Float64Array.of(0, 60), 2);
 * assert.deepEqual(Array.from(w, (v) => Math.round(v * 1e12) / 1e12), [1, 1, 0.5, 0.5]);
 * ```
 */
export function cosLatitudeWeights(lat: ArrayLike<number>, nLon: number): Float64Array {
  if (!Number.isInteger(nLon) || nLon < 1) {
    throw new RangeError(`Cannot compute cos-latitude weights: nLon must be ≥ 1, got ${nLon}`);
  }
  const w = new Float64Array(lat.length * nLon);
  for (let i = 0; i < lat.length; i++) {
    const phi = lat[i];
    if (!(Math.abs(phi) <= 90)) {
      throw new RangeError(
        `Cannot compute cos-latitude weights: lat[${i}] must be in [−90, 90], got ${phi}`,
      );
    }
    // cos(±90°) is 6e-17 in floating point; a pole cell has weight exactly 0
    const c = Math.abs(phi) === 90 ? 0 : Math.cos(phi * RAD);
    w.fill(c, i * nLon, (i + 1) * nLon);
  }
  return w;
}

/**
 * Exact cell areas on the unit sphere from cell bounds: (sin φ₂ − sin φ₁)(λ₂ − λ₁).
 *
 * Longitude widths are taken modulo 360° so bounds that wrap (e.g. [357.5, 2.5]) give 5°;
 * a width of 0 (or 360) is read as a full circle only when the grid has one longitude.
 *
 * @param latBounds `[south₀, north₀, ...]` degrees north within [−90, 90] (either order)
 * @param lonBounds `[west₀, east₀, ...]` degrees east
 * @returns areas in steradians, latitude-major, nLat · nLon values
 * @throws {RangeError} on an odd bounds length, non-finite bounds, a latitude bound outside
 *   [−90, 90], or a cell of zero width
 * @example
 * ```ts
 * import { cellAreasFromBounds } from "./area_weights.ts";
 * import assert from "node:assert/strict";
 * // two hemispheres, one longitude band covering the globe: 2π sr each, 4π in all
 * const a = cellAreasFromBounds(Float64Array.of(-90, 0, 0, 90), Float64Array.of(0, 360));
 * assert.ok(Math.abs(a[0] + a[1] - 4 * Math.PI) < 1e-12);
 * ```
 */
export function cellAreasFromBounds(
  latBounds: ArrayLike<number>,
  lonBounds: ArrayLike<number>,
): Float64Array {
  const fn = "compute cell areas from bounds";
  for (const [name, b] of [["latBounds", latBounds], ["lonBounds", lonBounds]] as const) {
    if (b.length % 2 !== 0 || b.length === 0) {
      throw new RangeError(`Cannot ${fn}: ${name} needs a positive even length, got ${b.length}`);
    }
    for (let i = 0; i < b.length; i++) {
      if (!Number.isFinite(b[i])) {
        throw new RangeError(`Cannot ${fn}: ${name}[${i}] is not finite (${b[i]})`);
      }
    }
  }
  const nLat = latBounds.length / 2, nLon = lonBounds.length / 2;
  const band = new Float64Array(nLat);
  for (let i = 0; i < nLat; i++) {
    const a = latBounds[2 * i], b = latBounds[2 * i + 1];
    if (Math.abs(a) > 90 || Math.abs(b) > 90) {
      throw new RangeError(`Cannot ${fn}: latitude bounds of row ${i} are outside [−90, 90]`);
    }
    band[i] = Math.abs(Math.sin(b * RAD) - Math.sin(a * RAD));
    if (!(band[i] > 0)) throw new RangeError(`Cannot ${fn}: row ${i} has zero latitude width`);
  }
  const width = new Float64Array(nLon);
  for (let j = 0; j < nLon; j++) {
    let d = (((lonBounds[2 * j + 1] - lonBounds[2 * j]) % 360) + 360) % 360;
    if (d === 0 && nLon === 1) d = 360;
    if (!(d > 0)) throw new RangeError(`Cannot ${fn}: column ${j} has zero longitude width`);
    width[j] = d * RAD;
  }
  const w = new Float64Array(nLat * nLon);
  for (let i = 0; i < nLat; i++) {
    for (let j = 0; j < nLon; j++) w[i * nLon + j] = band[i] * width[j];
  }
  return w;
}

/**
 * The area weights of a field: cell areas from its bounds when both are given, otherwise
 * cos(latitude).
 *
 * @param field the field (only its coordinates are read)
 * @returns one weight per cell (steradians with bounds, dimensionless cos φ without)
 * @throws {RangeError} as {@link checkGriddedField}, {@link cellAreasFromBounds}
 * @example
 * ```ts
 * import { fieldAreaWeights } from "./area_weights.ts";
 * import assert from "node:assert/strict";
 * const lat = Float64Array.of(-45, 45), lon = Float64Array.of(90, 270);
 * const w = fieldAreaWeights({ values: new Float32Array(4), nTime: 1, lat, lon });
 * assert.ok(Math.abs(w[0] - Math.SQRT1_2) < 1e-15);
 * ```
 */
export function fieldAreaWeights(field: GriddedField): Float64Array {
  checkGriddedField("compute area weights", field);
  if (field.latBounds && field.lonBounds) {
    return cellAreasFromBounds(field.latBounds, field.lonBounds);
  }
  return cosLatitudeWeights(field.lat, field.lon.length);
}
