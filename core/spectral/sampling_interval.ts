/**
 * The typical sampling interval of an unevenly sampled series, and the period range a
 * periodogram of it resolves by default.
 *
 * @module
 */
import { median } from "d3-array";

/**
 * Median of the intervals between consecutive sample times (d3-array `median`).
 *
 * @param time sample times, increasing, at least 2
 * @returns the median interval, time units
 * @throws {RangeError} with fewer than 2 times
 * @example
 * ```ts
 * import { medianSamplingInterval } from "./sampling_interval.ts";
 * import assert from "node:assert/strict";
 * assert.equal(medianSamplingInterval([0, 1, 2, 4, 5]), 1);
 * ```
 */
export function medianSamplingInterval(time: ArrayLike<number>): number {
  if (time.length < 2) {
    throw new RangeError(
      `Cannot compute sampling interval: needs at least 2 times, got ${time.length}`,
    );
  }
  const dts = new Float64Array(time.length - 1);
  for (let i = 1; i < time.length; i++) dts[i - 1] = time[i] - time[i - 1];
  return median(dts)!;
}

/**
 * Default period range of a periodogram of an uneven series: from twice the median sampling
 * interval (a pseudo-Nyquist period: common practice for uneven sampling, discussed by
 * VanderPlas 2018, ApJS 236, 16) to the record's span (the longest period it can resolve).
 *
 * @param time sample times, increasing, at least 2
 * @returns shortest and longest period, time units
 * @throws {RangeError} with fewer than 2 times
 * @example
 * ```ts
 * import { defaultPeriodRange } from "./sampling_interval.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(defaultPeriodRange([2000, 2001, 2002, 2003]), { min: 2, max: 3 });
 * ```
 */
export function defaultPeriodRange(time: ArrayLike<number>): { min: number; max: number } {
  return { min: 2 * medianSamplingInterval(time), max: time[time.length - 1] - time[0] };
}
