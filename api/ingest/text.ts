/**
 * Delimited-text ingestion: CSV (RFC 4180 quoting), semicolon, tab or whitespace separated
 * tables with `#` comment lines and a header row, into a normalised series.
 *
 * The table reader is written by hand rather than taken from a CSV library because every cell
 * must keep its line number for error messages, whitespace-separated tables are not CSV, and
 * the delimiter is detected; the tables are numeric, so quoted fields spanning lines are not
 * supported (reported as an error).
 *
 * @module
 */
import {
  decimalYear,
  parseIsoDecimalYear,
  parseIsoTime,
  periodBounds,
} from "../../core/time/mod.ts";
import { checkMeta, ErrorList, finish, type SeriesMetaInput } from "./normalise.ts";
import {
  DEFAULT_MISSING,
  type DuplicatePolicy,
  type IngestError,
  type IngestResult,
  MAX_ABS_DECIMAL_YEAR,
  MAX_COLUMNS,
  MAX_POINTS,
} from "./types.ts";

/** Delimiter names accepted by {@link ingestText}; `auto` detects one. */
export type DelimiterName = "auto" | "comma" | "semicolon" | "tab" | "whitespace";

/** How the time column is read; `auto` decides from its contents (see {@link ingestText}). */
export type TimeFormat = "auto" | "iso" | "decimal_year";

/** Options of a text upload (all optional; names match the query parameters). */
export interface TextIngestOptions extends SeriesMetaInput {
  /** Time column (ISO 8601 times or decimal years), by header name or 0-based index. */
  time?: string;
  /** Separate year / month / day columns instead of `time` (month and day optional). */
  year?: string;
  month?: string;
  day?: string;
  /** Value column. @default the column named "value", or the only other column */
  value?: string;
  /** One-sigma uncertainty column. @default the column named "uncertainty" if any */
  uncertainty?: string;
  /** @default "auto" */
  delimiter?: DelimiterName;
  /** Extra missing-value sentinels (added to empty, NaN and NA), e.g. ["-1", "-999"]. */
  missing?: string[];
  /** @default "reject" */
  duplicates?: DuplicatePolicy;
  /** @default "auto" */
  time_format?: TimeFormat;
}

const DELIMS: Record<Exclude<DelimiterName, "auto">, string> = {
  comma: ",",
  semicolon: ";",
  tab: "\t",
  whitespace: " ",
};

/** The comment line that opens a sunlag series CSV export (see seriesToCsv). */
export const EXPORT_MARKER = "# sunlag series";
const FILE_META_KEYS = ["name", "quantity", "units", "description", "source", "version"] as const;

const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const INFINITY = /^[+-]?(?:inf|infinity)$/i;
const YEAR4 = /^\d{4}$/;

interface Line {
  row: number;
  text: string;
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
  const q = (pointer: string): Pick<IngestError, "pointer" | "in"> => ({ pointer, in: "query" });

  // 1. Text check.
  let text: string;
  if (typeof input === "string") {
    const nul = input.indexOf("\0");
    if (nul >= 0) return notText(`NUL character at offset ${nul}`, lineOf(input, nul));
    text = input;
  } else {
    const nul = input.indexOf(0);
    if (nul >= 0) {
      return notText(`NUL byte at offset ${nul}`, countNewlines(input, nul) + 1);
    }
    try {
      text = new TextDecoder("utf-8", { fatal: true, ignoreBOM: false }).decode(input);
    } catch {
      return notText("invalid UTF-8 byte sequence", undefined);
    }
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);

