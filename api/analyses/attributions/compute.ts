/**
 * Adapter of the "attributions" analysis: the climate series and the regressors on one
 * gap-free axis, the regression with a lag per regressor from core
 * (core/climate/attribution_regression.ts), the solar summary and the result.
 *
 * @module
 */
import { InputProblem, type OutputSeries, type RunContext } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import { refId } from "../../schemas/series_ref.ts";
import {
  attributionRegression,
  type AttributionRegressor,
  type AttributionResult,
  cycleAmplitudeEstimate,
} from "../../../core/climate/mod.ts";
import { type AnalysisAxis, analysisAxis } from "../common/analysis_axis.ts";
import { solarCautions } from "../common/cautions.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { solarSeriesFromRun } from "../common/solar_series_from_run.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import type { AttributionParams } from "./request.ts";
import type { AttributionResultIn } from "./result.ts";

/** Pointer of regressor k's series or run in the request. */
const sourcePointer = (p: AttributionParams, k: number) =>
  `/regressors/${k}/${p.regressors[k].run ? "run" : "series"}`;

/** The regressors' series, after checking names, lag ranges and roles; and the solar one. */
function regressorSeries(p: AttributionParams, ctx: RunContext) {
  const series = p.regressors.map((r, k) => {
    if ((r.series === undefined) === (r.run === undefined)) {
      throw new InputProblem(`/regressors/${k}/series`, "give exactly one of series or run");
    }
    return r.run
      ? solarSeriesFromRun(ctx, r.run, `/regressors/${k}/run`)
      : ctx.series(refId(r.series!));
  });
  const names = new Set<string>();
  p.regressors.forEach((r, k) => {
    if (names.has(r.name) || (p.trend && r.name === "trend")) {
      throw new InputProblem(`/regressors/${k}/name`, `regressor name ${r.name} is used twice`);
    }
    names.add(r.name);
    if (r.max_lag < r.min_lag) {
      throw new InputProblem(`/regressors/${k}/max_lag`, "max_lag is smaller than min_lag");
    }
  });
  const solar = p.regressors.flatMap((r, k) => (r.role === "solar" ? [k] : []));
  if (solar.length > 1) {
    throw new InputProblem(`/regressors/${solar[1]}/role`, "only one regressor may be solar");
  }
  return { series, solarIndex: solar.length === 1 ? solar[0] : null };
}

/** Refuse lags and sample sizes the common axis cannot carry, and constant series. */
function checkSample(p: AttributionParams, axis: AnalysisAxis): number {
  const n = axis.values[0].length;
  const maxLag = Math.max(...p.regressors.map((r) => r.max_lag));
  if (3 * maxLag > n) {
    const k = p.regressors.findIndex((r) => r.max_lag === maxLag);
    throw new InputProblem(
      `/regressors/${k}/max_lag`,
      `a lag of ${maxLag} ${axis.lagUnit} is more than a third of the ${n} common periods`,
    );
  }
  const coefs = p.regressors.length + (p.trend ? 1 : 0) + 1;
  if (n - maxLag < 10 * coefs) {
    throw new InputProblem(
      "/regressors",
      `${coefs} coefficients need at least ${10 * coefs} observations (10 per coefficient); ` +
        `the common axis leaves ${n - maxLag} after the largest lag`,
      { coefficients: coefs, observations: n - maxLag },
    );
  }
  p.regressors.forEach((r, k) => {
    const v = axis.values[k + 1];
    if (v.every((x) => x === v[0])) {
      throw new InputProblem(`/regressors/${k}/series`, `regressor ${r.name} is constant`);
    }
  });
  const y = axis.values[0];
  if (y.every((x) => x === y[0])) {
    throw new InputProblem("/climate", "the climate series is constant");
  }
  if (p.hac_lags !== undefined && p.hac_lags >= n - maxLag) {
    throw new InputProblem(
      "/hac_lags",
      `hac_lags must be below the ${n - maxLag} fitted observations`,
    );
  }
  return n;
}

/** The regressors as core takes them, the trend last. */
function coreRegressors(p: AttributionParams, axis: AnalysisAxis): AttributionRegressor[] {
  const regressors: AttributionRegressor[] = p.regressors.map((r, k) => ({
    name: r.name,
    values: axis.values[k + 1],
    minLag: r.min_lag,
    maxLag: r.max_lag,
  }));
  if (p.trend) {
    regressors.push({
      name: "trend",
      values: Float64Array.from(axis.time, (t) => t - axis.time[0]),
      minLag: 0,
      maxLag: 0,
    });
  }
  return regressors;
}

