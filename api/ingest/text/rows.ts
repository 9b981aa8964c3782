/**
 * Stage 6 of a text upload: read every data row into parallel arrays (time, value,
 * uncertainty), reporting each bad cell by file line and column.
 *
 * A value cell equal to a missing sentinel is a gap (NaN). Otherwise values and uncertainties
 * must be finite numbers written with a `.` decimal point; uncertainties must be non-negative
 * and present wherever the value is.
 *
 * @module
 */
import type { ErrorList, ParsedPoints } from "../normalise.ts";
import { readNumber } from "./cells.ts";
import type { Columns } from "./columns.ts";
import type { Table } from "./table.ts";
import { readRowTime, type ReadTimeFormat } from "./time.ts";

/** Read the data rows; errors are added to `errors` (the points are then not to be used). */
export function readRows(
  table: Table,
  cols: Columns,
  format: ReadTimeFormat,
  isMissing: (cell: string) => boolean,
  errors: ErrorList,
): ParsedPoints {
  const { lines, first, width } = table;
  const cap = lines.length - first;
  const time = new Float64Array(cap), value = new Float64Array(cap);
  const unc = cols.uncertainty === null ? null : new Float64Array(cap);
  const rowOf = new Int32Array(cap);
  let n = 0;
  for (let k = first; k < lines.length; k++) {
    const row = table.cells(k);
    if (row === "blank") continue;
    const at = { pointer: "", in: "body" as const, row: lines[k].row };
    if (row === null) {
      errors.add({ ...at, message: "unterminated quoted field" });
      continue;
    }
    const i = n++;
    rowOf[i] = lines[k].row;
    if (row.length !== width) {
      errors.add({
        ...at,
        message: `row has ${row.length} cells, expected ${width} like the ${
          table.header ? "header" : "first row"
        }`,
      });
      time[i] = value[i] = 0;
      if (unc) unc[i] = 0;
      continue;
    }
    const bad = (j: number, message: string) =>
      errors.add({ ...at, column: table.label(j), message });
    const t = readRowTime(row, cols, format, bad);
    time[i] = Number.isNaN(t) ? 0 : t;
    value[i] = readValueCells(row, cols, isMissing, bad, unc, i);
  }
  return {
    time: time.subarray(0, n),
    value: value.subarray(0, n),
    uncertainty: unc ? unc.subarray(0, n) : null,
    where: (i) => ({
      pointer: "",
      in: "body",
      row: rowOf[i],
      column: table.label(cols.timeColumn),
    }),
    whole: { pointer: "", in: "body" },
  };
}

/** The value of a row (NaN when missing, 0 after an error) and its uncertainty into unc[i]. */
function readValueCells(
  row: string[],
  cols: Columns,
  isMissing: (cell: string) => boolean,
  bad: (column: number, message: string) => void,
  unc: Float64Array | null,
  i: number,
): number {
  const vc = cols.value, uc = cols.uncertainty;
  const vcell = row[vc].trim();
  const missing = isMissing(vcell);
  const v = missing ? NaN : readNumber(vcell, (msg) => bad(vc, msg), "value");
  if (unc && uc !== null) {
    const ucell = row[uc].trim();
    if (Number.isNaN(v)) unc[i] = NaN;
    else if (isMissing(ucell)) {
      bad(
        uc,
        "uncertainty is missing while the value is present; a series carries an uncertainty for every point or none",
      );
      unc[i] = 0;
    } else {
      const u = readNumber(ucell, (msg) => bad(uc, msg), "uncertainty");
      if (u < 0) bad(uc, `uncertainty must be non-negative, got ${u}`);
      unc[i] = Number.isNaN(u) ? 0 : u;
    }
  }
  return Number.isNaN(v) && !missing ? 0 : v; // an error was recorded
}
