/**
 * The proleptic Gregorian calendar: leap years, month lengths and day counts.
 *
 * The Gregorian rule of 1582 extended backwards to every year ("proleptic",
 * ISO 8601 §3.2.1): a year is a leap year when it is divisible by 4, except century years,
 * which are leap years only when divisible by 400. Year 0 exists (astronomical numbering,
 * ISO 8601 §4.1.2.4) and is a leap year.
 *
 * Written by hand: the arithmetic is a few lines, and the JavaScript `Date` maps two-digit
 * years to the 1900s and cannot express a day as an exact fraction of a year.
 *
 * @module
 */

const DAYS_BEFORE_MONTH = [0, 31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334, 365];

/**
 * Whether a year is a leap year on the proleptic Gregorian calendar.
 *
 * @param year integer year (astronomical numbering: 0 = 1 BCE)
 * @returns true for leap years (366 days)
 * @throws {RangeError} when year is not an integer
 * @example
 * ```ts
 * import { isLeapYear } from "./calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(isLeapYear(2000), true); // divisible by 400
 * assert.equal(isLeapYear(1900), false); // century, not divisible by 400
 * assert.equal(isLeapYear(2024), true);
 * assert.equal(isLeapYear(2023), false);
 * ```
 */
export function isLeapYear(year: number): boolean {
  if (!Number.isInteger(year)) {
    throw new RangeError(
      `Cannot test leap year: year must be an integer, current value is ${year}`,
    );
  }
  return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0;
}

/**
 * Number of days in a year (365 or 366).
 *
 * @param year integer year
 * @returns 365 or 366
 * @throws {RangeError} when year is not an integer
 * @example
 * ```ts
 * import { daysInYear } from "./calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(daysInYear(2024), 366);
 * assert.equal(daysInYear(1900), 365);
 * ```
 */
export function daysInYear(year: number): number {
  return isLeapYear(year) ? 366 : 365;
}

/**
 * Number of days in a month.
 *
 * @param year integer year
 * @param month month 1..12
 * @returns 28..31
 * @throws {RangeError} when month is not an integer in 1..12
 * @example
 * ```ts
 * import { daysInMonth } from "./calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(daysInMonth(2024, 2), 29);
 * assert.equal(daysInMonth(1900, 2), 28);
 * assert.equal(daysInMonth(2023, 8), 31);
 * ```
 */
export function daysInMonth(year: number, month: number): number {
  checkMonth(month);
  const leap = isLeapYear(year) && month === 2 ? 1 : 0;
  return DAYS_BEFORE_MONTH[month] - DAYS_BEFORE_MONTH[month - 1] + leap;
}

/**
 * Number of days in the year before the first day of a month (0 for January).
 *
 * @param year integer year
 * @param month month 1..12
 * @returns 0..335
 * @throws {RangeError} when month is not an integer in 1..12
 * @example
 * ```ts
 * import { daysBeforeMonth } from "./calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(daysBeforeMonth(2024, 3), 60); // 31 + 29
 * assert.equal(daysBeforeMonth(2023, 3), 59); // 31 + 28
 * ```
 */
export function daysBeforeMonth(year: number, month: number): number {
  checkMonth(month);
  return DAYS_BEFORE_MONTH[month - 1] + (month > 2 && isLeapYear(year) ? 1 : 0);
}

/**
 * Day of the year (1 = 1 January) of a calendar date.
 *
 * @param year integer year
 * @param month month 1..12
 * @param day day of month, 1..days in that month
 * @returns 1..366
 * @throws {RangeError} when the date does not exist (e.g. 2023-02-29)
 * @example
 * ```ts
 * import { dayOfYear } from "./calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(dayOfYear(2024, 3, 1), 61);
 * assert.equal(dayOfYear(2023, 12, 31), 365);
 * ```
 */
export function dayOfYear(year: number, month: number, day: number): number {
  const dim = daysInMonth(year, month);
  if (!Number.isInteger(day) || day < 1 || day > dim) {
    throw new RangeError(
      `Cannot compute day of year: day must be an integer in 1..${dim} for ${year}-${
        String(month).padStart(2, "0")
      }, current value is ${day}`,
    );
  }
  return daysBeforeMonth(year, month) + day;
}

/**
 * Days from 0000-03-01 shifted so that 1970-01-01 is day 0 (the "days from civil" algorithm,
 * Hinnant 2013, "chrono-Compatible Low-Level Date Algorithms"). Exact for any integer year.
 *
 * @param year integer year
 * @param month month 1..12
 * @param day day of month
 * @returns days since 1970-01-01 (negative before)
 * @example
 * ```ts
 * import { daysFromCivil } from "./calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(daysFromCivil(1970, 1, 1), 0);
 * assert.equal(daysFromCivil(2000, 3, 1), 11017);
 * ```
 */
export function daysFromCivil(year: number, month: number, day: number): number {
  const y = month <= 2 ? year - 1 : year;
  const era = Math.floor(y / 400);
  const yoe = y - era * 400;
  const mp = (month + 9) % 12;
  const doy = Math.floor((153 * mp + 2) / 5) + day - 1;
  const doe = yoe * 365 + Math.floor(yoe / 4) - Math.floor(yoe / 100) + doy;
  return era * 146097 + doe - 719468;
}

/**
 * The calendar date of a day count (inverse of {@link daysFromCivil}; Hinnant 2013).
 *
 * @param days days since 1970-01-01 (an integer)
 * @returns `{ year, month, day }`
 * @example
 * ```ts
 * import { civilFromDays } from "./calendar.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(civilFromDays(11017), { year: 2000, month: 3, day: 1 });
 * assert.deepEqual(civilFromDays(-1), { year: 1969, month: 12, day: 31 });
 * ```
 */
export function civilFromDays(days: number): { year: number; month: number; day: number } {
  const z = days + 719468;
  const era = Math.floor(z / 146097);
  const doe = z - era * 146097;
  const yoe = Math.floor(
    (doe - Math.floor(doe / 1460) + Math.floor(doe / 36524) -
      Math.floor(doe / 146096)) / 365,
  );
  const doy = doe - (365 * yoe + Math.floor(yoe / 4) - Math.floor(yoe / 100));
  const mp = Math.floor((5 * doy + 2) / 153);
  const day = doy - Math.floor((153 * mp + 2) / 5) + 1;
  const month = mp < 10 ? mp + 3 : mp - 9;
  const year = yoe + era * 400 + (month <= 2 ? 1 : 0);
  return { year, month, day };
}

function checkMonth(month: number): void {
  if (!Number.isInteger(month) || month < 1 || month > 12) {
    throw new RangeError(`Invalid month: must be an integer in 1..12, current value is ${month}`);
  }
}
