/**
 * CSV export of a stored series, readable by people, pandas and R, and re-ingestable to the
 * same content id.
 *
 * @module
 */
import { formatIsoTime } from "../../core/time/mod.ts";
import type { Resolution } from "../store/types.ts";
import { EXPORT_MARKER } from "./text.ts";
import { csvMetaLine, csvMetaValue, csvText } from "../export/csv_cell.ts";
import { DECIMAL_YEAR_COLUMN, TIME_COLUMN, UNCERTAINTY_MEANING } from "../export/columns.ts";

/** What {@link seriesToCsv} needs: a normalised or stored series, optionally with id/lineage. */
export interface CsvSeries {
  id?: string;
  name: string;
  quantity: string;
  units: string;
  description: string | null;
  source: string | null;
  version: string | null;
  resolution: Resolution;
  derived_from?: string | null;
  time: ArrayLike<number>;
  value: ArrayLike<number>;
  uncertainty: ArrayLike<number> | null;
}

/**
 * Render a series as CSV.
 *
 * Layout: the `# sunlag series` line, then `# key: value` comment lines for id, name,
 * quantity, units, version, resolution, source, description and derived_from (empty when
 * absent; a value with a line break, surrounding blanks or a leading quote is written as a
 * JSON string), a comment describing the columns (the vocabulary of every CSV the service
 * writes, `api/export/columns.ts`), then the header `time,decimal_year,value[,uncertainty]`
 * and one row per point. `time` is ISO 8601 at the
 * series' resolution (the period holding the point; UTC date-time for irregular series);
 * `decimal_year` is the exact stored time (shortest round-trip decimal), so
 * `ingestText(seriesToCsv(s))` gives the same content id. pandas
 * `read_csv(path, comment="#")` and R `read.csv(path, comment.char = "#")` read it as is.
 *
 * @param series the series
 * @returns CSV text with LF line ends and a final newline
 * @example
 * ```ts
 * import { seriesToCsv } from "./csv.ts";
 * import assert from "node:assert/strict";
 * const csv = seriesToCsv({
 *   name: "Spot count", quantity: "sunspot_number", units: "1", description: null,
 *   source: null, version: "2", resolution: "annual",
 *   time: [1996.5, 1997.5], value: [8.6, 21.5], uncertainty: null,
 * });
 * assert.ok(csv.includes("\ntime,decimal_year,value\n1996,1996.5,8.6\n1997,1997.5,21.5\n"));
 * ```
 */
export function seriesToCsv(series: CsvSeries): string {
  const meta: [string, string | null | undefined][] = [
    ["id", series.id],
    ["name", series.name],
    ["quantity", series.quantity],
    ["units", series.units],
    ["version", series.version],
    ["resolution", series.resolution],
    ["source", series.source],
    ["description", series.description],
    ["derived_from", series.derived_from],
  ];
  const out: string[] = [EXPORT_MARKER];
  for (const [k, v] of meta) out.push(csvMetaLine(k, v));
  const u = series.uncertainty;
  out.push(
    `# columns: time = ISO 8601 (UTC) ${
      series.resolution === "irregular" ? "instant" : `${series.resolution} period`
    }; decimal_year = proleptic Gregorian decimal year; value in ${
      series.units === "1" ? "dimensionless units" : JSON.stringify(csvMetaValue(series.units))
    }${u ? `; ${UNCERTAINTY_MEANING}` : ""}`,
  );
  const cols = [TIME_COLUMN, DECIMAL_YEAR_COLUMN, "value", ...(u ? ["uncertainty"] : [])];
  out.push(cols.join(","));
  const n = series.time.length;
  for (let i = 0; i < n; i++) {
    const t = series.time[i];
    const row = `${csvText(formatIsoTime(t, series.resolution))},${num(t)},${num(series.value[i])}`;
    out.push(u ? `${row},${num(u[i])}` : row);
  }
  return out.join("\n") + "\n";
}

function num(x: number): string {
  return Object.is(x, -0) ? "0" : String(x);
}
