/**
 * CSV for series-like run outputs: `#` comment lines carry the metadata (run id, result
 * digest, kind and algorithm version, units, interval, cautions), then a header row and one
 * row per point. pandas `read_csv(comment="#")` and R `read.csv(comment.char = "#")` read it
 * as is. Metadata values and text cells are spreadsheet-safe (api/export/csv_cell.ts).
 *
 * @module
 */
import type { RunRecord } from "../store/types.ts";
import type { OutputSeries } from "../runs/kind.ts";
import { formatIsoTime, inferResolution } from "../../core/time/mod.ts";
import { csvMetaLine as metaLine, csvText } from "./csv_cell.ts";

/** A metadata line on one line: line breaks become blanks, the value spreadsheet-safe. */
function csvMetaLine(key: string, value: string): string {
  return metaLine(key, value.replace(/[\r\n]+/g, " "));
}

function cell(v: number | null | undefined): string {
  return v === null || v === undefined ? "" : String(v);
}

/** Render one output of a run as CSV. */
export function outputToCsv(run: RunRecord, name: string, o: OutputSeries): string {
  const cautions = (run.result?.cautions ?? []) as string[];
  const warnings = (run.result?.warnings ?? []) as string[];
  const axis = o.time_axis ?? "decimal_year";
  const calendar = axis === "decimal_year";
  const lines = [
    `# sunlag run output`,
    csvMetaLine("run_id", run.id),
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
      ? `# time: decimal_year on the proleptic Gregorian calendar; date is ISO 8601`
      : csvMetaLine("time", `${axis.replace(/_/g, " ")} (not calendar time)`),
    ...(o.interval ? [csvMetaLine("interval", o.interval)] : []),
    ...(o.description ? [csvMetaLine("description", o.description)] : []),
    ...warnings.map((w) => csvMetaLine("warning", w)),
    ...cautions.map((w) => csvMetaLine("caution", w)),
  ];
  const cols = calendar ? ["date", "decimal_year", "value"] : [axis, "value"];
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
