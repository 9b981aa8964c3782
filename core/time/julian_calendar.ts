/**
 * The Julian calendar as a day count: every fourth year is a leap year, with no century rule.
 * Days are counted on the same scale as {@link daysFromCivil} (days since 1970-01-01 on the
 * Gregorian calendar), so a Julian date and a Gregorian date with the same count are the same
 * day. Years are astronomical (year 0 = 1 BCE).
 *
 * Method: the Julian Day Number of a Julian calendar date (Richards 2013, "Calendars", in
 * Explanatory Supplement to the Astronomical Almanac, 3rd ed., §15.11, algorithms 3 and 4), less
 * 2440588, the Julian Day Number of 1970-01-01. Floor division keeps it exact for every integer
 * year, negative ones included.
 *
 * @module
 */

const UNIX_EPOCH_JDN = 2440588;

/**
 * Days since 1970-01-01 (Gregorian) of a date on the Julian calendar.
 *
 * @param year astronomical year (0 = 1 BCE)
 * @param month 1..12
 * @param day day of the month (not checked here; see `cfDayNumber` for checked dates)
 * @returns the day count; 1582-10-04 (Julian) is the day before 1582-10-15 (Gregorian)
 * @example
 * ```ts
 * import { daysFromJulianCivil } from "./julian_calendar.ts";
 * import { daysFromCivil } from "./calendar.ts";
 * import assert from "node:assert/strict";
 * // The Gregorian reform: Thursday 4 October 1582 (Julian) was followed by Friday 15 October.
 * assert.equal(daysFromJulianCivil(1582, 10, 4) + 1, daysFromCivil(1582, 10, 15));
 * assert.equal(daysFromJulianCivil(1969, 12, 19), 0); // 13 days behind in the 20th century
 * ```
 */
export function daysFromJulianCivil(year: number, month: number, day: number): number {
  const a = Math.floor((14 - month) / 12);
  const y = year + 4800 - a;
  const m = month + 12 * a - 3;
  const jdn = day + Math.floor((153 * m + 2) / 5) + 365 * y + Math.floor(y / 4) - 32083;
  return jdn - UNIX_EPOCH_JDN;
}

/**
 * The Julian calendar date of a day count (inverse of {@link daysFromJulianCivil}).
 *
 * @param days days since 1970-01-01 (Gregorian), an integer
 * @returns `{ year, month, day }` with an astronomical year
 * @example
 * ```ts
 * import { julianCivilFromDays } from "./julian_calendar.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(julianCivilFromDays(0), { year: 1969, month: 12, day: 19 });
 * assert.deepEqual(julianCivilFromDays(-141428), { year: 1582, month: 10, day: 4 });
 * ```
 */
export function julianCivilFromDays(days: number): { year: number; month: number; day: number } {
  const c = days + UNIX_EPOCH_JDN + 32082;
  const d = Math.floor((4 * c + 3) / 1461);
  const e = c - Math.floor((1461 * d) / 4);
  const m = Math.floor((5 * e + 2) / 153);
  const day = e - Math.floor((153 * m + 2) / 5) + 1;
  const month = m + 3 - 12 * Math.floor(m / 10);
  const year = d - 4800 + Math.floor(m / 10);
  return { year, month, day };
}
