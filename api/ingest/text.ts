/**
 * Delimited-text ingestion: CSV (RFC 4180 quoting), semicolon, tab or whitespace separated
 * tables with `#` comment lines and a header row, into a normalised series. The work is done
 * in named stages, one file each under `text/`: decode (sniff the bytes), lines (comments and
 * export metadata), table (delimiter, first row, header), columns, time, rows; `finish`
 * (normalise.ts) orders the points and builds the report.
 *
 * The table reader is written by hand rather than taken from a CSV library because every cell
 * must keep its line number for error messages, whitespace-separated tables are not CSV, and
 * the delimiter is detected; the tables are numeric, so quoted fields spanning lines are not
 * supported (reported as an error).
 *
 * @module
 */
import { checkMeta, ErrorList, finish, type SeriesMetaInput } from "./normalise.ts";
import { type DuplicatePolicy, type IngestError, type IngestResult, MAX_POINTS } from "./types.ts";
import { decodeTextBody } from "./text/decode.ts";
import { FILE_META_KEYS, readLines, type TextLines } from "./text/lines.ts";
import { type DelimiterName, delimiterName } from "./text/delimiter.ts";
import { type ColumnRefs, openTable } from "./text/table.ts";
import { resolveColumns } from "./text/columns.ts";
import { missingTest } from "./text/cells.ts";
import { checkTimeFormatOption, chooseTimeFormat, type TimeFormat } from "./text/time.ts";
import { readRows } from "./text/rows.ts";

export { EXPORT_MARKER } from "./text/lines.ts";
export { splitLine } from "./text/delimiter.ts";
export { decimalYearRange } from "./text/time.ts";
export type { DelimiterName, TimeFormat };

/** Options of a text upload (all optional; names match the query parameters). */
export interface TextIngestOptions extends SeriesMetaInput, ColumnRefs {
  /** @default "auto" */
  delimiter?: DelimiterName;
  /** Extra missing-value sentinels (added to empty, NaN and NA), e.g. ["-1", "-999"]. */
  missing?: string[];
  /** @default "reject" */
  duplicates?: DuplicatePolicy;
  /** @default "auto" */
  time_format?: TimeFormat;
}

/**
 * Read a delimited text table into a series.
 *
 * Rules:
 * - The input must be UTF-8 text: a NUL byte or an invalid UTF-8 sequence is an error (a
 *   leading byte-order mark is ignored). Lines end with LF, CRLF or CR.
 * - Lines whose first non-blank character is `#` are comments; blank lines, and rows whose
 *   cells are all empty (`,,`), are skipped. A file
 *   that starts with the `# sunlag series` comment of a sunlag export supplies name, quantity,
 *   units, description, source and version from its `# key: value` lines (options override).
 * - The delimiter is detected (tab, semicolon, comma, then runs of whitespace; the one that
 *   splits the first 100 rows most consistently into 2+ cells) or stated. Comma, semicolon and
 *   tab fields may be quoted with `"` (`""` inside quotes is a quote).
 * - The first row is a header when none of its non-empty cells is a number, an ISO time or a
 *   missing-value word (so a data row with one bad cell is reported, not taken for a header),
 *   or when a column is named by header name. Every row must have as many cells as the first.
 * - Columns are named by header name (exact, then case-insensitive) or by 0-based index.
 *   Defaults: time = `decimal_year`, `time`, `date`, `year` (the first present), else column
 *   0, except that a header with `year` and `month` (and `day`) columns and none of the others
 *   is read as year/month/day columns; value = `value`, else the only column left;
 *   uncertainty = `uncertainty` if present.
 * - Time cells are ISO 8601 (parseIsoTime: middle-of-period rule) or decimal years. With
 *   `time_format: "auto"`, a column headed like `decimal_year` or holding any non-integer
 *   number is read as decimal years; a column of 4-digit integers as ISO years (mid-year);
 *   anything else as ISO 8601. Year/month/day columns hold integers: year + month is the
 *   middle of the month, year alone the middle of the year, a full date its noon.
 * - A value cell equal to a missing sentinel (empty, `NaN`, `NA`, case-insensitive, plus
 *   `missing`; numeric sentinels also match equal numbers, so `-999.0` matches `-999`) is a
 *   gap. Otherwise values and uncertainties must be finite numbers written with a `.` decimal
 *   point; uncertainties must be non-negative and present wherever the value is.
 * - Duplicates: see `finish` in normalise.ts ("reject" needs strictly increasing time in file
 *   order; "mean" sorts and averages).
 *
 * @param input the body: bytes (checked for NUL and UTF-8) or an already decoded string
 * @param options column choices, metadata and parsing options
 * @returns the series and a report, or every error found (at most 50 listed); never partial
 * @example
 * ```ts
 * import { ingestText } from "./text.ts";
 * import assert from "node:assert/strict";
 * const csv = "# station record\ndate;temp\n1996-01;0.31\n1996-02;-999\n1996-03;0.12\n";
 * const r = ingestText(csv, {
 *   name: "Station anomaly", quantity: "temperature_anomaly", units: "K",
 *   value: "temp", missing: ["-999"],
 * });
 * assert.ok(r.ok);
 * assert.equal(r.series.resolution, "monthly");
 * assert.deepEqual([r.report.read, r.report.kept, r.report.missing], [3, 2, 1]);
 * ```
 */
export function ingestText(
  input: Uint8Array | string,
  options: TextIngestOptions = {},
): IngestResult {
  const errors = new ErrorList();
  const fail = (e: IngestError): IngestResult => errors.failure(e);
  const decoded = decodeTextBody(input);
  if ("refused" in decoded) return decoded.refused;
  const file = readLines(decoded.text);
  if (file === "too many") {
    return fail({ pointer: "", in: "body", message: `too many rows: more than ${MAX_POINTS}` });
  }
  const { meta, fromFile } = mergeFileMeta(options, file);
  const checked = checkMeta(meta, (f) => ({ pointer: `/${f}`, in: "query" }), errors);
  if (file.lines.length === 0) {
    return fail({ pointer: "", in: "body", message: "the body holds no data rows" });
  }
  const table = openTable(file.lines, file.isExport, options);
  if (!("cells" in table)) return fail(table);
  const cols = resolveColumns(table, options, errors);
  checkTimeFormatOption(options.time_format, cols.ymd, errors);
  if (errors.size > 0) return errors.failure();
  const timeFormat = chooseTimeFormat(table, cols, options.time_format);
  const points = readRows(table, cols, timeFormat, missingTest(options.missing), errors);
  if (points.time.length === 0 && errors.size === 0) {
    return fail({ pointer: "", in: "body", message: "the body holds a header but no data rows" });
  }
  return finish(points, checked, options.duplicates ?? "reject", errors, {
    delimiter: delimiterName(table.delimiter),
    header: table.header,
    time_format: timeFormat,
    ...(fromFile.length ? { metadata_from_file: fromFile } : {}),
  });
}

/** Options, completed by the metadata of a sunlag export's comment header (options win). */
function mergeFileMeta(
  options: SeriesMetaInput,
  file: TextLines,
): { meta: SeriesMetaInput; fromFile: string[] } {
  const meta: SeriesMetaInput = { ...options };
  const fromFile: string[] = [];
  for (const k of FILE_META_KEYS) {
    if ((meta[k] === undefined || meta[k] === null) && file.fileMeta[k] !== undefined) {
      meta[k] = file.fileMeta[k] === "" ? null : file.fileMeta[k];
      fromFile.push(k);
    }
  }
  return { meta, fromFile };
}