  // 2. Lines, comments, file metadata. A body with too many data rows is refused by a cheap
  // count before any line is split.
  if (countDataLines(text, MAX_POINTS + 1) > MAX_POINTS + 1) {
    return fail({ pointer: "", in: "body", message: `too many rows: more than ${MAX_POINTS}` });
  }
  const raw = text.split(/\r\n|\n|\r/);
  const lines: Line[] = [];
  const fileMeta: Record<string, string> = {};
  let isExport = false;
  for (let i = 0; i < raw.length; i++) {
    const s = raw[i];
    const t = s.trim();
    if (t === "") continue;
    if (t.startsWith("#")) {
      if (lines.length === 0 && t === EXPORT_MARKER) isExport = true;
      else if (isExport && lines.length === 0) {
        const m = /^#\s*([a-z_]+):\s?(.*)$/.exec(s.trimStart());
        if (m && (FILE_META_KEYS as readonly string[]).includes(m[1])) {
          fileMeta[m[1]] = decodeMetaValue(m[2]);
        }
      }
      continue;
    }
    lines.push({ row: i + 1, text: s });
    if (lines.length > MAX_POINTS + 1) {
      return fail({ pointer: "", in: "body", message: `too many rows: more than ${MAX_POINTS}` });
    }
  }
  const metaFromFile: string[] = [];
  const meta: SeriesMetaInput = { ...options };
  for (const k of FILE_META_KEYS) {
    if ((meta[k] === undefined || meta[k] === null) && fileMeta[k] !== undefined) {
      meta[k] = fileMeta[k] === "" ? null : fileMeta[k];
      metaFromFile.push(k);
    }
  }
  const checked = checkMeta(meta, (f) => q(`/${f}`), errors);
  if (lines.length === 0) {
    errors.add({ pointer: "", in: "body", message: "the body holds no data rows" });
    return errors.failure();
  }

  // 3. Delimiter.
  const delimName = options.delimiter ?? "auto";
  if (!(delimName === "auto" || delimName in DELIMS)) {
    return fail({
      ...q("/delimiter"),
      message:
        `unknown delimiter "${delimName}": expected auto, comma, semicolon, tab or whitespace`,
    });
  }
  const delimiter = delimName === "auto" ? detectDelimiter(lines) : DELIMS[delimName];
  if (delimiter === null) {
    return fail({
      pointer: "",
      in: "body",
      row: lines[0].row,
      message:
        "cannot detect the delimiter: no comma, semicolon, tab or whitespace splits the rows into 2 or more columns; state it with delimiter=",
    });
  }
  const delimLabel = (Object.keys(DELIMS) as (keyof typeof DELIMS)[]).find((k) =>
    DELIMS[k] === delimiter
  )!;
  const firstWidth = countCells(lines[0].text, delimiter);
  if (firstWidth > MAX_COLUMNS) {
    return fail({
      pointer: "",
      in: "body",
      row: lines[0].row,
      message: `the table has ${firstWidth} columns (${delimLabel} separated); at most ` +
        `${MAX_COLUMNS} are read: upload the time, value and uncertainty columns`,
    });
  }

  // 4. First row, header. Rows of empty cells only (",,," as spreadsheets write below a
  // table) count as blank lines. Rows are split again where they are read, so the table is
  // never held as cells: a large upload stays cheap in memory and in garbage collection.
  const rowCells = (k: number): string[] | null | "blank" => {
    const c = splitLine(lines[k].text, delimiter);
    if (c === null) return null;
    for (const x of c) if (x.trim() !== "") return c;
    return "blank";
  };
  let k0 = 0;
  let firstCells: string[] | null = null;
  for (; k0 < lines.length && firstCells === null; k0++) {
    const c = rowCells(k0);
    if (c === null) {
      return fail({
        pointer: "",
        in: "body",
        row: lines[k0].row,
        message: "unterminated quoted field",
      });
    }
    if (c !== "blank") firstCells = c;
  }
  if (firstCells === null) {
    return fail({ pointer: "", in: "body", message: "the body holds no data rows" });
  }
  k0--; // index of the first row
  const width = firstCells.length;
  const refs = [
    options.time,
    options.year,
    options.month,
    options.day,
    options.value,
    options.uncertainty,
  ];
  const namedRef = refs.some((r) => r !== undefined && !/^\d+$/.test(r.trim()));
  const labels = firstCells.filter((c) => c.trim() !== "");
  const header = isExport || namedRef ||
    (labels.length > 0 && labels.every((c) => !looksLikeData(c)));
  const names = header ? firstCells.map((c) => c.trim()) : null;
  const first = header ? k0 + 1 : k0; // index in `lines` of the first data row
  const colLabel = (j: number): string | number => (names ? names[j] || j : j);

