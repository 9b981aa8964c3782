/**
 * Adapter of the "cycles" analysis: detection from the shared cycle adapter, then the cycle
 * phase (core/cycles/cycle_phase.ts) and the table's summary (cycle_statistics.ts).
 *
 * @module
 */
import type { RunContext } from "../../runs/kind.ts";
import { cyclePhase, type CycleRow, summarizeCycleTable } from "../../../core/cycles/mod.ts";
import { formatIsoTime } from "../../../core/time/mod.ts";
import { analyseCycles, type CycleAnalysis } from "../common/cycle_detection.ts";
import { CAUTION_CYCLE_REVIEW, CAUTION_SCALE } from "../common/cycle_cautions.ts";
import { cycleRowJson } from "../common/cycle_row.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import { sunspotInput } from "../common/sunspot_input.ts";
import type { CyclesParams } from "./request.ts";
import type { CyclesResultIn } from "./result.ts";

/** The smoothed series, the cycle phase, years since minimum and the cycle of each time. */
function cycleOutputs(an: CycleAnalysis, rows: CycleRow[]): CyclesResultIn["outputs"] {
  const { grid, series: s } = an;
  const phase = cyclePhase(grid.time, rows);
  const time = Array.from(grid.time);
  const out = (name: string, quantity: string, units: string) => ({ name, quantity, units, time });
  return {
    smoothed: {
      ...out(
        `${s.name} (${an.smoothing === "none" ? "unsmoothed" : an.smoothing} for cycles)`,
        s.quantity,
        s.units,
      ),
      value: undefinedAsNull(an.smoothed),
      description: `series ${s.id} smoothed (${an.smoothing}) as used to find cycle extrema`,
    },
    phase: {
      ...out(`${s.name} cycle phase`, "other", "1"),
      value: undefinedAsNull(phase.phase),
      description: "fraction of the cycle elapsed: 0 at its starting minimum, 1 at the next " +
        "minimum; null before the first minimum and in the cycle in progress",
    },
    since_minimum: {
      ...out(`${s.name} years since cycle minimum`, "other", "yr"),
      value: undefinedAsNull(phase.sinceMinimum),
      description: "years since the latest cycle minimum; null before the first",
    },
    cycle: {
      ...out(`${s.name} cycle`, "other", "1"),
      value: Array.from(phase.cycleIndex, (k) => (k === 0 ? null : rows[k - 1].number ?? k)),
      description: "the cycle each time belongs to: its number when an anchor numbers the " +
        "cycles, else its position in the table; null before the first minimum",
    },
  };
}

/** The cycle table, extrema, summary and phase outputs of a sunspot series. */
export function computeCycles(params: CyclesParams, ctx: RunContext): CyclesResultIn {
  const an = analyseCycles(ctx, params);
  const { grid, rows, series: s } = an;
  const res = grid.resolution;
  const summary = summarizeCycleTable(rows);
  const warnings = [...an.warnings];
  if (summary.completeCycles === 0) {
    warnings.push("no complete cycle: the series holds fewer than two cycle minima");
  }
  return {
    input: { ...sunspotInput(s), resolution: res },
    smoothing: an.smoothing,
    rule: {
      min_separation_years: params.min_separation_years,
      prominence: an.prominence,
      prominence_default: params.prominence === undefined,
    },
    cycles: rows.map((r) => cycleRowJson(r, res)),
    extrema: an.extrema.map((e) => ({
      kind: e.kind,
      date: formatIsoTime(e.time, res),
      decimal_year: e.time,
      value: e.value,
      prominence: e.prominence,
      provisional: e.provisional,
    })),
    summary: {
      complete_cycles: summary.completeCycles,
      in_progress: summary.inProgress,
      length_years: summary.lengthYears,
      rise_years: summary.riseYears,
      amplitude: summary.amplitude,
    },
    outputs: cycleOutputs(an, rows),
    warnings,
    cautions: [CAUTION_SCALE, CAUTION_CYCLE_REVIEW],
  };
}
