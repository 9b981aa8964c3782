/**
 * The smoothers of a monthly or annual activity series (the 13-month smoothing, a running
 * mean, a Gaussian kernel, or none), shared by the smoothing analysis and by cycle detection:
 * the request enum and its application with the too-short and wrong-resolution checks.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { InputProblem } from "../../runs/kind.ts";
import {
  gaussianSmooth,
  gaussianWeights,
  type RegularGrid,
  runningMean,
  runningMeanWeights,
  smoothed13Month,
  SMOOTHED_13_MONTH_WEIGHTS,
} from "../../../core/cycles/mod.ts";

export const SmoothingMethod = z.enum(["13_month", "running_mean", "gaussian", "none"]);
export type SmoothingMethodName = z.output<typeof SmoothingMethod>;

/** The parameters of the running mean and Gaussian smoothers and their missing-data rule. */
export interface SmootherParams {
  window: number;
  sigma: number;
  max_missing_weight: number;
}

/** Samples the smoother's kernel spans (a series shorter than it has no smoothed value). */
function kernelLength(method: SmoothingMethodName, p: SmootherParams): number {
  if (method === "13_month") return SMOOTHED_13_MONTH_WEIGHTS.length;
  if (method === "running_mean") return runningMeanWeights(p.window).length;
  if (method === "gaussian") return gaussianWeights(p.sigma, 3).length;
  return 1;
}

/**
 * Apply a smoothing to a grid, refusing series shorter than the kernel (pointer "/series")
 * and the 13-month smoothing on annual data (pointer at `methodPointer`).
 */
export function applySmoothing(
  grid: RegularGrid,
  method: SmoothingMethodName,
  p: SmootherParams,
  methodPointer: string,
): Float64Array {
  if (method === "13_month" && grid.resolution !== "monthly") {
    throw new InputProblem(
      methodPointer,
      "the 13-month smoothing needs monthly values; this series is annual (use running_mean, " +
        "gaussian or none)",
    );
  }
  const span = kernelLength(method, p);
  const n = grid.value.length;
  if (n < span) {
    throw new InputProblem(
      "/series",
      `series too short for the requested window: ${method} needs at least ${span} ` +
        `consecutive ${grid.resolution === "monthly" ? "months" : "years"}, the series spans ${n}`,
      { window_points: span, series_points: n },
    );
  }
  const opts = { maxMissingWeight: p.max_missing_weight };
  if (method === "13_month") return smoothed13Month(grid.value, opts);
  if (method === "running_mean") return runningMean(grid.value, p.window, opts);
  if (method === "gaussian") return gaussianSmooth(grid.value, p.sigma, opts);
  return Float64Array.from(grid.value);
}
