/**
 * An empirical prediction interval for a forecast cycle maximum from the errors of the same
 * method on past cycles.
 *
 * @module
 */
import { quantileSorted } from "d3-array";
import type { HindcastCase } from "./cycle_hindcast.ts";

/** What {@link hindcastInterval} gives. */
export interface HindcastInterval {
  /** Number of hindcast cases the quantiles come from. */
  cases: number;
  /** Interval of the maximum's date, decimal years. */
  timeInterval: [number, number];
  /** Interval of the maximum's value, input units (the lower end not below 0). */
  valueInterval: [number, number];
}

/**
 * The forecast minus the (1 ± level)/2 quantiles (R-7, d3-array `quantileSorted`) of the
 * hindcast errors (predicted − observed) of past cycles, so that the interval covers past
 * outcomes at the stated rate: an empirical prediction interval (common practice in forecast
 * verification). The value's lower end is cut at 0 (activity is not negative).
 *
 * @param cases hindcast cases at the same phase as the forecast
 * @param maximum forecast maximum: decimal year and value
 * @param level central probability in (0, 1)
 * @param minCases fewest cases for an interval, default 10
 * @returns the interval, or null with fewer than `minCases` cases
 * @example
 * ```ts
 * import { hindcastInterval } from "./hindcast_interval.ts";
 * import type { HindcastCase } from "./cycle_hindcast.ts";
 * import assert from "node:assert/strict";
 * const cases = Array.from({ length: 11 }, (_, k) => ({ error: { time: (k - 5) / 10, value: k - 5 } }));
 * const h = hindcastInterval(cases as HindcastCase[], { time: 2025, value: 100 }, 0.8)!;
 * assert.ok(Math.abs(h.valueInterval[0] - 96) < 1e-9 && Math.abs(h.valueInterval[1] - 104) < 1e-9);
 * assert.equal(hindcastInterval([], { time: 2025, value: 100 }, 0.8), null);
 * ```
 */
export function hindcastInterval(
  cases: readonly Pick<HindcastCase, "error">[],
  maximum: { time: number; value: number },
  level: number,
  minCases = 10,
): HindcastInterval | null {
  if (cases.length < minCases) return null;
  const q = (xs: number[], p: number) => quantileSorted(xs.sort((a, b) => a - b), p) as number;
  const lo = (1 - level) / 2, hi = 1 - lo;
  const et = cases.map((c) => c.error.time), ev = cases.map((c) => c.error.value);
  return {
    cases: cases.length,
    timeInterval: [maximum.time - q(et, hi), maximum.time - q(et, lo)],
    valueInterval: [Math.max(0, maximum.value - q(ev, hi)), maximum.value - q(ev, lo)],
  };
}