  const resolve = (ref: string | undefined, param: string): number | null | undefined => {
    if (ref === undefined) return undefined;
    const r = ref.trim();
    if (names) {
      let j = names.indexOf(r);
      if (j < 0) j = names.findIndex((n) => n.toLowerCase() === r.toLowerCase());
      if (j >= 0) return j;
    }
    if (/^\d+$/.test(r)) {
      const j = Number(r);
      if (j < width) return j;
      errors.add({
        ...q(`/${param}`),
        message: `column index ${j} is out of range: the table has ${width} columns (0..${
          width - 1
        })`,
      });
      return null;
    }
    errors.add({
      ...q(`/${param}`),
      message: names
        ? `no column "${r}" in the header (columns: ${names.map((n) => `"${n}"`).join(", ")})`
        : `column "${r}" named, but the table has no header row; use a 0-based index`,
    });
    return null;
  };
  const byName = (...cands: string[]) => {
    if (!names) return -1;
    for (const c of cands) {
      const j = names.findIndex((n) => n.toLowerCase() === c);
      if (j >= 0) return j;
    }
    return -1;
  };

  let tCol = resolve(options.time, "time");
  let yCol = resolve(options.year, "year");
  let mCol = resolve(options.month, "month");
  let dCol = resolve(options.day, "day");
  if (
    [tCol, yCol, mCol, dCol].every((c) => c === undefined) &&
    byName("decimal_year", "time", "date") < 0 && byName("year") >= 0 && byName("month") >= 0
  ) {
    // a header with year and month (and day) columns and no single time column
    yCol = byName("year");
    mCol = byName("month");
    if (byName("day") >= 0) dCol = byName("day");
  }
  let vCol = resolve(options.value, "value");
  let uCol = resolve(options.uncertainty, "uncertainty");
  if (tCol !== undefined && yCol !== undefined) {
    errors.add({
      ...q("/time"),
      message: "name either a time column or year/month/day columns, not both",
    });
  }
  if (yCol === undefined && (mCol !== undefined || dCol !== undefined)) {
    errors.add({ ...q("/year"), message: "month/day columns need a year column" });
  }
  if (dCol !== undefined && mCol === undefined) {
    errors.add({ ...q("/month"), message: "a day column needs a month column" });
  }
  const ymd = yCol !== undefined;
  if (!ymd && tCol === undefined) {
    const j = byName("decimal_year", "time", "date", "year");
    tCol = j >= 0 ? j : 0;
  }
  const timeCols = (ymd ? [yCol, mCol, dCol] : [tCol]).filter((c): c is number =>
    typeof c === "number"
  );
  if (uCol === undefined) {
    const j = byName("uncertainty");
    uCol = j >= 0 && !timeCols.includes(j) ? j : undefined;
  }
  if (vCol === undefined) {
    const j = byName("value");
    if (j >= 0) vCol = j;
    else {
      const rest = [...Array(width).keys()].filter((k) => !timeCols.includes(k) && k !== uCol);
      if (rest.length === 1) vCol = rest[0];
      else {
        errors.add({
          ...q("/value"),
          message: `name the value column: ${rest.length} candidate columns (${
            rest.slice(0, 10).map((k) => JSON.stringify(colLabel(k))).join(", ")
          }${rest.length > 10 ? ", ..." : ""})`,
        });
        vCol = null;
      }
    }
  }
  if (typeof vCol === "number" && timeCols.includes(vCol)) {
    errors.add({ ...q("/value"), message: "the value column is also a time column" });
  }
  if (typeof uCol === "number" && (uCol === vCol || timeCols.includes(uCol))) {
    errors.add({
      ...q("/uncertainty"),
      message: "the uncertainty column is also the value or a time column",
    });
  }
  const tf = options.time_format ?? "auto";
  if (!["auto", "iso", "decimal_year"].includes(tf)) {
    errors.add({
      ...q("/time_format"),
      message: `unknown time_format "${tf}": expected auto, iso or decimal_year`,
    });
  }
  if (ymd && options.time_format !== undefined && tf !== "auto") {
    errors.add({
      ...q("/time_format"),
      message: "time_format applies to a time column, not year/month/day columns",
    });
  }
  if (errors.size > 0) return errors.failure();
  const vc = vCol as number, uc = uCol ?? null;

