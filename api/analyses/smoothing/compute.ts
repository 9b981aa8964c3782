/**
 * Adapter of the "smoothing" analysis: the input on its calendar grid, the smoother and its
 * uncertainty from core (core/cycles/smoothed_13_month.ts, running_mean.ts,
 * gaussian_smoother.ts, weighted_moving_average.ts), and the result.
 *
 * @module
 */
import type { RunContext } from "../../runs/kind.ts";
import { InputProblem } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import {
  gaussianWeights,
  runningMeanWeights,
  SMOOTHED_13_MONTH_WEIGHTS,
  toRegularGrid,
  weightedMovingAverageUncertainty,
} from "../../../core/cycles/mod.ts";
import { formatIsoTime } from "../../../core/time/mod.ts";
import { activityGrid } from "../common/activity_grid.ts";
import { applySmoothing } from "../common/smoothing_method.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import type { SmoothingParams } from "./request.ts";
import type { SmoothingResultIn } from "./result.ts";

/** Smooth the input series as asked. */
export function computeSmoothing(params: SmoothingParams, ctx: RunContext): SmoothingResultIn {
  const s = ctx.series(refId(params.series));
  const grid = activityGrid(s);
  const smoothed = applySmoothing(grid, params.method, params, "/method");
  const value = undefinedAsNull(smoothed);
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
    ? undefinedAsNull(weightedMovingAverageUncertainty(
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
      start: formatIsoTime(grid.time[0], grid.resolution),
      end: formatIsoTime(grid.time[grid.time.length - 1], grid.resolution),
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
}
