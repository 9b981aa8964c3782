/**
 * Run kind "smoothing": the 13-month smoothed sunspot number, a centred running mean, or a
 * Gaussian kernel smoother over a monthly or annual series, saved as a new series
 * (core/cycles/smoothed_13_month.ts, running_mean.ts, gaussian_smoother.ts).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import type { RunKind } from "../runs/kind.ts";
import { refId, SeriesRef } from "../schemas/series_ref.ts";
import {
  gaussianWeights,
  runningMeanWeights,
  SMOOTHED_13_MONTH_WEIGHTS,
  toRegularGrid,
  weightedMovingAverageUncertainty,
} from "../../core/cycles/mod.ts";
import { activityGrid, applySmoothing, iso, nulls } from "./cycles_common.ts";
import { InputProblem } from "../runs/kind.ts";

export const SmoothingRequest = z.object({
  series: SeriesRef,
  method: z.enum(["13_month", "running_mean", "gaussian"]).default("13_month").openapi({
    description: "`13_month`: the standard 13-month smoothed sunspot number (half weights at " +
      "±6 months; monthly series); `running_mean`: centred mean over `window` samples (an even " +
      "window averages the two straddling means: half weights at both ends); `gaussian`: " +
      "Gaussian kernel of standard deviation `sigma` samples, truncated at 3 sigma",
    example: "13_month",
  }),
  window: z.number().int().min(1).max(1200).default(13).openapi({
    description: "Running-mean window, samples (months or years)",
    example: 13,
  }),
  sigma: z.number().positive().max(600).default(6).openapi({
    description: "Gaussian standard deviation, samples",
    example: 6,
  }),
  max_missing_weight: z.number().min(0).max(0.5).default(0).openapi({
    description: "Largest share of a window's weight that may fall on missing samples (the " +
      "present ones are then reweighted); above it the value is null. 0 (default): complete " +
      "windows only, so no value is biased by a gap",
    example: 0,
  }),
}).openapi("SmoothingRequest");

export const smoothingKind: RunKind<typeof SmoothingRequest> = {
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
  autoSave: ["smoothed"],
  estimateSeconds: () => 0.1,
  compute(params, ctx) {
    const s = ctx.series(refId(params.series));
    const grid = activityGrid(s);
    const smoothed = applySmoothing(grid, params.method, params, "/method");
    const value = nulls(smoothed);
    const defined = value.filter((v) => v !== null).length;
    if (defined < 2) {
      throw new InputProblem(
        "/series",
        `only ${defined} smoothed value(s) are defined: gaps leave no complete window; allow ` +
          "some missing weight with max_missing_weight or choose a shorter window",
        { defined },
      );
    }
    const missing = grid.value.reduce((c, v) => c + (Number.isNaN(v) ? 1 : 0), 0);
    const weights = params.method === "13_month"
      ? [...SMOOTHED_13_MONTH_WEIGHTS]
      : params.method === "running_mean"
      ? runningMeanWeights(params.window)
      : null;
    const kernel = weights ?? gaussianWeights(params.sigma, 3);
    const uncertainty = s.uncertainty
      ? nulls(weightedMovingAverageUncertainty(
        grid.value,
        toRegularGrid(s.time, s.uncertainty, grid.resolution).value,
        kernel,
        { maxMissingWeight: params.max_missing_weight },
      ))
      : null;
    const label = params.method === "13_month"
      ? "13-month smoothed"
      : params.method === "running_mean"
      ? `${params.window}-${grid.resolution === "monthly" ? "month" : "year"} running mean`
      : `Gaussian-smoothed (sigma ${params.sigma} ${
        grid.resolution === "monthly" ? "months" : "years"
      })`;
    const warnings: string[] = [];
    if (missing > 0) {
      warnings.push(
        `${missing} of ${grid.value.length} ${
          grid.resolution === "monthly" ? "months" : "years"
        } are missing; windows touching them follow max_missing_weight = ${params.max_missing_weight}`,
      );
    }
    return {
      input: { id: s.id, name: s.name, quantity: s.quantity, resolution: grid.resolution, n: s.n },
      method: params.method,
      parameters: {
        window: params.method === "running_mean" ? params.window : null,
        sigma: params.method === "gaussian" ? params.sigma : null,
        truncate_sigma: params.method === "gaussian" ? 3 : null,
        max_missing_weight: params.max_missing_weight,
      },
      kernel_weights: weights,
      grid: {
        start: iso(grid.time[0], grid.resolution),
        end: iso(grid.time[grid.time.length - 1], grid.resolution),
        points: grid.value.length,
        missing,
      },
      defined,
      outputs: {
        smoothed: {
          name: `${s.name} (${label})`,
          quantity: s.quantity,
          units: s.units,
          time: Array.from(grid.time),
          value,
          ...(uncertainty ? { uncertainty } : {}),
          description: `${label} values of series ${s.id}; null where the window is incomplete` +
            (uncertainty ? "; uncertainties propagated as independent errors" : ""),
        },
      },
      warnings,
    };
  },
};
