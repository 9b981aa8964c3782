/**
 * Stage 5 of a text upload: how the time column is read, and the time of one row.
 *
 * Time cells are ISO 8601 (parseIsoTime: middle-of-period rule) or decimal years. With
 * `time_format: "auto"`, a column headed like `decimal_year` or holding any non-integer number
 * is read as decimal years; a column of 4-digit integers as ISO years (mid-year); anything else
 * as ISO 8601. Year/month/day columns hold integers: year + month is the middle of the month,
 * year alone the middle of the year, a full date its noon.
 *
 * @module
 */
import { decimalYear, parseIsoDecimalYear, periodBounds } from "../../../core/time/mod.ts";
import type { ErrorList } from "../normalise.ts";
import { MAX_ABS_DECIMAL_YEAR } from "../types.ts";
import { NUMBER, readInt, short } from "./cells.ts";
import type { Columns } from "./columns.ts";
import type { Table } from "./table.ts";

/** How the time column is read; `auto` decides from its contents. */
export type TimeFormat = "auto" | "iso" | "decimal_year";

/** How the times were read, as the upload report states it. */
export type ReadTimeFormat = "iso" | "decimal_year" | "year_month_day";

const YEAR4 = /^\d{4}$/;

/** Check the `time_format` option against the columns (adds errors). */
export function checkTimeFormatOption(
  given: string | undefined,
  ymd: boolean,
  errors: ErrorList,
): void {
  const tf = given ?? "auto";
  const at = { pointer: "/time_format", in: "query" as const };
  if (!["auto", "iso", "decimal_year"].includes(tf)) {
    errors.add({
      ...at,
      message: `unknown time_format "${tf}": expected auto, iso or decimal_year`,
    });
  }
  if (ymd && given !== undefined && tf !== "auto") {
    errors.add({
      ...at,
      message: "time_format applies to a time column, not year/month/day columns",
    });
  }
}

/** Decide how the time column is read (see the module rules). */
export function chooseTimeFormat(
  table: Table,
  cols: Columns,
  given: TimeFormat = "auto",
): ReadTimeFormat {
  if (cols.ymd) return "year_month_day";
  const tc = cols.time as number;
  if (given !== "auto") return given;
  if (table.names && /decimal|fractional/i.test(table.names[tc] ?? "")) return "decimal_year";
  let allNumbers = true, allYear4 = true;
  for (let k = table.first; k < table.lines.length; k++) {
    const row = table.cells(k);
    if (row === null || row === "blank") continue;
    const c = (row[tc] ?? "").trim();
    if (!NUMBER.test(c)) {
      allNumbers = false;
      break;
    }
    if (!YEAR4.test(c)) allYear4 = false;
  }
  return allNumbers && !allYear4 ? "decimal_year" : "iso";
}

/**
 * The time of one row in decimal years, or NaN after reporting why through `bad`.
 *
 * @param row the row's cells (as many as the table is wide)
 * @param bad reports a problem with the cell in column j
 */
export function readRowTime(
  row: string[],
  cols: Columns,
  format: ReadTimeFormat,
  bad: (column: number, message: string) => void,
): number {
  if (format === "year_month_day") return readYearMonthDay(row, cols, bad);
  const tc = cols.time as number;
  const c = row[tc].trim();
  if (format === "decimal_year") {
    if (NUMBER.test(c) && Math.abs(Number(c)) <= MAX_ABS_DECIMAL_YEAR) return Number(c);
    if (NUMBER.test(c)) bad(tc, decimalYearRange(c));
    else bad(tc, `unparseable time "${short(c)}": expected a decimal year`);
    return NaN;
  }
  try {
    return parseIsoDecimalYear(c);
  } catch (e) {
    bad(tc, `unparseable time: ${(e as Error).message.replace(/^Cannot parse time /, "")}`);
    return NaN;
  }
}

function readYearMonthDay(
  row: string[],
  cols: Columns,
  bad: (column: number, message: string) => void,
): number {
  const int = (j: number, what: string, lo: number, hi: number) =>
    readInt(row[j].trim(), (msg) => bad(j, msg), what, lo, hi);
  const y = int(cols.year as number, "year", -999999, 999999);
  const m = cols.month !== undefined ? int(cols.month, "month", 1, 12) : null;
  const d = cols.day !== undefined ? int(cols.day, "day", 1, 31) : null;
  if (
    y === null || (cols.month !== undefined && m === null) || (cols.day !== undefined && d === null)
  ) {
    return NaN;
  }
  try {
    if (m === null) return y + 0.5;
    if (d === null) return periodBounds(decimalYear(y, m, 1), "monthly").middle;
    return decimalYear(y, m, d, 0.5);
  } catch (e) {
    bad(cols.day as number, (e as Error).message);
    return NaN;
  }
}

/** The message for a decimal year outside ±MAX_ABS_DECIMAL_YEAR. */
export function decimalYearRange(c: string): string {
  return `decimal year ${short(c)} is outside -${MAX_ABS_DECIMAL_YEAR}..${MAX_ABS_DECIMAL_YEAR}` +
    " (a Unix timestamp? give ISO 8601 times or decimal years)";
}
