/**
 * CF time values to calendar dates and back (CF conventions 1.10, §4.4: a time is a number of
 * units since a reference date on the variable's calendar).
 *
 * Arithmetic: whole units are split from the fraction so that whole days stay exact integers
 * (the date part is integer calendar arithmetic on day numbers), and the time of day is rounded
 * to the microsecond, the resolution of cftime.
 *
 * @module
 */
import type { CfCalendar } from "./cf_calendar.ts";
import { cfDateFromDayNumber, cfDayNumber } from "./cf_day_number.ts";
import { CfTimeError } from "./cf_time_error.ts";
import { type CfDateTime, type CfTimeUnits, parseCfTimeUnits } from "./cf_time_units.ts";

/** A time value as a day number on its calendar plus seconds into that day. */
export interface CfInstant {
  /** Day number on the calendar (see `cfDayNumber`). */
  day: number;
  /** Seconds since midnight, in [0, 86400), rounded to the microsecond. */
  seconds: number;
}

/**
 * The instant of one CF time value: day number and seconds of day.
 *
 * @param value the stored time value (after any unpacking)
 * @param units parsed units (see `parseCfTimeUnits`)
 * @param index position of the value, for the error
 * @returns the instant on the units' calendar
 * @throws {CfTimeError} code `not_finite` for NaN or infinite values, or values so large that
 *   the day is not an exact integer
 * @example
 * ```ts
 * import { cfInstant } from "./cf_time_codec.ts";
 * import { parseCfTimeUnits } from "./cf_time_units.ts";
 * import assert from "node:assert/strict";
 * const u = parseCfTimeUnits("hours since 2000-01-01 12:00", "360_day");
 * assert.deepEqual(cfInstant(-18, u), { day: u.referenceDay - 1, seconds: 64800 });
 * ```
 */
export function cfInstant(value: number, units: CfTimeUnits, index?: number): CfInstant {
  if (!Number.isFinite(value) || Math.abs(value) > 9e15) {
    throw new CfTimeError(
      "not_finite",
      "value",
      value,
      `Cannot decode time value ${value}${index === undefined ? "" : ` at index ${index}`}: ` +
        "it must be a finite number of moderate size",
      index,
    );
  }
  const per = units.secondsPerUnit;
  const perDay = 86400 / per; // 1, 24, 1440 or 86400 units per day
  const whole = Math.floor(value);
  const frac = value - whole;
  const wholeDays = Math.floor(whole / perDay);
  const restUnits = whole - wholeDays * perDay;
  let seconds = units.reference.seconds + restUnits * per + frac * per;
  let day = units.referenceDay + wholeDays;
  const carry = Math.floor(seconds / 86400);
  day += carry;
  seconds -= carry * 86400;
  seconds = Math.round(seconds * 1e6) / 1e6;
  if (seconds >= 86400) {
    day += 1;
    seconds -= 86400;
  }
  return { day, seconds };
}

/**
 * Decode CF time values into dates on their calendar.
 *
 * @param values stored time values (any numeric array; after unpacking, before masking)
 * @param units the `units` attribute, or units parsed with `parseCfTimeUnits` on `calendar`
 * @param calendar the calendar (see `parseCfCalendar`)
 * @returns one date-time per value
 * @throws {CfTimeError} for units that cannot be decoded (`bad_units`, `unsupported_unit`,
 *   `bad_reference`) or a value that is not finite (`not_finite`, with its index)
 * @example
 * ```ts
 * import { decodeCfTime } from "./cf_time_codec.ts";
 * import assert from "node:assert/strict";
 * // 360_day: 30 days after 2000-02-01 is 2000-03-01; 29 after is 2000-02-30.
 * const d = decodeCfTime([29, 30.5], "days since 2000-02-01", "360_day");
 * assert.deepEqual(d[0], { year: 2000, month: 2, day: 30, seconds: 0 });
 * assert.deepEqual(d[1], { year: 2000, month: 3, day: 1, seconds: 43200 });
 * ```
 */
export function decodeCfTime(
  values: ArrayLike<number>,
  units: string | CfTimeUnits,
  calendar: CfCalendar,
): CfDateTime[] {
  const u = typeof units === "string" ? parseCfTimeUnits(units, calendar) : units;
  const out: CfDateTime[] = new Array(values.length);
  for (let i = 0; i < values.length; i++) {
    const { day, seconds } = cfInstant(values[i], u, i);
    out[i] = { ...cfDateFromDayNumber(calendar, day), seconds };
  }
  return out;
}

/**
 * Encode dates on a calendar as CF time values (inverse of {@link decodeCfTime}).
 *
 * @param dates date-times on `calendar`
 * @param units the units text, or units parsed with `parseCfTimeUnits` on `calendar`
 * @param calendar the calendar of the dates
 * @returns the time values, `(day − reference day) · 86400 + seconds − reference seconds`
 *   divided by the unit length
 * @throws {CfTimeError} for a date not on the calendar (`date_not_in_calendar`) or bad units
 * @example
 * ```ts
 * import { encodeCfTime } from "./cf_time_codec.ts";
 * import assert from "node:assert/strict";
 * const v = encodeCfTime(
 *   [{ year: 2001, month: 3, day: 1, seconds: 43200 }],
 *   "days since 2001-02-01",
 *   "noleap",
 * );
 * assert.deepEqual(Array.from(v), [28.5]);
 * ```
 */
export function encodeCfTime(
  dates: readonly CfDateTime[],
  units: string | CfTimeUnits,
  calendar: CfCalendar,
): Float64Array {
  const u = typeof units === "string" ? parseCfTimeUnits(units, calendar) : units;
  const out = new Float64Array(dates.length);
  for (let i = 0; i < dates.length; i++) {
    const d = dates[i];
    out[i] = encodeCfDayNumber(cfDayNumber(calendar, d.year, d.month, d.day), d.seconds, u);
  }
  return out;
}

/**
 * Encode an instant given as a day number (and seconds) on the units' calendar.
 *
 * @param day day number on the calendar (an integer; see `cfDayNumber`)
 * @param seconds seconds into the day (default 0)
 * @param units parsed units on the same calendar
 * @returns the time value in the units
 * @example
 * ```ts
 * import { encodeCfDayNumber } from "./cf_time_codec.ts";
 * import { parseCfTimeUnits } from "./cf_time_units.ts";
 * import assert from "node:assert/strict";
 * const u = parseCfTimeUnits("hours since 1970-01-02", "360_day");
 * assert.equal(encodeCfDayNumber(0, 0, u), -24);
 * ```
 */
export function encodeCfDayNumber(day: number, seconds: number, units: CfTimeUnits): number {
  const dd = day - units.referenceDay;
  const ds = seconds - units.reference.seconds;
  if (units.unit === "days") return dd + ds / 86400;
  return (dd * 86400 + ds) / units.secondsPerUnit;
}
