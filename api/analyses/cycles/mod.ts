/**
 * Run kind "cycles": the table of solar cycles from a monthly or annual sunspot series, with
 * the extrema of the smoothed series and a cycle-phase series (core/cycles/cycle_extrema.ts,
 * cycle_table.ts, cycle_phase.ts).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import type { RunKind } from "../runs/kind.ts";
import { SeriesRef } from "../schemas/series_ref.ts";
import { cyclePhase } from "../../core/cycles/mod.ts";
import {
  analyseCycles,
  CAUTION_CYCLE_REVIEW,
  CAUTION_SCALE,
  CycleDetectionFields,
  cycleRowJson,
  iso,
  nulls,
} from "./cycles_common.ts";

export const CyclesRequest = z.object({
  series: SeriesRef,
  ...CycleDetectionFields,
}).openapi("CyclesRequest");

function meanSd(x: number[]) {
  if (x.length === 0) return { mean: null, sd: null, min: null, max: null, n: 0 };
  const m = x.reduce((a, b) => a + b, 0) / x.length;
  const sd = x.length > 1
    ? Math.sqrt(x.reduce((a, b) => a + (b - m) ** 2, 0) / (x.length - 1))
    : null;
  return { mean: m, sd, min: Math.min(...x), max: Math.max(...x), n: x.length };
}

export const cyclesKind: RunKind<typeof CyclesRequest> = {
  kind: "cycles",
  path: "/v1/cycles",
  algorithmVersion: "1",
  tag: "Solar cycles",
  summary: "Cycle table, extrema and cycle phase of a sunspot series",
  description: "Finds the minima and maxima of the smoothed series (13-month smoothing by " +
    "default for monthly data; a minimum needs the given prominence and separation) and " +
    "tabulates every cycle from one minimum to the next: start, maximum and end (dates and " +
    "smoothed values), length, rise and decline times, amplitude (smoothed maximum), mean and " +
    "time-integrated activity of the unsmoothed values. The last cycle is marked in progress: " +
    "no end is invented, and its maximum stays provisional until the series has fallen from " +
    "it. Numbering follows the optional anchor (cycle K began at the minimum nearest date D). " +
    "Outputs: the smoothed series, the cycle phase (0 at a cycle's minimum, 1 at the next; " +
    "null in the cycle in progress) and years since the latest minimum.",
  request: CyclesRequest,
  result: LegacyResult,
  estimateSeconds: () => 0.1,
  compute(params, ctx) {
    const an = analyseCycles(ctx, params);
    const { grid, rows, series: s } = an;
    const res = grid.resolution;
    const phase = cyclePhase(grid.time, rows);
    const complete = rows.filter((r) => !r.inProgress);
    const summary = {
      complete_cycles: complete.length,
      in_progress: rows.some((r) => r.inProgress),
      length_years: meanSd(complete.map((r) => r.length!)),
      rise_years: meanSd(complete.map((r) => r.riseTime!)),
      amplitude: meanSd(complete.map((r) => r.amplitude!)),
    };
    const warnings = [...an.warnings];
    if (complete.length === 0) {
      warnings.push("no complete cycle: the series holds fewer than two cycle minima");
    }
    return {
      input: {
        id: s.id,
        name: s.name,
        quantity: s.quantity,
        version: s.version,
        resolution: res,
        n: s.n,
      },
      smoothing: an.smoothing,
      rule: {
        min_separation_years: params.min_separation_years,
        prominence: an.prominence,
        prominence_default: params.prominence === undefined,
      },
      cycles: rows.map((r) => cycleRowJson(r, res)),
      extrema: an.extrema.map((e) => ({
        kind: e.kind,
        date: iso(e.time, res),
        decimal_year: e.time,
        value: e.value,
        prominence: e.prominence,
        provisional: e.provisional,
      })),
      summary,
      outputs: {
        smoothed: {
          name: `${s.name} (${an.smoothing === "none" ? "unsmoothed" : an.smoothing} for cycles)`,
          quantity: s.quantity,
          units: s.units,
          time: Array.from(grid.time),
          value: nulls(an.smoothed),
          description: `series ${s.id} smoothed (${an.smoothing}) as used to find cycle extrema`,
        },
        phase: {
          name: `${s.name} cycle phase`,
          quantity: "other",
          units: "1",
          time: Array.from(grid.time),
          value: nulls(phase.phase),
          description: "fraction of the cycle elapsed: 0 at its starting minimum, 1 at the next " +
            "minimum; null before the first minimum and in the cycle in progress",
        },
        since_minimum: {
          name: `${s.name} years since cycle minimum`,
          quantity: "other",
          units: "yr",
          time: Array.from(grid.time),
          value: nulls(phase.sinceMinimum),
          description: "years since the latest cycle minimum; null before the first",
        },
        cycle: {
          name: `${s.name} cycle`,
          quantity: "other",
          units: "1",
          time: Array.from(grid.time),
          value: Array.from(phase.cycleIndex, (k) => {
            if (k === 0) return null;
            return rows[k - 1].number ?? k;
          }),
          description: "the cycle each time belongs to: its number when an anchor numbers the " +
            "cycles, else its position in the table; null before the first minimum",
        },
      },
      warnings,
      cautions: [CAUTION_SCALE, CAUTION_CYCLE_REVIEW],
    };
  },
};
