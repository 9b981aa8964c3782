/**
 * Analysis "smoothing": the 13-month smoothed sunspot number, a centred running mean, or a
 * Gaussian kernel smoother over a monthly or annual series, saved as a new series
 * (core/cycles/smoothed_13_month.ts, running_mean.ts, gaussian_smoother.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { SmoothingRequest } from "./request.ts";
import { SmoothingResult } from "./result.ts";
import { computeSmoothing } from "./compute.ts";
import { smoothingChart } from "./chart.ts";
import { estimateSmoothingSeconds } from "./estimate.ts";

export const smoothingKind = defineAnalysis({
  kind: "smoothing",
  path: "/v1/smoothing",
  algorithmVersion: "1",
  tag: "Solar cycles",
  summary: "13-month smoothed sunspot number, running mean or Gaussian smoother",
  description: "Smooths a monthly or annual series on its calendar grid. Missing months are " +
    "gaps: a window with more missing weight than `max_missing_weight` gives null, never a " +
    "value biased by the gap, and the first and last half-windows are null (the 13-month " +
    "smoothing is undefined for the first and last 6 months). Uncertainties, when the input " +
    "has them, are propagated as independent errors (a lower bound for correlated ones). " +
    "The `smoothed` output is saved as a new series derived from the run.",
  request: SmoothingRequest,
  result: SmoothingResult,
  autoSave: ["smoothed"],
  estimateSeconds: estimateSmoothingSeconds,
  compute: computeSmoothing,
  chart: smoothingChart,
});
