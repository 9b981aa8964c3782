/**
 * Bounds of a calendar month or year on a CF calendar, as integer day numbers: the cell
 * boundaries of period means (CF conventions 1.10, §7.1 "Cell Boundaries" and §7.4 "Climatological
 * Statistics": a mean over a month has the month's first instant as its lower bound and the
 * next month's first instant as its upper bound). Integer calendar arithmetic, end exclusive.
 *
 * @module
 */
import type { CfCalendar } from "./cf_calendar.ts";
import { cfDayNumber } from "./cf_day_number.ts";

/** A period as day numbers on its calendar: `[start, end)`. */
export interface CfDayRange {
  /** Day number of the first day. */
  start: number;
  /** Day number of the first day after the period. */
  end: number;
}

/**
 * Bounds of a month on a calendar.
 *
 * @param calendar a CF calendar
 * @param year year as the calendar counts it
 * @param month 1..12
 * @returns `{ start, end }` day numbers; `end − start` is the month's length
 * @throws {CfTimeError} code `date_not_in_calendar` for a month or year that does not exist
 * @example
 * ```ts
 * import { cfMonthBounds } from "./cf_period_bounds.ts";
 * import assert from "node:assert/strict";
 * const feb = cfMonthBounds("360_day", 2001, 2);
 * assert.equal(feb.end - feb.start, 30);
 * const oct = cfMonthBounds("standard", 1582, 10);
 * assert.equal(oct.end - oct.start, 21); // 1–4 and 15–31 October 1582
 * ```
 */
export function cfMonthBounds(calendar: CfCalendar, year: number, month: number): CfDayRange {
  const start = cfDayNumber(calendar, year, month, 1);
  const end = month === 12
    ? cfDayNumber(calendar, nextYear(calendar, year), 1, 1)
    : cfDayNumber(calendar, year, month + 1, 1);
  return { start, end };
}

/**
 * Bounds of a year on a calendar.
 *
 * @param calendar a CF calendar
 * @param year year as the calendar counts it
 * @returns `{ start, end }` day numbers (1 January to the next 1 January)
 * @throws {CfTimeError} code `date_not_in_calendar` for a year that does not exist
 * @example
 * ```ts
 * import { cfYearBounds } from "./cf_period_bounds.ts";
 * import assert from "node:assert/strict";
 * const y = cfYearBounds("noleap", 2000);
 * assert.equal(y.end - y.start, 365);
 * const j = cfYearBounds("julian", -1); // 1 BCE, a leap year; year 1 follows
 * assert.equal(j.end - j.start, 366);
 * ```
 */
export function cfYearBounds(calendar: CfCalendar, year: number): CfDayRange {
  return {
    start: cfDayNumber(calendar, year, 1, 1),
    end: cfDayNumber(calendar, nextYear(calendar, year), 1, 1),
  };
}

function nextYear(calendar: CfCalendar, year: number): number {
  return year === -1 && (calendar === "standard" || calendar === "julian") ? 1 : year + 1;
}
