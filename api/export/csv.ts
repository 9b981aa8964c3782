/**
 * CSV for series-like run outputs: `#` comment lines carry the metadata (run id, result
 * digest, kind and algorithm version, units, interval, cautions), then a header row and one
 * row per point. pandas `read_csv(comment="#")` and R `read.csv(comment.char = "#")` read it
 * as is.
 *
 * @module
 */
import type { RunRecord } from "../store/types.ts";
import type { OutputSeries } from "../runs/kind.ts";
import { formatIsoTime, inferResolution } from "../../core/time/mod.ts";

function cell(v: number | null | undefined): string {
  return v === null || v === undefined ? "" : String(v);
}

function comment(text: string): string {
  return text.replace(/[\r\n]+/g, " ");
}

/** Render one output of a run as CSV. */
export function outputToCsv(run: RunRecord, name: string, o: OutputSeries): string {
  const cautions = (run.result?.cautions ?? []) as string[];
  const warnings = (run.result?.warnings ?? []) as string[];
  const axis = o.time_axis ?? "decimal_year";
  const calendar = axis === "decimal_year";
  const lines = [
    `# sunlag run output`,
    `# run_id: ${run.id}`,
    `# run_kind: ${run.kind} (algorithm ${run.algorithm_version}, service ${run.service_version})`,
    `# result_digest: sha256:${run.result_digest ?? ""}`,
    `# output: ${comment(name)}`,
    `# name: ${comment(o.name)}`,
    `# quantity: ${o.quantity}`,
    `# units: ${o.units}`,
    calendar
      ? `# time: decimal_year on the proleptic Gregorian calendar; date is ISO 8601`
      : `# time: ${axis.replace(/_/g, " ")} (not calendar time)`,
    ...(o.interval ? [`# interval: ${comment(o.interval)}`] : []),
    ...(o.description ? [`# description: ${comment(o.description)}`] : []),
    ...warnings.map((w) => `# warning: ${comment(w)}`),
    ...cautions.map((w) => `# caution: ${comment(w)}`),
  ];
  const cols = calendar ? ["date", "decimal_year", "value"] : [axis, "value"];
  if (o.uncertainty) cols.push("uncertainty");
  if (o.lower) cols.push("lower");
  if (o.upper) cols.push("upper");
  lines.push(cols.join(","));
  const res = inferResolution(o.time);
  for (let i = 0; i < o.time.length; i++) {
    const row = calendar
      ? [formatIsoTime(o.time[i], res), String(o.time[i]), cell(o.value[i])]
      : [String(o.time[i]), cell(o.value[i])];
    if (o.uncertainty) row.push(cell(o.uncertainty[i]));
    if (o.lower) row.push(cell(o.lower[i]));
    if (o.upper) row.push(cell(o.upper[i]));
    lines.push(row.join(","));
  }
  return lines.join("\n") + "\n";
}
