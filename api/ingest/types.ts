/**
 * Shapes shared by the series ingesters (delimited text and JSON).
 *
 * @module
 */
import type { Quantity } from "../../core/series/quantities.ts";
import type { Resolution } from "../store/types.ts";

/** A series after ingestion: validated, canonical units, sorted by time, gaps removed. */
export interface NormalisedSeries {
  name: string;
  quantity: Quantity;
  /** Canonical UDUNITS string for the quantity (core/series/quantities.ts). */
  units: string;
  description: string | null;
  source: string | null;
  /** Version of the index (e.g. "2" for sunspot number version 2), or null. */
  version: string | null;
  resolution: Resolution;
  /** Decimal years (proleptic Gregorian), strictly increasing. */
  time: Float64Array;
  value: Float64Array;
  /** One-sigma uncertainty per point (same units as value), or null. */
  uncertainty: Float64Array | null;
}

/** What an upload did with its rows. */
export interface IngestReport {
  /** Data rows (text) or points (JSON) read. */
  read: number;
  /** Points in the series. */
  kept: number;
  /** Rows whose value was missing (a sentinel or null): gaps, no point. */
  missing: number;
  /** Rows merged into another row with the same time (duplicates: "mean"). */
  aggregated: number;
  /** Text only: the delimiter used (`comma`, `semicolon`, `tab`, `whitespace`). */
  delimiter?: string;
  /** Text only: whether the first row was read as a header. */
  header?: boolean;
  /** How the time column was read: `iso`, `decimal_year` or `year_month_day`. */
  time_format?: string;
  /** Metadata fields taken from the `#` comment header of a sunlag CSV export. */
  metadata_from_file?: string[];
  /** The regular monthly or annual grid the times were read as, or null (daily, irregular). */
  time_grid?: TimeGridReport | null;
  /** How the values were converted to the canonical unit, or null when they were in it. */
  units_conversion?: UnitsReport | null;
}

/** A monthly or annual grid recognised on upload, and where its times were stored. */
export interface TimeGridReport {
  resolution: "monthly" | "annual";
  /** Where in its period each time sat as given. */
  position: "start" | "middle";
  /** Monthly grids: calendar months or equal twelfths of a year; null for annual grids. */
  months: "calendar" | "twelfths" | null;
  /** Whether any time was moved to the middle of its period. */
  moved_to_middle: boolean;
  /** The convention in words. */
  note: string;
}

/** A unit conversion applied on upload (also stated in the series description). */
export interface UnitsReport {
  from: string;
  to: string;
  formula: string;
}

/** One problem with an upload. Mirrors the RFC 9457 `errors` entries of the service. */
export interface IngestError {
  /** JSON Pointer into the part named by `in` ("" = the whole text body). */
  pointer: string;
  message: string;
  /** Where the problem is: the request body (default) or a query parameter. */
  in?: "body" | "query";
  /** Text uploads: 1-based line number in the file. */
  row?: number;
  /** Text uploads: the column's header name, or its 0-based index without a header. */
  column?: string | number;
}

/** Either a complete series with its report, or the reasons there is none (never partial). */
export type IngestResult =
  | { ok: true; series: NormalisedSeries; report: IngestReport }
  | { ok: false; errors: IngestError[]; omitted?: number };

/** How to treat repeated timestamps: refuse them, or average them (and sort the rows). */
export type DuplicatePolicy = "reject" | "mean";

/**
 * Most columns a delimited upload may have. A series needs at most five (time or year, month,
 * day, value, uncertainty); tables with a few hundred others are common, a million are not,
 * and are refused before any row is split.
 */
export const MAX_COLUMNS = 1000;

/** Most points a series may have. */
export const MAX_POINTS = 5_000_000;

/** Missing-value sentinels always in force (compared case-insensitively). */
export const DEFAULT_MISSING = ["", "NaN", "NA"] as const;

/**
 * Most errors listed for one upload; the rest are only counted (`omitted`). The same bound as
 * the field errors of a problem (api/problems.ts), so nothing is collected to be dropped.
 */
export const MAX_ERRORS = 20;

/**
 * Largest magnitude of a decimal year accepted on upload. Wide enough for cosmogenic-isotope
 * reconstructions over the Holocene and beyond; a Unix timestamp (seconds or milliseconds)
 * given by mistake is far outside it.
 */
export const MAX_ABS_DECIMAL_YEAR = 100_000;