/** The solar sensitivity and the implied solar maximum-minus-minimum response. */
function solarSummary(
  p: AttributionParams,
  k: number,
  fit: AttributionResult,
  axis: AnalysisAxis,
  climate: StoredSeries,
  solar: StoredSeries,
): NonNullable<AttributionResultIn["solar"]> {
  const c = fit.coefficients[k + 1];
  const lag = fit.lags[p.regressors[k].name];
  const t0 = fit.firstIndex;
  const xs = axis.values[k + 1].subarray(t0 - lag, t0 - lag + fit.n);
  const amp = p.solar_cycle_amplitude ??
    withInputPointers({ "*": sourcePointer(p, k) }, () => cycleAmplitudeEstimate(xs));
  return {
    regressor: p.regressors[k].name,
    sensitivity: c.estimate,
    sensitivity_ci: [c.lower, c.upper],
    sensitivity_units: `${climate.units} per ${solar.units}`,
    lag: lag,
    lag_unit: axis.lagUnit,
    lag_support: fit.lagProfiles[k].support,
    cycle_amplitude: amp,
    cycle_amplitude_units: solar.units,
    cycle_amplitude_source: p.solar_cycle_amplitude === undefined
      ? "estimated: 2√2 × detrended standard deviation of the solar regressor over the sample"
      : "given in the request",
    max_minus_min: c.estimate * amp,
    max_minus_min_ci: [c.lower * amp, c.upper * amp],
    max_minus_min_units: climate.units,
    max_minus_min_note: "sensitivity × peak-to-trough solar amplitude; the interval carries " +
      "the sensitivity's uncertainty only (the amplitude is taken as exact)",
  };
}

/** Contribution of every regressor, the fitted values and the residuals over the sample. */
function outputs(
  regressors: AttributionRegressor[],
  fit: AttributionResult,
  climate: StoredSeries,
  time: number[],
): AttributionResultIn["outputs"] {
  const series = (name: string, v: Float64Array, description?: string): OutputSeries => ({
    name,
    quantity: climate.quantity,
    units: climate.units,
    time,
    value: Array.from(v),
    ...(description ? { description } : {}),
  });
  const out: Record<string, OutputSeries> = {};
  for (const r of regressors) {
    out[`contribution_${r.name}`] = series(
      `${r.name} contribution to ${climate.name}`,
      fit.contributions[r.name],
      "β × (lagged regressor − its mean over the fitted sample)",
    );
  }
  return {
    ...out,
    fitted: series(`${climate.name} (fitted)`, fit.fitted),
    residuals: series(`${climate.name} (residuals)`, fit.residuals),
  };
}

/** Regress the climate series on the regressors, each at its AIC-chosen lag. */
export function computeAttributions(
  p: AttributionParams,
  ctx: RunContext,
): AttributionResultIn {
  const climate = ctx.series(refId(p.climate));
  const { series, solarIndex } = regressorSeries(p, ctx);
  const axis = analysisAxis(
    [climate, ...series],
    ["/climate", ...p.regressors.map((_, k) => sourcePointer(p, k))],
    p.resolution,
    p,
    10,
  );
  checkSample(p, axis);
  const regressors = coreRegressors(p, axis);
  const fit = withInputPointers({
    regressors: (e) =>
      e.index === undefined || e.index >= p.regressors.length
        ? "/regressors"
        : sourcePointer(p, e.index),
    y: "/climate",
    maxLags: "/hac_lags",
    "*": "/regressors",
  }, () =>
    attributionRegression(axis.values[0], regressors, {
      errors: p.errors,
      hacLags: p.hac_lags,
      shouldStop: ctx.cancelled,
    }));
  const t0 = fit.firstIndex;
  const sampleTime = Array.from(axis.time.subarray(t0, t0 + fit.n));
  const unitsOf = (k: number) => (k < series.length ? series[k].units : "yr");
  return {
    resolution: axis.resolution,
    lag_unit: axis.lagUnit,
    n: fit.n,
    start_period: axis.start_period,
    end_period: axis.end_period,
    first_fitted_time: sampleTime[0],
    errors: p.errors,
    lag_search: fit.search,
    fits_evaluated: fit.fitsEvaluated,
    aic: fit.aic,
    r_squared: fit.rSquared,
    residual_rho: fit.residualRho,
    residual_lag1_after_model: fit.residualLag1,
    // infinite for exactly collinear regressors (documented null)
    collinearity_condition_number: undefinedAsNull(fit.collinearity),
    max_regressor_correlation: fit.maxCorrelation,
    coefficients: fit.coefficients.map((c, j) => ({
      name: c.name,
      lag: c.lag,
      lag_unit: c.lag === null ? null : axis.lagUnit,
      estimate: c.estimate,
      standard_error: c.standardError,
      ci_lower: c.lower,
      ci_upper: c.upper,
      p_value: c.pValue,
      units: j === 0 ? climate.units : `${climate.units} per ${unitsOf(j - 1)}`,
    })),
    lags: fit.lags,
    // AIC is infinite where the regressors are collinear at a lag combination (documented null)
    lag_surface: fit.lagProfiles.map((pr) => ({
      name: pr.name,
      lags: pr.lags,
      aic: undefinedAsNull(pr.aic),
      support: pr.support,
    })),
    lag_grid: fit.lagGrid && {
      regressors: fit.lagProfiles.map((pr) => pr.name),
      lags: fit.lagGrid.lags,
      aic: undefinedAsNull(fit.lagGrid.aic),
    },
    solar: solarIndex === null
      ? null
      : solarSummary(p, solarIndex, fit, axis, climate, series[solarIndex]),
    outputs: outputs(regressors, fit, climate, sampleTime),
    warnings: [...axis.warnings, ...fit.warnings],
    cautions: [
      ...solarCautions(solarIndex === null ? [] : [series[solarIndex]]),
      "Coefficients measure association given the chosen regressors and lags; a missing or " +
      "mis-specified regressor changes them.",
    ],
  };
}
