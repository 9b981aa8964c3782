/**
 * The calendars of the CF conventions (CF conventions 1.10, §4.4.1 "Calendar"): their names
 * and aliases, which of them have a year 0, and their leap years and month lengths.
 *
 * - `standard` (alias `gregorian`): the mixed Julian/Gregorian calendar, Julian up to
 *   1582-10-04 and Gregorian from the next day, 1582-10-15; the dates in between do not exist.
 * - `proleptic_gregorian`: the Gregorian rule for every year.
 * - `julian`: every fourth year a leap year.
 * - `noleap` (alias `365_day`), `all_leap` (alias `366_day`), `360_day` (twelve 30-day
 *   months): the idealised calendars of climate models.
 *
 * Years: `standard` and `julian` have no year 0 (year −1 is followed by year 1, CF 1.10
 * §4.4.1, as cftime counts them); the other calendars count astronomically, with a year 0.
 *
 * @module
 */
import { isLeapYear } from "./calendar.ts";
import { CfTimeError } from "./cf_time_error.ts";

/** The CF calendars sunlag decodes, by their canonical names. */
export const CF_CALENDARS = [
  "standard",
  "proleptic_gregorian",
  "noleap",
  "all_leap",
  "360_day",
  "julian",
] as const;

/** A CF calendar (canonical name). */
export type CfCalendar = typeof CF_CALENDARS[number];

/** Every accepted calendar name with the calendar it means (CF conventions 1.10, §4.4.1). */
export const CF_CALENDAR_NAMES: Readonly<Record<string, CfCalendar>> = {
  standard: "standard",
  gregorian: "standard",
  proleptic_gregorian: "proleptic_gregorian",
  noleap: "noleap",
  "365_day": "noleap",
  all_leap: "all_leap",
  "366_day": "all_leap",
  "360_day": "360_day",
  julian: "julian",
};

/**
 * The calendar named by a CF `calendar` attribute or a request parameter. Case and surrounding
 * spaces are ignored; a missing or empty name means `standard` (CF 1.10 §4.4.1: the default).
 *
 * @param name the calendar name, or undefined/null when the attribute is absent
 * @returns the canonical calendar
 * @throws {CfTimeError} code `unknown_calendar` for a name CF does not define, or
 *   `unsupported_calendar` for `none` (no calendar: times cannot be dated)
 * @example
 * ```ts
 * import { parseCfCalendar } from "./cf_calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(parseCfCalendar("Gregorian"), "standard");
 * assert.equal(parseCfCalendar("365_day"), "noleap");
 * assert.equal(parseCfCalendar(undefined), "standard");
 * assert.throws(() => parseCfCalendar("lunar"), { code: "unknown_calendar" });
 * ```
 */
export function parseCfCalendar(name: string | null | undefined): CfCalendar {
  if (name === undefined || name === null || name.trim() === "") return "standard";
  const key = name.trim().toLowerCase();
  const cal = CF_CALENDAR_NAMES[key];
  if (cal) return cal;
  if (key === "none") {
    throw new CfTimeError(
      "unsupported_calendar",
      "calendar",
      name,
      'Cannot use calendar "none": its times have no calendar dates (CF 1.10 §4.4.1); ' +
        "give the file a calendar or upload the values with their own time axis",
    );
  }
  const shown = name.length > 40 ? `${name.slice(0, 40)}…` : name;
  throw new CfTimeError(
    "unknown_calendar",
    "calendar",
    name,
    `Unknown calendar "${shown}": expected one of ${Object.keys(CF_CALENDAR_NAMES).join(", ")}`,
  );
}

/**
 * Whether a calendar is a real-world calendar (standard, proleptic_gregorian, julian), whose
 * dates name the same days as sunlag's proleptic Gregorian time axis, rather than a model's
 * idealised one (noleap, all_leap, 360_day).
 *
 * @param calendar a CF calendar
 * @returns true for standard, proleptic_gregorian and julian
 * @example
 * ```ts
 * import { isRealWorldCalendar } from "./cf_calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(isRealWorldCalendar("julian"), true);
 * assert.equal(isRealWorldCalendar("360_day"), false);
 * ```
 */
export function isRealWorldCalendar(calendar: CfCalendar): boolean {
  return calendar === "standard" || calendar === "proleptic_gregorian" || calendar === "julian";
}

/**
 * Whether the calendar's years include 0 (false for standard and julian, as in cftime).
 *
 * @param calendar a CF calendar
 * @returns true when year 0 exists
 * @example
 * ```ts
 * import { cfHasYearZero } from "./cf_calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(cfHasYearZero("standard"), false);
 * assert.equal(cfHasYearZero("noleap"), true);
 * ```
 */
export function cfHasYearZero(calendar: CfCalendar): boolean {
  return calendar !== "standard" && calendar !== "julian";
}