  // 5. Sentinels.
  const sentinelText = new Set<string>(DEFAULT_MISSING.map((s) => s.toLowerCase()));
  const sentinelNum = new Set<number>();
  for (const s of options.missing ?? []) {
    const t = s.trim();
    sentinelText.add(t.toLowerCase());
    if (NUMBER.test(t)) sentinelNum.add(Number(t));
  }
  let longest = 0;
  for (const s of sentinelText) longest = Math.max(longest, s.length);
  const isMissing = (c: string) =>
    (c.length <= longest && (sentinelText.has(c) || sentinelText.has(c.toLowerCase()))) ||
    (sentinelNum.size > 0 && NUMBER.test(c) && sentinelNum.has(Number(c)));

  // 6. Time format for a single time column.
  let timeFormat: "iso" | "decimal_year" | "year_month_day" = "year_month_day";
  if (!ymd) {
    const tc = tCol as number;
    if (tf !== "auto") timeFormat = tf as "iso" | "decimal_year";
    else if (names && /decimal|fractional/i.test(names[tc] ?? "")) timeFormat = "decimal_year";
    else {
      let allNumbers = true, allYear4 = true;
      for (let k = first; k < lines.length; k++) {
        const row = rowCells(k);
        if (row === null || row === "blank") continue;
        const c = (row[tc] ?? "").trim();
        if (!NUMBER.test(c)) {
          allNumbers = false;
          break;
        }
        if (!YEAR4.test(c)) allYear4 = false;
      }
      timeFormat = allNumbers && !allYear4 ? "decimal_year" : "iso";
    }
  }

