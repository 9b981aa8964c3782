/**
 * Long-form CSV of a spectrum over time (`SpectrumOverTime` in a run's result): one row per
 * time and band, `date, decimal_year, band_lower_nm, band_upper_nm, value, uncertainty, lower,
 * upper`, with the run's metadata (units per band, interval, warnings, cautions) in `#` lines
 * as every CSV export carries it, spreadsheet-safe (api/export/csv_cell.ts). pandas
 * `read_csv(comment="#")` and R `read.csv(comment.char = "#")` read it as is; `pivot` by band
 * gives the wide table.
 *
 * @module
 */
import type { RunRecord } from "../store/types.ts";
import { formatIsoTime, inferResolution } from "../../core/time/mod.ts";
import type { SpectrumBlockIn } from "../analyses/common/spectrum_block.ts";
import { csvMetaLine as metaLine, csvText } from "./csv_cell.ts";

/** A metadata line on one line: line breaks become blanks, the value spreadsheet-safe. */
function meta(key: string, value: string): string {
  return metaLine(key, value.replace(/[\r\n]+/g, " "));
}

/** Render a run's spectrum block as long-form CSV. */
export function spectrumToCsv(run: RunRecord, s: SpectrumBlockIn): string {
  const cautions = (run.result?.cautions ?? []) as string[];
  const warnings = (run.result?.warnings ?? []) as string[];
  const lines = [
    "# sunlag run spectrum (long form: one row per time and wavelength band)",
    meta("run_id", run.id),
    meta(
      "run_kind",
      `${run.kind} (algorithm ${run.algorithm_version}, service ${run.service_version})`,
    ),
    meta("result_digest", `sha256:${run.result_digest ?? ""}`),
    meta("name", s.name),
    meta("quantity", s.quantity),
    meta("units", `${s.units} (every band); band bounds in nm, lower included, upper excluded`),
    "# time: decimal_year on the proleptic Gregorian calendar; date is ISO 8601",
    meta(
      "interval",
      s.lower
        ? `${s.interval}: lower/upper as stored (not symmetric about the value)`
        : `${s.interval}: lower/upper = value ∓ quantile × uncertainty`,
    ),
    meta("description", s.description),
    ...warnings.map((w) => meta("warning", w)),
    ...cautions.map((c) => meta("caution", c)),
    "date,decimal_year,band_lower_nm,band_upper_nm,value,uncertainty,lower,upper",
  ];
  const res = inferResolution(s.time);
  const dates = s.time.map((t) => csvText(formatIsoTime(t, res)));
  const cell = (v: number | null | undefined) => (v === null || v === undefined ? "" : String(v));
  for (let i = 0; i < s.time.length; i++) {
    for (let b = 0; b < s.bands.length; b++) {
      const v = s.value[b][i], u = s.uncertainty[b][i], q = s.interval_quantiles[b];
      // bounds as stored (an ensemble's quantiles), else to the values' 9 significant digits
      // (no float noise in the file)
      const lo = s.lower
        ? s.lower[b][i]
        : v === null || u === null
        ? null
        : Number((v - q * u).toPrecision(9));
      const hi = s.upper
        ? s.upper[b][i]
        : v === null || u === null
        ? null
        : Number((v + q * u).toPrecision(9));
      lines.push(
        `${dates[i]},${s.time[i]},${s.bands[b].lower},${s.bands[b].upper},${cell(v)},${cell(u)},${
          cell(lo)
        },${cell(hi)}`,
      );
    }
  }
  return lines.join("\n") + "\n";
}