/**
 * Whether a year is a leap year on a CF calendar. On `standard` years before 1582 follow the
 * Julian rule and later ones the Gregorian rule; year numbers are the calendar's own (no year 0
 * on standard and julian: year −1 is astronomical year 0, a leap year).
 *
 * @param calendar a CF calendar
 * @param year integer year on that calendar
 * @returns true when February has 29 days (always on all_leap; never on noleap and 360_day)
 * @throws {CfTimeError} code `date_not_in_calendar` for a non-integer year, or year 0 on
 *   standard or julian
 * @example
 * ```ts
 * import { cfIsLeapYear } from "./cf_calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(cfIsLeapYear("standard", 1500), true); // Julian rule before 1582
 * assert.equal(cfIsLeapYear("proleptic_gregorian", 1500), false);
 * assert.equal(cfIsLeapYear("all_leap", 2001), true);
 * assert.equal(cfIsLeapYear("julian", -1), true); // 1 BCE
 * ```
 */
export function cfIsLeapYear(calendar: CfCalendar, year: number): boolean {
  const y = astronomicalYear(calendar, year);
  switch (calendar) {
    case "noleap":
    case "360_day":
      return false;
    case "all_leap":
      return true;
    case "proleptic_gregorian":
      return isLeapYear(y);
    case "julian":
      return mod(y, 4) === 0;
    case "standard":
      return y < 1582 ? mod(y, 4) === 0 : isLeapYear(y);
  }
}

const MONTH_DAYS = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

/**
 * Number of days in a month of a CF calendar. October 1582 on `standard` has 21 days
 * (1–4 and 15–31).
 *
 * @param calendar a CF calendar
 * @param year integer year on that calendar
 * @param month 1..12
 * @returns the number of days
 * @throws {CfTimeError} code `date_not_in_calendar` for a month outside 1..12 or a year that
 *   does not exist on the calendar
 * @example
 * ```ts
 * import { cfDaysInMonth } from "./cf_calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(cfDaysInMonth("360_day", 2001, 2), 30);
 * assert.equal(cfDaysInMonth("noleap", 2000, 2), 28);
 * assert.equal(cfDaysInMonth("standard", 1582, 10), 21);
 * ```
 */
export function cfDaysInMonth(calendar: CfCalendar, year: number, month: number): number {
  if (!Number.isInteger(month) || month < 1 || month > 12) {
    throw new CfTimeError(
      "date_not_in_calendar",
      "date",
      month,
      `Cannot count days in month: month must be an integer in 1..12, current value is ${month}`,
    );
  }
  if (calendar === "360_day") {
    astronomicalYear(calendar, year);
    return 30;
  }
  if (calendar === "standard" && year === 1582 && month === 10) return 21;
  return MONTH_DAYS[month - 1] + (month === 2 && cfIsLeapYear(calendar, year) ? 1 : 0);
}

/**
 * Number of days in a year of a CF calendar (1582 on `standard` has 355).
 *
 * @param calendar a CF calendar
 * @param year integer year on that calendar
 * @returns the number of days
 * @throws {CfTimeError} code `date_not_in_calendar` for a year that does not exist
 * @example
 * ```ts
 * import { cfDaysInYear } from "./cf_calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(cfDaysInYear("360_day", 1999), 360);
 * assert.equal(cfDaysInYear("all_leap", 1999), 366);
 * assert.equal(cfDaysInYear("standard", 1582), 355);
 * ```
 */
export function cfDaysInYear(calendar: CfCalendar, year: number): number {
  if (calendar === "360_day") {
    astronomicalYear(calendar, year);
    return 360;
  }
  if (calendar === "standard" && year === 1582) return 355;
  return cfIsLeapYear(calendar, year) ? 366 : 365;
}

/**
 * The astronomical year (with a year 0) of a year on a calendar; on standard and julian, year
 * −1 is astronomical 0, and year 0 does not exist.
 *
 * @param calendar a CF calendar
 * @param year integer year on that calendar
 * @returns the astronomical year
 * @throws {CfTimeError} code `date_not_in_calendar` for a non-integer year or year 0 where
 *   there is none
 * @example
 * ```ts
 * import { astronomicalYear } from "./cf_calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(astronomicalYear("julian", -1), 0);
 * assert.equal(astronomicalYear("noleap", -1), -1);
 * ```
 */
export function astronomicalYear(calendar: CfCalendar, year: number): number {
  if (!Number.isInteger(year)) {
    throw new CfTimeError(
      "date_not_in_calendar",
      "date",
      year,
      `Invalid year on the ${calendar} calendar: must be an integer, current value is ${year}`,
    );
  }
  if (cfHasYearZero(calendar)) return year;
  if (year === 0) {
    throw new CfTimeError(
      "date_not_in_calendar",
      "date",
      year,
      `Invalid year on the ${calendar} calendar: it has no year 0 (year -1 is followed by year 1)`,
    );
  }
  return year < 0 ? year + 1 : year;
}

/**
 * The calendar's own year number of an astronomical year (inverse of {@link astronomicalYear}).
 *
 * @param calendar a CF calendar
 * @param astronomical an astronomical year
 * @returns the year as the calendar counts it
 * @example
 * ```ts
 * import { calendarYear } from "./cf_calendar.ts";
 * import assert from "node:assert/strict";
 * assert.equal(calendarYear("standard", 0), -1);
 * assert.equal(calendarYear("360_day", 0), 0);
 * ```
 */
export function calendarYear(calendar: CfCalendar, astronomical: number): number {
  if (cfHasYearZero(calendar)) return astronomical;
  return astronomical <= 0 ? astronomical - 1 : astronomical;
}

function mod(a: number, b: number): number {
  return ((a % b) + b) % b;
}
