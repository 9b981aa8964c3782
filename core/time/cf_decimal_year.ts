/**
 * CF calendar dates to sunlag's decimal years (proleptic Gregorian, UTC) and back.
 *
 * Real-world calendars (standard, proleptic_gregorian, julian) name real days: a date converts
 * exactly, through its absolute day number. The idealised calendars of climate models
 * (noleap, all_leap, 360_day) have no real days; two documented rules map them:
 *
 * - `"date"`: the same calendar date and time of day (2001-03-01 12:00 on noleap is
 *   2001-03-01 12:00), for dates that exist on the proleptic Gregorian calendar; others (30
 *   February, 29 February of a common year) are refused.
 * - `"month_position"`: the same month, at the same fraction of it: a date d, s seconds into
 *   the day, in a month of n days on its calendar maps to the Gregorian month's start plus
 *   (d − 1 + s / 86400) / n of its length. The middle of a 360_day February is the middle of
 *   February. Used for monthly and coarser series, whose values are means over the month.
 *
 * @module
 */
import { calendarInstant, decimalYear, decimalYearFromEpochDays } from "./decimal_year.ts";
import { daysBeforeMonth, daysFromCivil, daysInMonth, daysInYear } from "./calendar.ts";
import {
  astronomicalYear,
  calendarYear,
  type CfCalendar,
  cfDaysInMonth,
  isRealWorldCalendar,
} from "./cf_calendar.ts";
import { cfDateFromDayNumber, cfDayNumber } from "./cf_day_number.ts";
import { CfTimeError } from "./cf_time_error.ts";
import type { CfDateTime } from "./cf_time_units.ts";

/** How dates on an idealised calendar map to the proleptic Gregorian calendar. */
export type IdealisedDateRule = "date" | "month_position";

/**
 * Decimal year (proleptic Gregorian) of a date-time on a CF calendar.
 *
 * @param date the date-time, year as its calendar counts it
 * @param calendar its calendar
 * @param rule for noleap, all_leap and 360_day: `"date"` (default) or `"month_position"`
 * @returns the decimal year
 * @throws {CfTimeError} code `date_not_in_calendar` for a date not on `calendar`, or
 *   `not_representable` when rule `"date"` meets a date with no Gregorian twin
 * @example
 * ```ts
 * import { cfDateTimeToDecimalYear } from "./cf_decimal_year.ts";
 * import { decimalYear } from "./decimal_year.ts";
 * import assert from "node:assert/strict";
 * // Julian 2000-01-01 is Gregorian 2000-01-14.
 * const j = { year: 2000, month: 1, day: 1, seconds: 0 };
 * assert.equal(cfDateTimeToDecimalYear(j, "julian"), decimalYear(2000, 1, 14));
 * // The middle of a 360_day February (day 16, 00:00) is the middle of February.
 * const f = { year: 2001, month: 2, day: 16, seconds: 0 };
 * assert.equal(cfDateTimeToDecimalYear(f, "360_day", "month_position"), 2001 + 45 / 365);
 * ```
 */
export function cfDateTimeToDecimalYear(
  date: CfDateTime,
  calendar: CfCalendar,
  rule: IdealisedDateRule = "date",
): number {
  const dayNumber = cfDayNumber(calendar, date.year, date.month, date.day);
  if (isRealWorldCalendar(calendar)) {
    return decimalYearFromEpochDays(dayNumber + date.seconds / 86400);
  }
  const y = astronomicalYear(calendar, date.year);
  if (rule === "month_position") {
    const n = cfDaysInMonth(calendar, date.year, date.month);
    const fraction = (date.day - 1 + date.seconds / 86400) / n;
    const len = daysInMonth(y, date.month);
    return y + (daysBeforeMonth(y, date.month) + fraction * len) / daysInYear(y);
  }
  if (date.day > daysInMonth(y, date.month)) {
    throw notRepresentable(
      date,
      `of the ${calendar} calendar has no twin on the proleptic Gregorian calendar`,
    );
  }
  return decimalYear(y, date.month, date.day, date.seconds / 86400);
}

/**
 * The date-time on a CF calendar of a decimal year (proleptic Gregorian): the same instant on
 * the real-world calendars, the same date and time of day (rule `"date"`) on the idealised ones.
 *
 * @param t decimal year; finite
 * @param calendar the target calendar
 * @returns the date-time on `calendar`, seconds rounded to the millisecond (a decimal year
 *   holds about 10 µs)
 * @throws {CfTimeError} code `not_finite` for a non-finite time, or `not_representable` for a
 *   date the idealised calendar lacks (29 February on noleap, the 31st on 360_day)
 * @example
 * ```ts
 * import { decimalYearToCfDateTime } from "./cf_decimal_year.ts";
 * import { decimalYear } from "./decimal_year.ts";
 * import assert from "node:assert/strict";
 * const t = decimalYear(1582, 10, 15, 0.5);
 * assert.deepEqual(decimalYearToCfDateTime(t, "julian"), {
 *   year: 1582, month: 10, day: 5, seconds: 43200,
 * });
 * assert.throws(() => decimalYearToCfDateTime(decimalYear(2000, 2, 29), "noleap"), {
 *   code: "not_representable",
 * });
 * ```
 */
export function decimalYearToCfDateTime(t: number, calendar: CfCalendar): CfDateTime {
  if (!Number.isFinite(t)) {
    throw new CfTimeError("not_finite", "value", t, `Cannot date decimal year ${t}: not finite`);
  }
  const c = calendarInstant(t);
  let days = daysFromCivil(c.year, c.month, c.day);
  // A decimal year resolves about 10 µs near year 2000: round to the millisecond.
  let seconds = Math.round(c.fractionOfDay * 86400 * 1e3) / 1e3;
  if (seconds >= 86400) {
    days += 1;
    seconds -= 86400;
  }
  if (isRealWorldCalendar(calendar)) {
    return { ...cfDateFromDayNumber(calendar, days), seconds };
  }
  const g = cfDateFromDayNumber("proleptic_gregorian", days);
  const year = calendarYear(calendar, g.year);
  if (g.day > cfDaysInMonth(calendar, year, g.month)) {
    throw notRepresentable(g, `does not exist on the ${calendar} calendar`);
  }
  return { year, month: g.month, day: g.day, seconds };
}

function notRepresentable(d: { year: number; month: number; day: number }, why: string) {
  const text = `${d.year}-${String(d.month).padStart(2, "0")}-${String(d.day).padStart(2, "0")}`;
  return new CfTimeError("not_representable", "date", text, `Date ${text} ${why}`);
}
