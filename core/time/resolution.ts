/**
 * Sampling resolution of a time axis and its inference.
 *
 * @module
 */
import { daysBeforeMonth, daysInMonth, daysInYear } from "./calendar.ts";

/** Sampling resolution of a series. */
export type TimeResolution = "daily" | "monthly" | "annual" | "irregular";

/** Calendar resolutions ordered from fine to coarse. */
export const CALENDAR_RESOLUTIONS = ["daily", "monthly", "annual"] as const;

/** A resolution with calendar periods (not irregular). */
export type CalendarResolution = typeof CALENDAR_RESOLUTIONS[number];

/** Tolerance for "same position in its period", in days (about 0.09 s). */
const TOL_DAYS = 1e-6;

/**
 * Infer the resolution of a time axis (decimal years, strictly increasing).
 *
 * Rule (sunlag's own, stated here so it can be checked):
 * 1. every time at the middle of a year → `annual`; every time at the middle of a month →
 *    `monthly`; every time at noon → `daily` (the middle-of-period rule of the ISO parser);
 * 2. otherwise, by calendar and spacing: at most one point per calendar year and a median
 *    spacing of 365–366 days → `annual`; at most one point per calendar month and a median
 *    spacing of 28–31 days → `monthly`; every point at the same time of day, at most one per
 *    day, median spacing 1 day → `daily` (so month-start or midnight stamps are recognised);
 * 3. anything else → `irregular`.
 *
 * Gaps do not change the resolution: a monthly series with missing months is still monthly.
 *
 * @param time decimal years, strictly increasing, finite, at least 2 points
 * @returns the inferred resolution
 * @throws {RangeError} for fewer than 2 points, a non-finite time or a time axis that is not
 *   strictly increasing
 * @example
 * ```ts
 * import { inferResolution } from "./resolution.ts";
 * import assert from "node:assert/strict";
 * assert.equal(inferResolution([1996.5, 1997.5, 1999.5]), "annual");
 * assert.equal(inferResolution([2000.1, 2000.13, 2000.5]), "irregular");
 * ```
 */
export function inferResolution(time: ArrayLike<number>): TimeResolution {
  const n = time.length;
  if (n < 2) {
    throw new RangeError(`Cannot infer resolution: needs at least 2 points, got ${n}`);
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(time[i])) {
      throw new RangeError(`Cannot infer resolution: time[${i}] is not finite (${time[i]})`);
    }
    if (i > 0 && !(time[i] > time[i - 1])) {
      throw new RangeError(
        `Cannot infer resolution: time must be strictly increasing, time[${i}] = ${
          time[i]
        } follows ${time[i - 1]}`,
      );
    }
  }
  // Position of each point: year, day offset in the year, month.
  const year = new Float64Array(n), dayOff = new Float64Array(n), month = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    const y = Math.floor(time[i]);
    const x = (time[i] - y) * daysInYear(y);
    year[i] = y;
    dayOff[i] = x;
    let mo = 1;
    while (mo < 12 && daysBeforeMonth(y, mo + 1) <= x + TOL_DAYS) mo++;
    month[i] = mo;
  }
  const all = (f: (i: number) => boolean) => {
    for (let i = 0; i < n; i++) if (!f(i)) return false;
    return true;
  };
  const midYear = (i: number) => Math.abs(dayOff[i] - daysInYear(year[i]) / 2) < TOL_DAYS;
  const midMonth = (i: number) =>
    Math.abs(
      dayOff[i] - daysBeforeMonth(year[i], month[i]) - daysInMonth(year[i], month[i]) / 2,
    ) < TOL_DAYS;
  const noon = (i: number) => Math.abs(dayOff[i] - Math.floor(dayOff[i]) - 0.5) < TOL_DAYS;
  if (all(midYear)) return "annual";
  if (all(midMonth)) return "monthly";
  if (all(noon)) return "daily";

  const spacing = new Float64Array(n - 1);
  for (let i = 1; i < n; i++) spacing[i - 1] = (time[i] - time[i - 1]) * 365.2425;
  spacing.sort();
  const med = (n - 1) % 2 === 1
    ? spacing[(n - 2) / 2]
    : (spacing[(n - 1) / 2 - 1] + spacing[(n - 1) / 2]) / 2;
  const distinct = (key: (i: number) => number) => {
    for (let i = 1; i < n; i++) if (key(i) === key(i - 1)) return false;
    return true;
  };
  if (med >= 364.5 && med <= 366.5 && distinct((i) => year[i])) return "annual";
  if (med >= 27.5 && med <= 31.5 && distinct((i) => year[i] * 12 + month[i])) return "monthly";
  const frac0 = dayOff[0] - Math.floor(dayOff[0] + TOL_DAYS);
  const sameTimeOfDay = all((i) => {
    const f = dayOff[i] - Math.floor(dayOff[i] + TOL_DAYS);
    return Math.abs(f - frac0) < 1e-5;
  });
  if (
    sameTimeOfDay && med > 0.99 && med < 1.01 &&
    distinct((i) => year[i] * 400 + Math.floor(dayOff[i] + TOL_DAYS))
  ) return "daily";
  return "irregular";
}
