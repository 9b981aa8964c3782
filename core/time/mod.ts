/**
 * Time model: decimal years on the proleptic Gregorian calendar, ISO 8601 parsing and
 * formatting with the middle-of-period rule, calendar period bounds and resolution inference.
 *
 * @module
 */
export * from "./calendar.ts";
export * from "./decimal_year.ts";
export * from "./parse_iso_time.ts";
export * from "./format_iso_time.ts";
export * from "./resolution.ts";
export * from "./period_convention.ts";
