/**
 * Analysis "cycles": the table of solar cycles from a monthly or annual sunspot series, with
 * the extrema of the smoothed series and a cycle-phase series (core/cycles/cycle_extrema.ts,
 * cycle_table.ts, cycle_phase.ts, cycle_statistics.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { CyclesRequest } from "./request.ts";
import { CyclesResult } from "./result.ts";
import { computeCycles } from "./compute.ts";
import { cyclesChart } from "./chart.ts";
import { estimateCyclesSeconds } from "./estimate.ts";

export const cyclesKind = defineAnalysis({
  kind: "cycles",
  path: "/v1/cycles",
  // 2: standard deviations of the summary from d3-array (Welford), which may differ from
  // version 1's two-pass formula in the last bits
  algorithmVersion: "2",
  tag: "Solar cycles",
  featured: true,
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
  result: CyclesResult,
  estimateSeconds: estimateCyclesSeconds,
  compute: computeCycles,
  chart: cyclesChart,
});
