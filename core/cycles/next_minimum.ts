/**
 * The next cycle minimum estimated from the lengths of past cycles.
 *
 * @module
 */
import { deviation, mean } from "d3-array";

/** What {@link nextMinimumEstimate} gives. */
export interface NextMinimumEstimate {
  /** Estimated date of the next minimum, decimal year. */
  time: number;
  /** Mean length of the past cycles, years. */
  meanLength: number;
  /** Their sample standard deviation, years (null for one cycle). */
  sdLength: number | null;
  /** Number of past cycles. */
  n: number;
}

/**
 * Estimate the ending minimum of the cycle in progress as its start plus the mean length of
 * the complete cycles before it, with their standard deviation as the spread (the climatological
 * estimate, common practice: cycle lengths vary about 9 to 14 years, Hathaway 2010, Living Rev.
 * Sol. Phys. 7, 1).
 *
 * @param start starting minimum of the cycle in progress, decimal year
 * @param lengths lengths of complete cycles, years
 * @returns the estimate, or null without complete cycles
 * @example
 * ```ts
 * import { nextMinimumEstimate } from "./next_minimum.ts";
 * import assert from "node:assert/strict";
 * const e = nextMinimumEstimate(2019.9, [10, 12, 11])!;
 * assert.ok(Math.abs(e.time - 2030.9) < 1e-9);
 * assert.equal(e.sdLength, 1);
 * assert.equal(nextMinimumEstimate(2019.9, []), null);
 * ```
 */
export function nextMinimumEstimate(
  start: number,
  lengths: readonly number[],
): NextMinimumEstimate | null {
  if (lengths.length === 0) return null;
  const m = mean(lengths)!;
  return {
    time: start + m,
    meanLength: m,
    sdLength: lengths.length > 1 ? deviation(lengths)! : null,
    n: lengths.length,
  };
}
