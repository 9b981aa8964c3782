/**
 * Decimal years on the proleptic Gregorian calendar, sunlag's internal time axis.
 *
 * Definition (common practice; the exact day-of-year form used throughout sunlag):
 *
 *   decimal year = year + (day_of_year − 1 + fraction_of_day) / days_in_year
 *
 * with days_in_year 365 or 366, so 1 January 00:00 UTC of any year is the integer year and
 * each day has the length 1/365 or 1/366 of its own year. Times are UTC.
 *
 * @module
 */
import {
  civilFromDays,
  dayOfYear,
  daysBeforeMonth,
  daysFromCivil,
  daysInYear,
} from "./calendar.ts";

/**
 * How close (in days, about 0.09 s) a decimal year must come to the start of a day to be read
 * as that start: decimal years are binary fractions, so the start of a day computed one way may
 * land a few ulps either side of the start computed another way. The one tolerance of the time
 * model: {@link calendarInstant} and the calendar periods of core/series use it.
 */
export const DAY_TOLERANCE = 1e-6;

/** A calendar date with the fraction of the day elapsed (0 = midnight, 0.5 = noon). */
export interface CalendarInstant {
  year: number;
  month: number;
  day: number;
  /** Fraction of the day in [0, 1). */
  fractionOfDay: number;
}

/**
 * Decimal year of a calendar instant (UTC).
 *
 * @param year integer year
 * @param month month 1..12 (default 1)
 * @param day day of month (default 1)
 * @param fractionOfDay fraction of the day elapsed, in [0, 1] (default 0 = midnight)
 * @returns the decimal year
 * @throws {RangeError} for a date that does not exist or a fraction outside [0, 1]
 * @example
 * ```ts
 * import { decimalYear } from "./decimal_year.ts";
 * import assert from "node:assert/strict";
 * // 2024-03-01 noon: day of year 61 (31 + 29 + 1); (61 − 1 + 0.5) / 366
 * assert.equal(decimalYear(2024, 3, 1, 0.5), 2024 + 60.5 / 366);
 * assert.equal(decimalYear(1996), 1996);
 * ```
 */
export function decimalYear(year: number, month = 1, day = 1, fractionOfDay = 0): number {
  if (!Number.isInteger(year)) {
    throw new RangeError(
      `Cannot compute decimal year: year must be an integer, current value is ${year}`,
    );
  }
  if (!(fractionOfDay >= 0 && fractionOfDay <= 1)) {
    throw new RangeError(
      `Cannot compute decimal year: fractionOfDay must be in [0, 1], current value is ${fractionOfDay}`,
    );
  }
  const doy = dayOfYear(year, month, day);
  return year + (doy - 1 + fractionOfDay) / daysInYear(year);
}

/**
 * Decimal year of an instant given as (possibly fractional) days since 1970-01-01 00:00 UTC.
 *
 * @param days days since the Unix epoch; finite
 * @returns the decimal year
 * @throws {RangeError} when days is not finite
 * @example
 * ```ts
 * import { decimalYearFromEpochDays } from "./decimal_year.ts";
 * import assert from "node:assert/strict";
 * assert.equal(decimalYearFromEpochDays(0), 1970);
 * assert.equal(decimalYearFromEpochDays(0.5), 1970 + 0.5 / 365);
 * ```
 */
export function decimalYearFromEpochDays(days: number): number {
  if (!Number.isFinite(days)) {
    throw new RangeError(
      `Cannot compute decimal year: days must be finite, current value is ${days}`,
    );
  }
  const whole = Math.floor(days);
  const { year } = civilFromDays(whole);
  const start = daysFromCivil(year, 1, 1);
  return year + (whole - start + (days - whole)) / daysInYear(year);
}

/**
 * Day number (days since 1970-01-01) of the day holding a decimal year, read as
 * {@link calendarInstant} reads it (within {@link DAY_TOLERANCE} of a day's start is that day),
 * without building the date: the fast path for binning long series by day, month or year.
 *
 * @param t decimal year; finite
 * @returns the integer day number
 * @throws {RangeError} when t is not finite
 * @example
 * ```ts
 * import { epochDayOf } from "./decimal_year.ts";
 * import assert from "node:assert/strict";
 * assert.equal(epochDayOf(1970 + 0.5 / 365), 0);
 * assert.equal(epochDayOf(1970 - 1e-12), 0); // a few ulps below 1970 is its first day
 * assert.equal(epochDayOf(1969.999), -1);
 * ```
 */
export function epochDayOf(t: number): number {
  if (!Number.isFinite(t)) {
    throw new RangeError(
      `Cannot convert decimal year: value must be finite, current value is ${t}`,
    );
  }
  const year = Math.floor(t);
  // (t − year)·days < days, so the day index is at most `days`: the next year's first day
  return daysFromCivil(year, 1, 1) + Math.floor((t - year) * daysInYear(year) + DAY_TOLERANCE);
}

/**
 * Calendar instant of a decimal year (inverse of {@link decimalYear}).
 *
 * A tolerance of {@link DAY_TOLERANCE} (1e-6 day) absorbs floating-point error so that the
 * start of a day is not read as the end of the previous one.
 *
 * @param t decimal year; finite
 * @returns `{ year, month, day, fractionOfDay }`
 * @throws {RangeError} when t is not finite
 * @example
 * ```ts
 * import { calendarInstant, decimalYear } from "./decimal_year.ts";
 * import assert from "node:assert/strict";
 * const c = calendarInstant(decimalYear(2000, 12, 31, 0.5));
 * assert.equal(c.year, 2000);
 * assert.equal(c.month, 12);
 * assert.equal(c.day, 31);
 * assert.ok(Math.abs(c.fractionOfDay - 0.5) < 1e-9);
 * ```
 */
export function calendarInstant(t: number): CalendarInstant {
  if (!Number.isFinite(t)) {
    throw new RangeError(
      `Cannot convert decimal year: value must be finite, current value is ${t}`,
    );
  }
  let year = Math.floor(t);
  let diy = daysInYear(year);
  let x = (t - year) * diy; // days since 1 January 00:00
  let dayIndex = Math.floor(x + DAY_TOLERANCE);
  if (dayIndex >= diy) {
    year += 1;
    x = 0;
    dayIndex = 0;
    diy = daysInYear(year);
  }
  const fractionOfDay = Math.min(Math.max(x - dayIndex, 0), 1 - Number.EPSILON);
  let month = 1;
  while (month < 12 && daysBeforeMonth(year, month + 1) <= dayIndex) month++;
  return { year, month, day: dayIndex - daysBeforeMonth(year, month) + 1, fractionOfDay };
}
