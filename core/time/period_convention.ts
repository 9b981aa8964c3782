/**
 * Recognising regular monthly and annual grids written at the start or the middle of each
 * period, in calendar days or in equal twelfths of a year.
 *
 * @module
 */
import { daysBeforeMonth, daysInMonth, daysInYear } from "./calendar.ts";

/** Where in its period each time of a grid sits. */
export type PeriodPosition = "start" | "middle";

/**
 * How months are measured: calendar months (days; 1749-02-01 is 1749 + 31/365) or equal
 * twelfths of a year (R's `time()` of a monthly `ts`: year + (month − 1)/12).
 */
export type MonthMeasure = "calendar" | "twelfths";

/** A regular grid recognised by {@link readPeriodConvention}. */
export interface PeriodConvention {
  resolution: "monthly" | "annual";
  position: PeriodPosition;
  /** Monthly grids only: calendar months or twelfths of a year; null for annual grids. */
  months: MonthMeasure | null;
  /** Largest distance of a time from its convention's exact instant, in years. */
  maxDeviationYears: number;
  /** The middle of each time's period (sunlag's time model), in decimal years. */
  middle: Float64Array;
}

/** Options of {@link readPeriodConvention}. */
export interface PeriodConventionOptions {
  /**
   * Largest distance, in years, of a time from its convention's instant. The default accepts
   * decimal years rounded to 3 decimals (±0.0005 yr, about 4.4 hours), as many published
   * monthly files write them, while a daily series can never fit. @default 6e-4
   */
  tolerance?: number;
}

/** The candidate conventions, in order of preference when two fit equally well. */
const CANDIDATES: {
  resolution: "monthly" | "annual";
  position: PeriodPosition;
  months: MonthMeasure | null;
}[] = [
  { resolution: "annual", position: "middle", months: null },
  { resolution: "annual", position: "start", months: null },
  { resolution: "monthly", position: "middle", months: "calendar" },
  { resolution: "monthly", position: "start", months: "calendar" },
  { resolution: "monthly", position: "start", months: "twelfths" },
  { resolution: "monthly", position: "middle", months: "twelfths" },
];

/**
 * Recognise a regular monthly or annual grid and the convention its times follow.
 *
 * Conventions (a fact of the trade with no single source; common practice): a period is
 * labelled by its start (R's `time()` of a `ts`, year + (month − 1)/12 for monthly data, the
 * integer year for yearly data, or a date on the first of the month, read at any time of that
 * day) or by its middle (mid-month decimal years as many published
 * monthly records write them, sunlag's own middle-of-period rule, or year + (month − 0.5)/12).
 * Every time must sit within `tolerance` of one convention's instant in its period, with at
 * most one time per period; the convention with the smallest largest deviation wins (annual
 * before monthly, so integer years are years). A grid that is not already at sunlag's exact
 * calendar middles must also have a median spacing of 27.5–31.5 days (monthly) or 364.5–366.5
 * days (annual), as `inferResolution` requires, so quarterly values are not taken for months
 * with gaps. Gaps are allowed.
 *
 * @param time decimal years (proleptic Gregorian), strictly increasing, finite, 2 or more
 * @param options tolerance
 * @returns the convention and the middle of each period, or null when no convention fits
 * @throws {RangeError} when time has fewer than 2 points, is not finite or not increasing
 * @example
 * ```ts
 * import { readPeriodConvention } from "./period_convention.ts";
 * import assert from "node:assert/strict";
 * // R's time() of a monthly ts: the start of each month in twelfths of a year
 * const c = readPeriodConvention([1749, 1749 + 1 / 12, 1749 + 2 / 12])!;
 * assert.deepEqual([c.resolution, c.position, c.months], ["monthly", "start", "twelfths"]);
 * assert.ok(Math.abs(c.middle[0] - (1749 + 15.5 / 365)) < 1e-12); // mid-January 1749
 * assert.equal(readPeriodConvention([1700, 1701, 1702, 1704])!.position, "start");
 * assert.equal(readPeriodConvention([2000.1, 2000.13, 2000.5]), null);
 * // dates on the 1st (noon of 2001-01-01, 2001-02-01, 2001-03-01): calendar month starts
 * const firsts = [2001 + 0.5 / 365, 2001 + 31.5 / 365, 2001 + 59.5 / 365];
 * assert.deepEqual(readPeriodConvention(firsts)!.months, "calendar");
 * ```
 */
