/**
 * Stage 4 of a text upload: which column is time (or year/month/day), value and uncertainty.
 *
 * Columns are named by header name (exact, then case-insensitive) or by 0-based index.
 * Defaults: time = `decimal_year`, `time`, `date`, `year` (the first present), else column 0,
 * except that a header with `year` and `month` (and `day`) columns and none of the others is
 * read as year/month/day columns; value = `value`, else the only column left; uncertainty =
 * `uncertainty` if present.
 *
 * @module
 */
import type { ErrorList } from "../normalise.ts";
import type { ColumnRefs, Table } from "./table.ts";

/** The columns of a table, checked. */
export interface Columns {
  /** Time in year/month/day columns rather than one time column. */
  ymd: boolean;
  /** The time column (when not ymd). */
  time?: number;
  year?: number;
  month?: number;
  day?: number;
  value: number;
  uncertainty: number | null;
  /** The column errors about a point's time name: `time`, or `year`. */
  timeColumn: number;
}

type Ref = number | null | undefined;

/**
 * Resolve the columns, adding an error per bad reference. The answer is usable only when no
 * error was added.
 */
export function resolveColumns(table: Table, refs: ColumnRefs, errors: ErrorList): Columns {
  const time = resolveTimeColumns(table, refs, errors);
  const { ymd } = time;
  const byName = (...cands: string[]) => findByName(table.names, cands);
  let vCol = resolveRef(table, refs.value, "value", errors);
  let uCol = resolveRef(table, refs.uncertainty, "uncertainty", errors);
  const timeCols = (ymd ? [time.year, time.month, time.day] : [time.time]).filter((
    c,
  ): c is number => typeof c === "number");
  if (uCol === undefined) {
    const j = byName("uncertainty");
    uCol = j >= 0 && !timeCols.includes(j) ? j : undefined;
  }
  if (vCol === undefined) vCol = defaultValueColumn(table, timeCols, uCol, errors);
  const at = (p: string) => ({ pointer: `/${p}`, in: "query" as const });
  if (typeof vCol === "number" && timeCols.includes(vCol)) {
    errors.add({ ...at("value"), message: "the value column is also a time column" });
  }
  if (typeof uCol === "number" && (uCol === vCol || timeCols.includes(uCol))) {
    errors.add({
      ...at("uncertainty"),
      message: "the uncertainty column is also the value or a time column",
    });
  }
  const num = (c: Ref) => (typeof c === "number" ? c : undefined);
  return {
    ymd,
    time: num(time.time),
    year: num(time.year),
    month: num(time.month),
    day: num(time.day),
    value: vCol as number,
    uncertainty: uCol ?? null,
    timeColumn: (ymd ? time.year : time.time) as number,
  };
}

/** The time column, or year/month/day columns, with the checks that they go together. */
function resolveTimeColumns(table: Table, refs: ColumnRefs, errors: ErrorList) {
  const byName = (...cands: string[]) => findByName(table.names, cands);
  let time = resolveRef(table, refs.time, "time", errors);
  let year = resolveRef(table, refs.year, "year", errors);
  let month = resolveRef(table, refs.month, "month", errors);
  let day = resolveRef(table, refs.day, "day", errors);
  if (
    [time, year, month, day].every((c) => c === undefined) &&
    byName("decimal_year", "time", "date") < 0 && byName("year") >= 0 && byName("month") >= 0
  ) {
    // a header with year and month (and day) columns and no single time column
    year = byName("year");
    month = byName("month");
    if (byName("day") >= 0) day = byName("day");
  }
  const at = (p: string) => ({ pointer: `/${p}`, in: "query" as const });
  if (time !== undefined && year !== undefined) {
    errors.add({
      ...at("time"),
      message: "name either a time column or year/month/day columns, not both",
    });
  }
  if (year === undefined && (month !== undefined || day !== undefined)) {
    errors.add({ ...at("year"), message: "month/day columns need a year column" });
  }
  if (day !== undefined && month === undefined) {
    errors.add({ ...at("month"), message: "a day column needs a month column" });
  }
  const ymd = year !== undefined;
  if (!ymd && time === undefined) {
    const j = byName("decimal_year", "time", "date", "year");
    time = j >= 0 ? j : 0;
  }
  return { ymd, time, year, month, day };
}

/** A column reference: its index, null (an error was added) or undefined (not given). */
function resolveRef(table: Table, ref: string | undefined, param: string, errors: ErrorList): Ref {
  if (ref === undefined) return undefined;
  const { names, width } = table;
  const r = ref.trim();
  if (names) {
    let j = names.indexOf(r);
    if (j < 0) j = names.findIndex((n) => n.toLowerCase() === r.toLowerCase());
    if (j >= 0) return j;
  }
  const at = { pointer: `/${param}`, in: "query" as const };
  if (/^\d+$/.test(r)) {
    const j = Number(r);
    if (j < width) return j;
    errors.add({
      ...at,
      message: `column index ${j} is out of range: the table has ${width} columns (0..${
        width - 1
      })`,
    });
    return null;
  }
  errors.add({
    ...at,
    message: names
      ? `no column "${r}" in the header (columns: ${names.map((n) => `"${n}"`).join(", ")})`
      : `column "${r}" named, but the table has no header row; use a 0-based index`,
  });
  return null;
}

/** The first header column whose lower-cased name is one of `cands` (in order), else -1. */
function findByName(names: string[] | null, cands: string[]): number {
  if (!names) return -1;
  for (const c of cands) {
    const j = names.findIndex((n) => n.toLowerCase() === c);
    if (j >= 0) return j;
  }
  return -1;
}

/** `value` by name, else the only column that is neither time nor uncertainty. */
function defaultValueColumn(
  table: Table,
  timeCols: number[],
  uCol: Ref,
  errors: ErrorList,
): number | null {
  const j = findByName(table.names, ["value"]);
  if (j >= 0) return j;
  const rest = [...Array(table.width).keys()].filter((k) => !timeCols.includes(k) && k !== uCol);
  if (rest.length === 1) return rest[0];
  errors.add({
    pointer: "/value",
    in: "query",
    message: `name the value column: ${rest.length} candidate columns (${
      rest.slice(0, 10).map((k) => JSON.stringify(table.label(k))).join(", ")
    }${rest.length > 10 ? ", ..." : ""})`,
  });
  return null;
}
