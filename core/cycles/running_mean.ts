/**
 * Centred running mean of any window length.
 *
 * @module
 */
import { weightedMovingAverage, type WindowGapOptions } from "./weighted_moving_average.ts";

/**
 * Kernel of a centred running mean over `window` samples.
 *
 * Odd window w = 2h + 1: equal weights 1/w on samples i − h .. i + h.
 * Even window w = 2h: no sample sits at the centre of w consecutive samples, so the centred
 * mean is defined as the mean of the two running means of length w that straddle sample i
 * (the "2×w moving average" of classical decomposition; common practice). That gives w + 1
 * samples with half weights at ±h: weights [1/2, 1, ..., 1, 1/2] / w. For w = 12 this is
 * exactly the 13-month smoothed sunspot number.
 *
 * @param window number of samples, integer ≥ 1
 * @returns kernel weights (odd length), summing to 1
 * @throws {RangeError} when window is not an integer ≥ 1
 * @example
 * ```ts
 * import { runningMeanWeights } from "./running_mean.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(runningMeanWeights(3), [1 / 3, 1 / 3, 1 / 3]);
 * assert.deepEqual(runningMeanWeights(2), [0.25, 0.5, 0.25]);
 * ```
 */
export function runningMeanWeights(window: number): number[] {
  if (!Number.isInteger(window) || window < 1) {
    throw new RangeError(
      `Cannot build running mean: window must be an integer >= 1, current value is ${window}`,
    );
  }
  if (window % 2 === 1) return Array.from({ length: window }, () => 1 / window);
  return Array.from(
    { length: window + 1 },
    (_, k) => (k === 0 || k === window ? 0.5 : 1) / window,
  );
}

/**
 * Centred running mean over `window` samples of a regular grid (odd and even windows as in
 * {@link runningMeanWeights}). Undefined (NaN) within half a window of either end and, with
 * the default policy, wherever the window touches a missing sample.
 *
 * @param values samples on a regular grid (NaN = missing), any units
 * @param window window length in samples, integer ≥ 1
 * @param options missing-data policy
 * @returns smoothed values, same length and units, NaN where undefined
 * @throws {RangeError} when window is not an integer ≥ 1 or the policy is out of range
 * @example
 * ```ts
 * import { runningMean } from "./running_mean.ts";
 * import assert from "node:assert/strict";
 * const y = runningMean(Float64Array.from([2, 4, 6, 8, 10]), 3);
 * assert.equal(y[2], 6);
 * assert.ok(Number.isNaN(y[0]));
 * ```
 */
export function runningMean(
  values: ArrayLike<number>,
  window: number,
  options: WindowGapOptions = {},
): Float64Array {
  return weightedMovingAverage(values, runningMeanWeights(window), options);
}
