/**
 * The one error type of the CF time layer: it carries what was wrong as data (a code, the
 * field and the offending value), so callers map it to a problem without reading the message.
 *
 * @module
 */

/** What went wrong with a CF time input. */
export type CfTimeErrorCode =
  /** A calendar name that CF does not define. */
  | "unknown_calendar"
  /** A CF calendar sunlag does not decode (`none`: no calendar at all). */
  | "unsupported_calendar"
  /** Time units that are not "<unit> since <reference>". */
  | "bad_units"
  /** A unit that is not a fixed duration (months, years) or not a time unit. */
  | "unsupported_unit"
  /** A reference date that cannot be read or does not exist on the calendar. */
  | "bad_reference"
  /** A date that does not exist on the calendar (e.g. 29 February on noleap). */
  | "date_not_in_calendar"
  /** A time value that is NaN or infinite. */
  | "not_finite"
  /** A time or date that has no place on the other calendar or at the series' resolution. */
  | "not_representable";

/** Where the problem is: the calendar, the units text, a time value or a date. */
export type CfTimeField = "calendar" | "units" | "value" | "date";

/**
 * A CF time input that cannot be used.
 *
 * @example
 * ```ts
 * import { CfTimeError } from "./cf_time_error.ts";
 * import assert from "node:assert/strict";
 * const e = new CfTimeError("unknown_calendar", "calendar", "lunar", "no such calendar");
 * assert.ok(e instanceof RangeError);
 * assert.equal(e.code, "unknown_calendar");
 * assert.equal(e.field, "calendar");
 * ```
 */
export class CfTimeError extends RangeError {
  /**
   * @param code what went wrong
   * @param field which input is wrong
   * @param value the offending value (a name, a units string, a number or a date)
   * @param message a sentence naming the function, the field and the value
   * @param index position of the value in its array, when it came from one
   */
  constructor(
    readonly code: CfTimeErrorCode,
    readonly field: CfTimeField,
    readonly value: unknown,
    message: string,
    readonly index?: number,
  ) {
    super(message);
    this.name = "CfTimeError";
  }
}