  // 7. Rows.
  const cap = lines.length - first;
  const time = new Float64Array(cap), value = new Float64Array(cap);
  const unc = uc === null ? null : new Float64Array(cap);
  const rowOf = new Int32Array(cap);
  let n = 0;
  const bodyErr = (k: number, column: number, message: string) =>
    errors.add({ pointer: "", in: "body", row: lines[k].row, column: colLabel(column), message });
  const readInt = (
    row: string[],
    k: number,
    j: number,
    what: string,
    lo: number,
    hi: number,
  ): number | null => {
    const c = row[j].trim();
    if (!/^[+-]?\d+$/.test(c) || Number(c) < lo || Number(c) > hi) {
      bodyErr(k, j, `${what} must be an integer in ${lo}..${hi}, got "${short(c)}"`);
      return null;
    }
    return Number(c);
  };
  for (let k = first; k < lines.length; k++) {
    const row = rowCells(k);
    if (row === "blank") continue;
    if (row === null) {
      errors.add({
        pointer: "",
        in: "body",
        row: lines[k].row,
        message: "unterminated quoted field",
      });
      continue;
    }
    const i = n++;
    rowOf[i] = lines[k].row;
    if (row.length !== width) {
      errors.add({
        pointer: "",
        in: "body",
        row: lines[k].row,
        message: `row has ${row.length} cells, expected ${width} like the ${
          header ? "header" : "first row"
        }`,
      });
      time[i] = value[i] = 0;
      if (unc) unc[i] = 0;
      continue;
    }
    // time
    let t = NaN;
    if (ymd) {
      const y = readInt(row, k, yCol as number, "year", -999999, 999999);
      const m = typeof mCol === "number" ? readInt(row, k, mCol, "month", 1, 12) : null;
      const d = typeof dCol === "number" ? readInt(row, k, dCol, "day", 1, 31) : null;
      if (y !== null && (mCol === undefined || m !== null) && (dCol === undefined || d !== null)) {
        try {
          if (m === null) t = y + 0.5;
          else if (d === null) t = periodBounds(decimalYear(y, m, 1), "monthly").middle;
          else t = decimalYear(y, m, d, 0.5);
        } catch (e) {
          bodyErr(k, dCol as number, (e as Error).message);
        }
      }
    } else {
      const tc = tCol as number;
      const c = row[tc].trim();
      if (timeFormat === "decimal_year") {
        if (NUMBER.test(c) && Math.abs(Number(c)) <= MAX_ABS_DECIMAL_YEAR) t = Number(c);
        else if (NUMBER.test(c)) bodyErr(k, tc, decimalYearRange(c));
        else bodyErr(k, tc, `unparseable time "${short(c)}": expected a decimal year`);
      } else {
        try {
          t = parseIsoDecimalYear(c);
        } catch (e) {
          bodyErr(
            k,
            tc,
            `unparseable time: ${(e as Error).message.replace(/^Cannot parse time /, "")}`,
          );
        }
      }
    }
    time[i] = Number.isNaN(t) ? 0 : t;
    // value
    const vcell = row[vc].trim();
    let v = NaN;
    if (!isMissing(vcell)) v = readNumber(vcell, (msg) => bodyErr(k, vc, msg), "value");
    value[i] = v;
    if (unc && uc !== null) {
      const ucell = row[uc].trim();
      if (Number.isNaN(v)) unc[i] = NaN;
      else if (isMissing(ucell)) {
        bodyErr(
          k,
          uc,
          "uncertainty is missing while the value is present; a series carries an uncertainty for every point or none",
        );
        unc[i] = 0;
      } else {
        const u = readNumber(ucell, (msg) => bodyErr(k, uc, msg), "uncertainty");
        if (u < 0) bodyErr(k, uc, `uncertainty must be non-negative, got ${u}`);
        unc[i] = Number.isNaN(u) ? 0 : u;
      }
    }
    if (Number.isNaN(v) && !isMissing(vcell)) value[i] = 0; // an error was recorded
  }
  if (n === 0 && errors.size === 0) {
    return fail({ pointer: "", in: "body", message: "the body holds a header but no data rows" });
  }
  return finish(
    {
      time: time.subarray(0, n),
      value: value.subarray(0, n),
      uncertainty: unc ? unc.subarray(0, n) : null,
      where: (i) => ({
        pointer: "",
        in: "body",
        row: rowOf[i],
        column: colLabel(ymd ? yCol as number : tCol as number),
      }),
    },
    checked,
    options.duplicates ?? "reject",
    errors,
    {
      delimiter: delimLabel,
      header,
      time_format: timeFormat,
      ...(metaFromFile.length ? { metadata_from_file: metaFromFile } : {}),
    },
  );

  function fail(e: IngestError): IngestResult {
    return errors.failure(e);
  }
}

/** The message for a decimal year outside ±MAX_ABS_DECIMAL_YEAR. */
export function decimalYearRange(c: string): string {
  return `decimal year ${short(c)} is outside -${MAX_ABS_DECIMAL_YEAR}..${MAX_ABS_DECIMAL_YEAR}` +
    " (a Unix timestamp? give ISO 8601 times or decimal years)";
}

/** Parse a finite number, reporting why not through `bad` (then returns NaN). */
function readNumber(c: string, bad: (msg: string) => void, what: string): number {
  if (INFINITY.test(c)) {
    bad(`${what} "${short(c)}" is infinite; only finite numbers are allowed`);
    return NaN;
  }
  if (!NUMBER.test(c)) {
    const hint = /^[+-]?\d+,\d+$/.test(c)
      ? " (decimal comma? write numbers with a decimal point)"
      : "";
    bad(`non-numeric ${what} "${short(c)}"${hint}`);
    return NaN;
  }
  const x = Number(c);
  if (!Number.isFinite(x)) {
    bad(`${what} "${short(c)}" overflows to infinity; only finite numbers are allowed`);
    return NaN;
  }
  return x;
}

function looksLikeData(c: string): boolean {
  const t = c.trim();
  if (t === "" || NUMBER.test(t) || INFINITY.test(t) || /^(nan|na)$/i.test(t)) return true;
  try {
    parseIsoTime(t);
    return true;
  } catch {
    return false;
  }
}

