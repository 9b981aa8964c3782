/**
 * Time model: decimal years on the proleptic Gregorian calendar, ISO 8601 parsing and
 * formatting with the middle-of-period rule, calendar period bounds and resolution inference,
 * and CF time (CF conventions §4.4): the CF calendars, their units, decoding and encoding, and
 * conversion to decimal years.
 *
 * @module
 */
export * from "./calendar.ts";
export * from "./decimal_year.ts";
export * from "./parse_iso_time.ts";
export * from "./format_iso_time.ts";
export * from "./resolution.ts";
export * from "./period_convention.ts";
export * from "./julian_calendar.ts";
export * from "./cf_time_error.ts";
export * from "./cf_calendar.ts";
export * from "./cf_day_number.ts";
export * from "./cf_time_units.ts";
export * from "./cf_time_codec.ts";
export * from "./cf_decimal_year.ts";
export * from "./cf_period_bounds.ts";
