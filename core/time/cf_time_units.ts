/**
 * CF time units: "<unit> since <reference date-time>" (CF conventions 1.10, §4.4 "Time
 * Coordinate"; the unit names of UDUNITS-2).
 *
 * @module
 */
import type { CfCalendar } from "./cf_calendar.ts";
import { cfDateFromDayNumber, cfDayNumber } from "./cf_day_number.ts";
import { CfTimeError } from "./cf_time_error.ts";

/** A date and time of day on a CF calendar. */
export interface CfDateTime {
  /** Year as the calendar counts it (no year 0 on standard and julian). */
  year: number;
  month: number;
  day: number;
  /** Seconds since midnight, in [0, 86400). */
  seconds: number;
}

/** The fixed-length time units sunlag decodes. */
export type CfTimeUnit = "days" | "hours" | "minutes" | "seconds";

/** Parsed "<unit> since <reference>" time units. */
export interface CfTimeUnits {
  unit: CfTimeUnit;
  /** Length of one unit in seconds (86400, 3600, 60 or 1). */
  secondsPerUnit: number;
  /** The reference instant on the calendar, in UTC. */
  reference: CfDateTime;
  /** Day number of the reference date on the calendar (see `cfDayNumber`). */
  referenceDay: number;
}

const UNIT_NAMES: Record<string, CfTimeUnit> = {
  day: "days",
  days: "days",
  d: "days",
  hour: "hours",
  hours: "hours",
  hr: "hours",
  hrs: "hours",
  h: "hours",
  minute: "minutes",
  minutes: "minutes",
  min: "minutes",
  mins: "minutes",
  second: "seconds",
  seconds: "seconds",
  sec: "seconds",
  secs: "seconds",
  s: "seconds",
};

/** Seconds per unit. */
export const CF_SECONDS_PER_UNIT: Readonly<Record<CfTimeUnit, number>> = {
  days: 86400,
  hours: 3600,
  minutes: 60,
  seconds: 1,
};

const CALENDAR_UNITS = /^(months?|years?|yr|a|common_years?|leap_years?|weeks?|fortnights?)$/;

const RE_UNITS = /^\s*([A-Za-z_]+)\s+(?:since|after|from|ref)\s+(.+?)\s*$/i;
const RE_REFERENCE = new RegExp(
  String.raw`^([+-]?\d{1,6})-(\d{1,2})(?:-(\d{1,2}))?` +
    String.raw`(?:(?:T|\s+)(\d{1,2}):(\d{1,2})(?::(\d{1,2}(?:\.\d*)?))?)?` +
    String.raw`\s*(Z|UTC|GMT|[+-]\d{1,2}(?::?\d{2})?)?$`,
  "i",
);

/**
 * Parse CF time units on a calendar.
 *
 * Accepted: a unit of days, hours, minutes or seconds (UDUNITS spellings: `day`, `d`, `hr`,
 * `min`, `sec`, `s`, plurals), `since`, and a reference date `Y-M-D` (one or more digits each,
 * a signed year allowed, the day optional) with an optional time `h:m[:s[.f]]` after a space or
 * `T`, and an optional zone `Z`, `UTC` or `±h[:mm]` (the reference is moved to UTC). The
 * reference must exist on the calendar.
 *
 * `months since` and `years since` are refused: UDUNITS defines them as fixed fractions of a
 * tropical year (a month is 30.436851 days), not calendar months, and CF advises against them
 * (CF 1.10 §4.4).
 *
 * @param text the `units` attribute
 * @param calendar the calendar the reference date is on
 * @returns the unit, its length in seconds and the reference instant
 * @throws {CfTimeError} code `bad_units` (not "<unit> since <date>"), `unsupported_unit`
 *   (months, years, or not a time unit) or `bad_reference` (unreadable reference, or a date
 *   not on the calendar)
 * @example
 * ```ts
 * import { parseCfTimeUnits } from "./cf_time_units.ts";
 * import assert from "node:assert/strict";
 * const u = parseCfTimeUnits("hours since 1850-01-01 06:00:00", "noleap");
 * assert.equal(u.unit, "hours");
 * assert.equal(u.secondsPerUnit, 3600);
 * assert.deepEqual(u.reference, { year: 1850, month: 1, day: 1, seconds: 21600 });
 * assert.throws(() => parseCfTimeUnits("months since 2000-01-01", "standard"), {
 *   code: "unsupported_unit",
 * });
 * ```
 */
