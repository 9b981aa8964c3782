/**
 * Stage 3 of a text upload: the table's shape. Chooses the delimiter (stated or detected),
 * finds the first row, and decides whether it is a header.
 *
 * @module
 */
import type { IngestError } from "../types.ts";
import { countCells, type DelimiterName, DELIMS, detectDelimiter, splitLine } from "./delimiter.ts";
import { MAX_COLUMNS } from "../types.ts";
import { looksLikeData } from "./cells.ts";
import type { Line } from "./lines.ts";

/** A table whose rows are split where they are read (never held as cells). */
export interface Table {
  lines: Line[];
  /** The delimiter character (" " = runs of blanks). */
  delimiter: string;
  /** Whether the first row is a header. */
  header: boolean;
  /** Trimmed header cells, or null without a header. */
  names: string[] | null;
  /** Cells in the first row; every row must have as many. */
  width: number;
  /** Index in `lines` of the first data row. */
  first: number;
  /** Cells of line k; null when a quote is not closed; "blank" when every cell is empty. */
  cells(k: number): string[] | null | "blank";
  /** A column's header name, or its index without a header (or with an empty name). */
  label(j: number): string | number;
}

/** Column references given in the options: a header name or a 0-based index each. */
export interface ColumnRefs {
  /** Time column (ISO 8601 times or decimal years). */
  time?: string;
  /** Separate year / month / day columns instead of `time` (month and day optional). */
  year?: string;
  month?: string;
  day?: string;
  /** Value column. @default the column named "value", or the only other column */
  value?: string;
  /** One-sigma uncertainty column. @default the column named "uncertainty" if any */
  uncertainty?: string;
}

/**
 * Open a table: delimiter, first row and header. Rows of empty cells only (",,," as
 * spreadsheets write below a table) count as blank lines.
 *
 * The first row is a header when none of its non-empty cells is data (a number, an ISO time
 * or a missing-value word; so a data row with one bad cell is reported, not taken for a
 * header), when the file is a sunlag export, or when a column is named by header name.
 *
 * @returns the table, or the one error that stops the upload
 */
export function openTable(
  lines: Line[],
  isExport: boolean,
  options: ColumnRefs & { delimiter?: DelimiterName },
): Table | IngestError {
  const delimName = options.delimiter ?? "auto";
  if (!(delimName === "auto" || delimName in DELIMS)) {
    return {
      pointer: "/delimiter",
      in: "query",
      message:
        `unknown delimiter "${delimName}": expected auto, comma, semicolon, tab or whitespace`,
    };
  }
  const delimiter = delimName === "auto" ? detectDelimiter(lines) : DELIMS[delimName];
  if (delimiter === null) {
    return {
      pointer: "",
      in: "body",
      row: lines[0].row,
      message:
        "cannot detect the delimiter: no comma, semicolon, tab or whitespace splits the rows into 2 or more columns; state it with delimiter=",
    };
  }
  const firstWidth = countCells(lines[0].text, delimiter);
  if (firstWidth > MAX_COLUMNS) {
    const label = (Object.keys(DELIMS) as (keyof typeof DELIMS)[]).find((k) =>
      DELIMS[k] === delimiter
    );
    return {
      pointer: "",
      in: "body",
      row: lines[0].row,
      message: `the table has ${firstWidth} columns (${label} separated); at most ` +
        `${MAX_COLUMNS} are read: upload the time, value and uncertainty columns`,
    };
  }
  const cells = (k: number): string[] | null | "blank" => {
    const c = splitLine(lines[k].text, delimiter);
    if (c === null) return null;
    for (const x of c) if (x.trim() !== "") return c;
    return "blank";
  };
  const firstRow = findFirstRow(lines, cells);
  if ("message" in firstRow) return firstRow;
  const { k0, firstCells } = firstRow;
  const refs = Object.values(pick(options));
  const namedRef = refs.some((r) => r !== undefined && !/^\d+$/.test(r.trim()));
  const labels = firstCells.filter((c) => c.trim() !== "");
  const header = isExport || namedRef ||
    (labels.length > 0 && labels.every((c) => !looksLikeData(c)));
  const names = header ? firstCells.map((c) => c.trim()) : null;
  return {
    lines,
    delimiter,
    header,
    names,
    width: firstCells.length,
    first: header ? k0 + 1 : k0,
    cells,
    label: (j) => (names ? names[j] || j : j),
  };
}

/** The first row that is not blank, or the error that stops the upload. */
function findFirstRow(
  lines: Line[],
  cells: (k: number) => string[] | null | "blank",
): { k0: number; firstCells: string[] } | IngestError {
  for (let k = 0; k < lines.length; k++) {
    const c = cells(k);
    if (c === null) {
      return { pointer: "", in: "body", row: lines[k].row, message: "unterminated quoted field" };
    }
    if (c !== "blank") return { k0: k, firstCells: c };
  }
  return { pointer: "", in: "body", message: "the body holds no data rows" };
}

function pick(o: ColumnRefs): ColumnRefs {
  const { time, year, month, day, value, uncertainty } = o;
  return { time, year, month, day, value, uncertainty };
}