/** Split one line; null when a quote is not closed. Whitespace mode splits on runs of blanks. */
export function splitLine(line: string, delimiter: string): string[] | null {
  if (delimiter === " ") return line.trim().split(/\s+/);
  if (!line.includes('"')) return line.split(delimiter);
  const out: string[] = [];
  let cur = "", i = 0, quoted = false, wasQuoted = false;
  while (i < line.length) {
    const ch = line[i];
    if (quoted) {
      if (ch === '"') {
        if (line[i + 1] === '"') {
          cur += '"';
          i += 2;
          continue;
        }
        quoted = false;
      } else cur += ch;
      i++;
      continue;
    }
    if (ch === '"' && cur.trim() === "" && !wasQuoted) {
      quoted = true;
      wasQuoted = true;
      cur = "";
    } else if (ch === delimiter) {
      out.push(cur);
      cur = "";
      wasQuoted = false;
    } else cur += ch;
    i++;
  }
  if (quoted) return null;
  out.push(cur);
  return out;
}

/**
 * Cells of a line without splitting it (one pass, no allocation); a quoted line is split
 * properly (-1 when a quote is not closed).
 */
export function countCells(line: string, delimiter: string): number {
  if (delimiter === " ") {
    let n = 0, inCell = false;
    for (let i = 0; i < line.length; i++) {
      const c = line.charCodeAt(i);
      const blank = c === 32 || c === 9 || c === 11 || c === 12 || c === 160;
      if (!blank && !inCell) n++;
      inCell = !blank;
    }
    return Math.max(n, 1);
  }
  if (line.includes('"')) return splitLine(line, delimiter)?.length ?? -1;
  let n = 1;
  for (let i = line.indexOf(delimiter); i >= 0; i = line.indexOf(delimiter, i + 1)) n++;
  return n;
}

/** Choose the delimiter that splits the first rows most consistently into 2+ cells. */
function detectDelimiter(lines: Line[]): string | null {
  const sample = lines.slice(0, 100);
  let best: string | null = null, bestScore = 0;
  for (const d of ["\t", ";", ",", " "]) {
    const counts = new Map<number, number>();
    for (const l of sample) {
      const k = countCells(l.text, d);
      counts.set(k, (counts.get(k) ?? 0) + 1);
    }
    let mode = 0, modeCount = 0;
    for (const [k, v] of counts) {
      if (v > modeCount || (v === modeCount && k > mode)) [mode, modeCount] = [k, v];
    }
    if (mode < 2) continue;
    const score = modeCount / sample.length;
    if (score > bestScore + 1e-9) [best, bestScore] = [d, score];
  }
  return best;
}

function decodeMetaValue(v: string): string {
  if (v.startsWith('"')) {
    try {
      const s = JSON.parse(v);
      if (typeof s === "string") return s;
    } catch {
      // not JSON: keep as written
    }
  }
  return v;
}

function notText(why: string, row: number | undefined): IngestResult {
  return {
    ok: false,
    errors: [{
      pointer: "",
      in: "body",
      ...(row === undefined ? {} : { row }),
      message: `the body is not UTF-8 text (${why}); upload a delimited text file or JSON`,
    }],
  };
}

/** Data lines (neither blank nor `#` comments) in `text`, counting no further than limit + 1. */
function countDataLines(text: string, limit: number): number {
  let count = 0, atStart = true, blank = true;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 10 || c === 13) {
      if (!blank && ++count > limit) return count;
      atStart = true;
      blank = true;
    } else if (atStart) {
      if (c === 32 || c === 9) continue;
      atStart = false;
      blank = c === 35; // "#": a comment counts as blank
    }
  }
  return blank ? count : count + 1;
}

function countNewlines(bytes: Uint8Array, end: number): number {
  let n = 0;
  for (let i = 0; i < end; i++) if (bytes[i] === 10) n++;
  return n;
}

function lineOf(s: string, end: number): number {
  let n = 1;
  for (let i = 0; i < end; i++) if (s.charCodeAt(i) === 10) n++;
  return n;
}

function short(s: string): string {
  return s.length > 40 ? `${s.slice(0, 40)}…` : s;
}