export function parseCfTimeUnits(text: string, calendar: CfCalendar): CfTimeUnits {
  const shown = text.length > 60 ? `${text.slice(0, 60)}…` : text;
  const m = RE_UNITS.exec(text);
  if (!m) {
    throw new CfTimeError(
      "bad_units",
      "units",
      text,
      `Cannot read time units "${shown}": expected "<days|hours|minutes|seconds> since <date>", ` +
        'e.g. "days since 1850-01-01"',
    );
  }
  const word = m[1].toLowerCase();
  const unit = UNIT_NAMES[word];
  if (!unit) {
    throw new CfTimeError(
      "unsupported_unit",
      "units",
      text,
      CALENDAR_UNITS.test(word)
        ? `Cannot decode time units "${shown}": "${m[1]}" is not a fixed duration (UDUNITS ` +
          "takes a month as 30.436851 days and a year as 365.242198781 days, not calendar " +
          "months and years; CF 1.10 §4.4 advises against them); write the times in days"
        : `Cannot decode time units "${shown}": "${m[1]}" is not a time unit; expected days, ` +
          "hours, minutes or seconds",
    );
  }
  const reference = parseReference(m[2], text, shown, calendar);
  return {
    unit,
    secondsPerUnit: CF_SECONDS_PER_UNIT[unit],
    reference: reference.at,
    referenceDay: reference.day,
  };
}

function parseReference(
  ref: string,
  text: string,
  shown: string,
  calendar: CfCalendar,
): { at: CfDateTime; day: number } {
  const bad = (why: string) =>
    new CfTimeError("bad_reference", "units", text, `Cannot read time units "${shown}": ${why}`);
  const r = RE_REFERENCE.exec(ref);
  if (!r) throw bad(`the reference "${ref.slice(0, 40)}" is not a date "Y-M-D [h:m:s]"`);
  const year = Number(r[1]), month = Number(r[2]), day = r[3] === undefined ? 1 : Number(r[3]);
  const hh = r[4] === undefined ? 0 : Number(r[4]);
  const mm = r[5] === undefined ? 0 : Number(r[5]);
  const ss = r[6] === undefined ? 0 : Number(r[6]);
  if (hh > 23 || mm > 59 || !(ss < 60)) throw bad(`the reference time ${r[4]}:${r[5]} is invalid`);
  let offsetSeconds = 0;
  const z = r[7];
  if (z !== undefined && !/^(z|utc|gmt)$/i.test(z)) {
    const sign = z[0] === "-" ? -1 : 1;
    const body = z.slice(1).replace(":", "");
    const oh = Number(body.length > 2 ? body.slice(0, body.length - 2) : body);
    const om = body.length > 2 ? Number(body.slice(-2)) : 0;
    if (oh > 23 || om > 59) throw bad(`the zone offset ${z} is invalid`);
    offsetSeconds = sign * (oh * 3600 + om * 60);
  }
  let dayNumber: number;
  try {
    dayNumber = cfDayNumber(calendar, year, month, day);
  } catch (e) {
    if (e instanceof CfTimeError) {
      throw bad(`the reference date does not exist on the ${calendar} calendar (${e.message})`);
    }
    throw e;
  }
  // Move a zoned reference to UTC: whole days shift the date, the rest the seconds.
  let seconds = hh * 3600 + mm * 60 + ss - offsetSeconds;
  const shift = Math.floor(seconds / 86400);
  seconds -= shift * 86400;
  if (shift === 0) return { at: { year, month, day, seconds }, day: dayNumber };
  return {
    at: { ...cfDateFromDayNumber(calendar, dayNumber + shift), seconds },
    day: dayNumber + shift,
  };
}

/**
 * Write CF time units: `"<unit> since YYYY-MM-DD hh:mm:ss"` (years zero-padded to 4 digits,
 * signed when negative).
 *
 * @param unit days, hours, minutes or seconds
 * @param reference the reference date and time (seconds must be whole)
 * @returns the units text
 * @example
 * ```ts
 * import { formatCfTimeUnits } from "./cf_time_units.ts";
 * import assert from "node:assert/strict";
 * assert.equal(
 *   formatCfTimeUnits("days", { year: 1850, month: 1, day: 1, seconds: 0 }),
 *   "days since 1850-01-01 00:00:00",
 * );
 * ```
 */
export function formatCfTimeUnits(unit: CfTimeUnit, reference: CfDateTime): string {
  const y = reference.year < 0
    ? `-${String(-reference.year).padStart(4, "0")}`
    : String(reference.year).padStart(4, "0");
  const s = Math.floor(reference.seconds);
  const p = (n: number) => String(n).padStart(2, "0");
  return `${unit} since ${y}-${p(reference.month)}-${p(reference.day)} ${p(Math.floor(s / 3600))}:${
    p(Math.floor(s / 60) % 60)
  }:${p(s % 60)}`;
}
