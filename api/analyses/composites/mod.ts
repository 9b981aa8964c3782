/**
 * Analysis "composites": superposed epoch analysis of a climate series around epochs (user
 * dates, or the maxima or minima of a cycle-table run), with a bootstrap band and
 * significance against random epochs (core/climate/superposed_epoch.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { CompositeRequest } from "./request.ts";
import { CompositeResult } from "./result.ts";
import { computeComposites } from "./compute.ts";
import { compositesChart } from "./chart.ts";
import { estimateCompositesSeconds } from "./estimate.ts";

export const compositeKind = defineAnalysis({
  kind: "composites",
  path: "/v1/composites",
  algorithmVersion: "3",
  tag: "Solar–climate linkage",
  summary: "Superposed epoch composite around solar maxima, minima or given dates",
  description: "Averages the climate series in a window around each epoch (offsets in " +
    "samples of the monthly or annual axis), with a bootstrap 95 % band over epochs and " +
    "significance against random epochs drawn with the same minimum spacing as the real " +
    "ones: per-offset p-values and a family-wise p-value for the largest |composite| in the " +
    "window. On a monthly axis each calendar month's mean is removed first (`deseasonalise`, " +
    "on by default for absolute quantities such as `temperature`): epochs fall in particular " +
    "months and random epochs in others, so a seasonal cycle left in would bias both the " +
    "composite and its p-values; a strong annual cycle is warned about.",
  request: CompositeRequest,
  result: CompositeResult,
  runRefs: (p) => (p.cycle_run ? [p.cycle_run] : []),
  estimateSeconds: estimateCompositesSeconds,
  compute: computeComposites,
  chart: compositesChart,
});