export function readPeriodConvention(
  time: ArrayLike<number>,
  options: PeriodConventionOptions = {},
): PeriodConvention | null {
  const tolerance = options.tolerance ?? 6e-4;
  checkTimes(time);
  let best: PeriodConvention | null = null;
  for (const c of CANDIDATES) {
    const fit = fitConvention(time, c.resolution, c.position, c.months, tolerance);
    if (fit && (best === null || fit.maxDeviationYears < best.maxDeviationYears)) best = fit;
  }
  if (best === null) return null;
  const exactMiddles = best.position === "middle" && best.months !== "twelfths" &&
    best.maxDeviationYears < 1e-9;
  return exactMiddles || spacingFits(time, best.resolution) ? best : null;
}

/** Fit one convention: the period of each time and its deviation, or null when one misses. */
function fitConvention(
  time: ArrayLike<number>,
  resolution: "monthly" | "annual",
  position: PeriodPosition,
  months: MonthMeasure | null,
  tolerance: number,
): PeriodConvention | null {
  const n = time.length;
  const middle = new Float64Array(n);
  let maxDev = 0, lastKey = -Infinity;
  for (let i = 0; i < n; i++) {
    const p = nearestPeriod(time[i], resolution, position, months);
    if (p.deviation > tolerance || p.key <= lastKey) return null;
    lastKey = p.key;
    maxDev = Math.max(maxDev, p.deviation);
    middle[i] = resolution === "annual" ? p.year + 0.5 : monthMiddle(p.year, p.month);
  }
  return { resolution, position, months, maxDeviationYears: maxDev, middle };
}

/** The period whose convention instant is nearest to t, with the distance in years. */
function nearestPeriod(
  t: number,
  resolution: "monthly" | "annual",
  position: PeriodPosition,
  months: MonthMeasure | null,
): { year: number; month: number; key: number; deviation: number } {
  const shift = position === "middle" ? 0.5 : 0;
  if (resolution === "annual") {
    const year = Math.round(t - shift);
    return { year, month: 1, key: year, deviation: Math.abs(t - year - shift) };
  }
  if (months === "twelfths") {
    const k = Math.round((t - shift / 12) * 12); // months since year 0
    const year = Math.floor(k / 12), month = k - year * 12 + 1;
    return { year, month, key: k, deviation: Math.abs(t - (k + shift) / 12) };
  }
  // calendar months: nearest among the months of t's year and its neighbours. A start is the
  // whole first day of the month (a date on the 1st, read at its noon, labels the month).
  let best = { year: 0, month: 0, key: 0, deviation: Infinity };
  const y0 = Math.floor(t);
  for (let year = y0 - 1; year <= y0 + 1; year++) {
    const len = daysInYear(year);
    for (let month = 1; month <= 12; month++) {
      const day = daysBeforeMonth(year, month) + shift * daysInMonth(year, month);
      const at = year + day / len, firstDayEnd = position === "start" ? 1 / len : 0;
      const deviation = t < at ? at - t : Math.max(0, t - at - firstDayEnd);
      if (deviation < best.deviation) best = { year, month, key: year * 12 + month - 1, deviation };
    }
  }
  return best;
}

/** The middle of a calendar month, as periodBounds and the ISO parser compute it. */
function monthMiddle(year: number, month: number): number {
  return year + (daysBeforeMonth(year, month) + daysInMonth(year, month) / 2) / daysInYear(year);
}

/** Median spacing in days within the range inferResolution gives the resolution. */
function spacingFits(time: ArrayLike<number>, resolution: "monthly" | "annual"): boolean {
  const d = Array.from({ length: time.length - 1 }, (_, i) => (time[i + 1] - time[i]) * 365.2425)
    .sort((a, b) => a - b);
  const m = d.length % 2 ? d[(d.length - 1) / 2] : (d[d.length / 2 - 1] + d[d.length / 2]) / 2;
  return resolution === "annual" ? m >= 364.5 && m <= 366.5 : m >= 27.5 && m <= 31.5;
}

function checkTimes(time: ArrayLike<number>): void {
  if (time.length < 2) {
    throw new RangeError(
      `Cannot read a period convention: needs at least 2 times, got ${time.length}`,
    );
  }
  for (let i = 0; i < time.length; i++) {
    if (!Number.isFinite(time[i]) || (i > 0 && !(time[i] > time[i - 1]))) {
      throw new RangeError(
        `Cannot read a period convention: time must be finite and strictly increasing, time[${i}] = ${
          time[i]
        }`,
      );
    }
  }
}
