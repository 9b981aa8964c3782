/**
 * CSV for series-like run outputs: `#` comment lines carry the metadata (run id and label,
 * result digest, kind and algorithm version, units, what each column holds, the interval with
 * its level, and the warnings and cautions of the run and of the runs it is built on), then a
 * header row and one row per point. The columns follow the vocabulary of every CSV the service
 * writes (`api/export/columns.ts`): `time` (ISO 8601), `decimal_year`, `value`, then
 * `uncertainty` (1σ) and `lower`/`upper` when the output has them. pandas
 * `read_csv(comment="#")` and R `read.csv(comment.char = "#")` read it as is. Metadata values
 * and text cells are spreadsheet-safe (api/export/csv_cell.ts).
 *
 * @module
 */
import type { RunRecord } from "../store/types.ts";
import type { OutputSeries } from "../runs/kind.ts";
import { runLabel } from "../runs/label.ts";
import { noteLinesOf } from "../runs/inherit.ts";
import { formatIsoTime, inferResolution } from "../../core/time/mod.ts";
import { csvMetaLine as metaLine, csvText } from "./csv_cell.ts";

/** A metadata line on one line: line breaks become blanks, the value spreadsheet-safe. */
function csvMetaLine(key: string, value: string): string {
  return metaLine(key, value.replace(/[\r\n]+/g, " "));
}
import {
  DECIMAL_YEAR_COLUMN,
  intervalMeaning,
  TIME_COLUMN,
  UNCERTAINTY_MEANING,
} from "./columns.ts";

function cell(v: number | null | undefined): string {
  return v === null || v === undefined ? "" : String(v);
}

/** The `# columns:` line: what every column holds. */
function columnsLine(o: OutputSeries, calendar: boolean, axis: string): string {
  const parts = calendar
    ? [
      `${TIME_COLUMN} = ISO 8601 (UTC) period holding the point`,
      `${DECIMAL_YEAR_COLUMN} = proleptic Gregorian decimal year`,
    ]
    : [`${axis} = ${axis.replace(/_/g, " ")} (not calendar time)`];
  parts.push(`value in ${o.units === "1" ? "dimensionless units" : JSON.stringify(o.units)}`);
  if (o.uncertainty) parts.push(UNCERTAINTY_MEANING);
  if (o.lower || o.upper) parts.push(intervalMeaning(o.interval));
  return `# columns: ${parts.join("; ")}`;
}

/** Render one output of a run as CSV. */
export function outputToCsv(run: RunRecord, name: string, o: OutputSeries): string {
  const { warnings, cautions } = noteLinesOf(run.result);
  const axis = o.time_axis ?? "decimal_year";
  const calendar = axis === "decimal_year";
  const lines = [
    `# sunlag run output`,
    csvMetaLine("run_id", run.id),
    csvMetaLine("run_label", runLabel(run.id)),
    csvMetaLine(
      "run_kind",
      `${run.kind} (algorithm ${run.algorithm_version}, service ${run.service_version})`,
    ),
    csvMetaLine("result_digest", `sha256:${run.result_digest ?? ""}`),
    csvMetaLine("output", name),
    csvMetaLine("name", o.name),
    csvMetaLine("quantity", o.quantity),
    csvMetaLine("units", o.units),
    calendar
      ? `# time: ISO 8601 period and decimal year on the proleptic Gregorian calendar`
      : csvMetaLine("time", `${axis.replace(/_/g, " ")} (not calendar time)`),
    ...(o.interval ? [csvMetaLine("interval", o.interval)] : []),
    ...(o.description ? [csvMetaLine("description", o.description)] : []),
    columnsLine(o, calendar, axis),
    ...warnings.map((w) => csvMetaLine("warning", w)),
    ...cautions.map((w) => csvMetaLine("caution", w)),
  ];
  const cols = calendar ? [TIME_COLUMN, DECIMAL_YEAR_COLUMN, "value"] : [axis, "value"];
  if (o.uncertainty) cols.push("uncertainty");
  if (o.lower) cols.push("lower");
  if (o.upper) cols.push("upper");
  lines.push(cols.join(","));
  const res = inferResolution(o.time);
  for (let i = 0; i < o.time.length; i++) {
    const row = calendar
      ? [csvText(formatIsoTime(o.time[i], res)), String(o.time[i]), cell(o.value[i])]
      : [String(o.time[i]), cell(o.value[i])];
    if (o.uncertainty) row.push(cell(o.uncertainty[i]));
    if (o.lower) row.push(cell(o.lower[i]));
    if (o.upper) row.push(cell(o.upper[i]));
    lines.push(row.join(","));
  }
  return lines.join("\n") + "\n";
}
