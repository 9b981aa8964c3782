/**
 * Put a monthly or yearly series on a gap-free regular grid of calendar periods, with NaN for
 * every period that has no value, so that window smoothers can apply their missing-data
 * policy month by month instead of silently closing gaps.
 *
 * Time model (shared conventions): decimal years on the proleptic Gregorian calendar; a month
 * is represented by its mid-month instant, a year by year + 0.5.
 *
 * @module
 */
import { daysBeforeMonth, daysInMonth, daysInYear } from "../time/calendar.ts";

/** Calendar period of a regular grid. */
export type GridResolution = "monthly" | "annual";

/** A series on a gap-free grid of calendar periods. */
export interface RegularGrid {
  resolution: GridResolution;
  /** Index of the first period: year·12 + (month − 1) for monthly grids, the year for annual. */
  firstPeriod: number;
  /** Mid-period decimal years, one per period, no gaps. */
  time: Float64Array;
  /** Values; NaN where the period has no (finite) value. */
  value: Float64Array;
  /** Sampling interval in years: 1/12 for monthly, 1 for annual. */
  step: number;
}

/**
 * The calendar period (year·12 + month − 1, or the year) that contains a decimal year.
 *
 * @param t decimal year, finite
 * @param resolution "monthly" or "annual"
 * @returns integer period index
 * @throws {RangeError} when t is not finite
 * @example
 * ```ts
 * import { periodIndex } from "./regular_grid.ts";
 * import assert from "node:assert/strict";
 * // 1996.5 lies in July 1996 (1996 is a leap year: day 183.0 of 366)
 * assert.equal(periodIndex(1996.5, "monthly"), 1996 * 12 + 6);
 * assert.equal(periodIndex(1996.5, "annual"), 1996);
 * ```
 */
export function periodIndex(t: number, resolution: GridResolution): number {
  if (!Number.isFinite(t)) {
    throw new RangeError(`Cannot find calendar period: time must be finite, current value is ${t}`);
  }
  const year = Math.floor(t);
  if (resolution === "annual") return year;
  const day = (t - year) * daysInYear(year);
  let month = 12;
  while (month > 1 && daysBeforeMonth(year, month) > day + 1e-9) month--;
  return year * 12 + month - 1;
}

/**
 * Mid-period decimal year of a calendar period index (inverse of {@link periodIndex}).
 *
 * @param period period index from {@link periodIndex}
 * @param resolution "monthly" or "annual"
 * @returns decimal year of the middle of the period
 * @example
 * ```ts
 * import { periodMidpoint } from "./regular_grid.ts";
 * import assert from "node:assert/strict";
 * // mid-August 1996: (213 + 15.5) / 366 days into the leap year
 * assert.ok(Math.abs(periodMidpoint(1996 * 12 + 7, "monthly") - (1996 + 228.5 / 366)) < 1e-12);
 * assert.equal(periodMidpoint(1996, "annual"), 1996.5);
 * ```
 */
export function periodMidpoint(period: number, resolution: GridResolution): number {
  if (resolution === "annual") return period + 0.5;
  const year = Math.floor(period / 12);
  const month = period - year * 12 + 1;
  return year +
    (daysBeforeMonth(year, month) + daysInMonth(year, month) / 2) / daysInYear(year);
}

/**
 * Place (time, value) points on a regular grid of months or years, from the first to the last
 * period present. Periods without a point, and points whose value is not finite, become NaN.
 *
 * @param time decimal years, strictly increasing
 * @param value values, same length (NaN allowed: treated as missing)
 * @param resolution "monthly" or "annual"
 * @returns the gap-free grid
 * @throws {RangeError} when the arrays differ in length, are empty, times are not increasing,
 *   or two points fall in the same calendar period
 * @example
 * ```ts
 * import { toRegularGrid } from "./regular_grid.ts";
 * import assert from "node:assert/strict";
 * const g = toRegularGrid([2000.5, 2002.5], [1, 3], "annual");
 * assert.deepEqual([...g.time], [2000.5, 2001.5, 2002.5]);
 * assert.ok(Number.isNaN(g.value[1]));
 * ```
 */
export function toRegularGrid(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  resolution: GridResolution,
): RegularGrid {
  const n = time.length;
  if (n === 0) throw new RangeError("Cannot build regular grid: the series is empty");
  if (value.length !== n) {
    throw new RangeError(
      `Cannot build regular grid: time has ${n} points but value has ${value.length}`,
    );
  }
  const periods = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    periods[i] = periodIndex(time[i], resolution);
    if (i > 0 && periods[i] <= periods[i - 1]) {
      throw new RangeError(
        `Cannot build regular grid: points ${i - 1} and ${i} (t = ${time[i - 1]}, ${
          time[i]
        }) fall in the same ${resolution === "monthly" ? "month" : "year"} or are not increasing`,
      );
    }
  }
  const first = periods[0], count = periods[n - 1] - first + 1;
  const t = new Float64Array(count), v = new Float64Array(count).fill(NaN);
  for (let k = 0; k < count; k++) t[k] = periodMidpoint(first + k, resolution);
  for (let i = 0; i < n; i++) {
    const x = value[i];
    v[periods[i] - first] = Number.isFinite(x) ? x : NaN;
  }
  return {
    resolution,
    firstPeriod: first,
    time: t,
    value: v,
    step: resolution === "monthly" ? 1 / 12 : 1,
  };
}
