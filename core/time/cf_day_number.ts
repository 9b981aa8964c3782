/**
 * Dates on a CF calendar as integer day numbers, and back: the integer calendar arithmetic
 * under CF time decoding, encoding and period bounds (no floating point, no epsilons).
 *
 * Day numbers count days from 1970-01-01 of the calendar. On the real-world calendars
 * (standard, proleptic_gregorian, julian) they are one absolute scale, the same as
 * {@link daysFromCivil}: equal numbers are the same day. On the idealised calendars each counts
 * its own days (noleap: 365 per year, all_leap: 366, 360_day: 360), so only differences on the
 * same calendar mean something. CF conventions 1.10, §4.4 and §4.4.1.
 *
 * @module
 */
import { civilFromDays, daysFromCivil, isLeapYear } from "./calendar.ts";
import { astronomicalYear, calendarYear, type CfCalendar, cfDaysInMonth } from "./cf_calendar.ts";
import { CfTimeError } from "./cf_time_error.ts";
import { daysFromJulianCivil, julianCivilFromDays } from "./julian_calendar.ts";

/** A calendar date (year as the calendar counts it, month 1..12, day 1..31). */
export interface CfDate {
  year: number;
  month: number;
  day: number;
}

const MONTH_DAYS = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
const CUM_365 = [0, 31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334, 365];
const CUM_366 = [0, 31, 60, 91, 121, 152, 182, 213, 244, 274, 305, 335, 366];
/** Day number of 1582-10-15, the first Gregorian day of the standard calendar. */
const GREGORIAN_START = daysFromCivil(1582, 10, 15);

/**
 * Day number of a date on a CF calendar.
 *
 * @param calendar a CF calendar
 * @param year year as the calendar counts it (no year 0 on standard and julian)
 * @param month 1..12
 * @param day 1..days in that month
 * @returns days since 1970-01-01 of the calendar (absolute on the real-world calendars)
 * @throws {CfTimeError} code `date_not_in_calendar` when the date does not exist on the
 *   calendar (e.g. 2001-02-29 on noleap, 2000-02-31 on 360_day, 1582-10-10 on standard)
 * @example
 * ```ts
 * import { cfDayNumber } from "./cf_day_number.ts";
 * import assert from "node:assert/strict";
 * assert.equal(cfDayNumber("standard", 1582, 10, 15) - cfDayNumber("standard", 1582, 10, 4), 1);
 * assert.equal(cfDayNumber("360_day", 1971, 1, 1), 360);
 * assert.equal(cfDayNumber("noleap", 2000, 3, 1) - cfDayNumber("noleap", 2000, 2, 28), 1);
 * ```
 */
export function cfDayNumber(
  calendar: CfCalendar,
  year: number,
  month: number,
  day: number,
): number {
  const dim = cfDaysInMonth(calendar, year, month);
  if (!Number.isInteger(day) || day < 1 || (calendar === "standard" ? day > 31 : day > dim)) {
    throw notInCalendar(calendar, year, month, day);
  }
  const y = astronomicalYear(calendar, year);
  switch (calendar) {
    case "proleptic_gregorian":
      return daysFromCivil(y, month, day);
    case "julian":
      return daysFromJulianCivil(y, month, day);
    case "standard": {
      const gregorian = year > 1582 ||
        (year === 1582 && (month > 10 || (month === 10 && day >= 15)));
      if (!gregorian && year === 1582 && month === 10 && day > 4) {
        throw notInCalendar(calendar, year, month, day);
      }
      const leap = gregorian ? isLeapYear(y) : ((y % 4) + 4) % 4 === 0;
      if (day > MONTH_DAYS[month - 1] + (month === 2 && leap ? 1 : 0)) {
        throw notInCalendar(calendar, year, month, day);
      }
      return gregorian ? daysFromCivil(y, month, day) : daysFromJulianCivil(y, month, day);
    }
    case "noleap":
      return 365 * (y - 1970) + CUM_365[month - 1] + day - 1;
    case "all_leap":
      return 366 * (y - 1970) + CUM_366[month - 1] + day - 1;
    case "360_day":
      return 360 * (y - 1970) + 30 * (month - 1) + day - 1;
  }
}

/**
 * The date of a day number on a CF calendar (inverse of {@link cfDayNumber}).
 *
 * @param calendar a CF calendar
 * @param dayNumber integer days since 1970-01-01 of the calendar
 * @returns the date, with the year as the calendar counts it
 * @throws {CfTimeError} code `not_finite` when the day number is not a safe integer
 * @example
 * ```ts
 * import { cfDateFromDayNumber } from "./cf_day_number.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(cfDateFromDayNumber("360_day", 359), { year: 1970, month: 12, day: 30 });
 * assert.deepEqual(cfDateFromDayNumber("standard", -141428), { year: 1582, month: 10, day: 4 });
 * assert.deepEqual(cfDateFromDayNumber("standard", -141427), { year: 1582, month: 10, day: 15 });
 * ```
 */
export function cfDateFromDayNumber(calendar: CfCalendar, dayNumber: number): CfDate {
  if (!Number.isSafeInteger(dayNumber)) {
    throw new CfTimeError(
      "not_finite",
      "value",
      dayNumber,
      `Cannot date day number ${dayNumber}: it must be a safe integer`,
    );
  }
  switch (calendar) {
    case "proleptic_gregorian":
      return civilFromDays(dayNumber);
    case "julian": {
      const d = julianCivilFromDays(dayNumber);
      return { ...d, year: calendarYear(calendar, d.year) };
    }
    case "standard": {
      const d = dayNumber >= GREGORIAN_START
        ? civilFromDays(dayNumber)
        : julianCivilFromDays(dayNumber);
      return { ...d, year: calendarYear(calendar, d.year) };
    }
    case "noleap":
      return fixedYear(dayNumber, 365, CUM_365);
    case "all_leap":
      return fixedYear(dayNumber, 366, CUM_366);
    case "360_day": {
      const yi = Math.floor(dayNumber / 360);
      const r = dayNumber - yi * 360;
      return { year: 1970 + yi, month: Math.floor(r / 30) + 1, day: (r % 30) + 1 };
    }
  }
}

function fixedYear(n: number, len: number, cum: number[]): CfDate {
  const yi = Math.floor(n / len);
  const r = n - yi * len;
  let m = 1;
  while (cum[m] <= r) m++;
  return { year: 1970 + yi, month: m, day: r - cum[m - 1] + 1 };
}

function notInCalendar(cal: CfCalendar, y: number, m: number, d: number): CfTimeError {
  const text = `${y}-${String(m).padStart(2, "0")}-${String(d).padStart(2, "0")}`;
  return new CfTimeError(
    "date_not_in_calendar",
    "date",
    text,
    `Date ${text} does not exist on the ${cal} calendar` +
      (cal === "standard" && y === 1582 && m === 10
        ? " (1582-10-05..14 were skipped at the Gregorian reform)"
        : ""),
  );
}
