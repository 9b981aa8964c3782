/**
 * The 13-month smoothed sunspot number.
 *
 * @module
 */
import { weightedMovingAverage, type WindowGapOptions } from "./weighted_moving_average.ts";

/** The 13-month kernel: half weights at ±6 months, unit weights in between, divided by 12. */
export const SMOOTHED_13_MONTH_WEIGHTS: readonly number[] = Object.freeze(
  Array.from({ length: 13 }, (_, k) => (k === 0 || k === 12 ? 0.5 : 1) / 12),
);

/**
 * The standard 13-month smoothed sunspot number (the "tapered" running mean used for the
 * official cycle minima and maxima; the standard definition, common practice):
 *
 *   R_s(m) = [0.5 R(m−6) + Σ_{k=−5..5} R(m+k) + 0.5 R(m+6)] / 12.
 *
 * Undefined (NaN) for the first and last 6 months. Gaps: with the default policy any missing
 * month inside the window makes R_s undefined; `maxMissingWeight` admits a share of missing
 * weight (e.g. 1/12 for one missing interior month) with renormalised weights.
 *
 * @param monthly monthly means on a gap-free monthly grid (NaN = missing month), any units
 * @param options missing-data policy
 * @returns smoothed values, same length and units, NaN where undefined
 * @throws {RangeError} when maxMissingWeight is outside [0, 1)
 * @example
 * ```ts
 * import { smoothed13Month } from "./smoothed_13_month.ts";
 * import assert from "node:assert/strict";
 * // derived: a ramp 1..13 gives 7.0 at the centre
 * const r = smoothed13Month(Float64Array.from({ length: 13 }, (_, i) => i + 1));
 * assert.ok(Math.abs(r[6] - 7) < 1e-12);
 * assert.ok(Number.isNaN(r[5]) && Number.isNaN(r[7]));
 * ```
 */
export function smoothed13Month(
  monthly: ArrayLike<number>,
  options: WindowGapOptions = {},
): Float64Array {
  return weightedMovingAverage(monthly, SMOOTHED_13_MONTH_WEIGHTS, options);
}
