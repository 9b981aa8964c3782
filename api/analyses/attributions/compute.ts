/**
 * Adapter of the "attributions" analysis: the climate series and the regressors on one
 * gap-free axis, the regression with a lag per regressor from core
 * (core/climate/attribution_regression.ts), the solar summary and the result.
 *
 * @module
 */
import {
  CancelledError,
  InputProblem,
  type OutputSeries,
  type RunContext,
} from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import { refId } from "../../schemas/series_ref.ts";
import {
  attributionRegression,
  type AttributionRegressor,
  type AttributionResult,
  combineLagSearchChunks,
  cycleAmplitudeEstimate,
  type LagSearchChunkInput,
  type LagSearchChunkOutput,
  planLagSearchTest,
  sidakAdjusted,
} from "../../../core/climate/mod.ts";
import { type AnalysisAxis, analysisAxis } from "../common/analysis_axis.ts";
import { solarCautions } from "../common/cautions.ts";
import {
  annualCycleLeft,
  deseasonalisedQuantity,
  seasonalAxis,
  type SeasonalInput,
} from "../common/seasonal_cycle.ts";
import { LAG_SEARCH_CHUNK } from "./tasks.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { solarSeriesFromRun } from "../common/solar_series_from_run.ts";
import { solarEnsembleFromRun } from "../common/solar_ensemble.ts";
import { attributionEnsembleSpread } from "./ensemble_spread.ts";
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

type LagSearchJson = NonNullable<AttributionResultIn["solar"]>["lag_search_significance"];

/**
 * The solar coefficient's p-value with and without paying for the AIC search of its lag: the
 * naive one (the lag taken as fixed), the Šidák bound over the lags searched, and (with
 * `lag_search_test: phase`) the Monte Carlo over the same search on phase surrogates of the
 * solar regressor, in chunks mapped over the worker pool.
 */
async function lagSearchSignificance(
  p: AttributionParams,
  k: number,
  y: Float64Array,
  regressors: AttributionRegressor[],
  fit: AttributionResult,
  seasonalLeft: string[],
  ctx: RunContext,
): Promise<{ json: LagSearchJson; warnings: string[] }> {
  const r = p.regressors[k];
  const m = r.max_lag - r.min_lag + 1;
  const naive = fit.coefficients[k + 1].pValue;
  const sidak = sidakAdjusted(naive, m);
  const others = p.regressors.filter((q, j) => j !== k && q.max_lag > q.min_lag);
  const othersNote = others.length
    ? ` The p-values of ${
      others.map((q) => q.name).join(", ")
    } in \`coefficients\` are naive: not adjusted for their own lag searches.`
    : "";
  let pSearch: number | null = null, threshold: number | null = null;
  const method = m === 1 ? "fixed_lag" : p.lag_search_test;
  if (method === "phase") {
    const mc = await searchMonteCarlo(p, k, y, regressors, fit, ctx);
    pSearch = mc.pValue;
    threshold = mc.naiveThreshold05;
  }
  const g = (x: number) => x.toPrecision(2);
  let text: string;
  if (seasonalLeft.length > 0) {
    text = `Trust none of the p-values here: the ${seasonalLeft.join(" and ")} series keeps a ` +
      "strong annual cycle as analysed, which a regression on series without one cannot " +
      "absorb and which no test here models (the surrogates of the solar regressor have no " +
      "annual cycle). Remove it (deseasonalise: true) and read that run's search-adjusted " +
      "p-value.";
  } else if (method === "fixed_lag") {
    text = `The solar lag was fixed (${r.min_lag}): there is no search to pay for, and ` +
      `p_naive = ${g(naive)} is the coefficient's p-value under the ${p.errors} error model.`;
  } else if (method === "phase") {
    text = `Use p_search = ${g(pSearch!)}: it repeats the AIC search over the ${m} solar ` +
      `lags (the other regressors at their chosen lags, the same sample) on ${p.surrogates} ` +
      "phase surrogates of the solar regressor and so pays for choosing the lag." +
      ` p_naive = ${g(naive)} treats the chosen lag as if it had been fixed ` +
      "in advance and is too small after a search (the search also picks the lag whose " +
      `regressor best absorbs slow noise). p_sidak = ${g(sidak)} treats the ${m} lags as ` +
      "independent tests: conservative about the search alone, but it keeps the error " +
      `model's assumptions, which the surrogates do not need (autocorrelation the ` +
      `${p.errors} errors miss makes p_search larger than p_sidak).`;
  } else {
    text = `Use p_sidak = ${g(sidak)}: it treats the ${m} solar lags searched as ` +
      "independent tests, conservative about the search (neighbouring lags are correlated) " +
      `but resting on the ${p.errors} error model like p_naive = ${g(naive)}, which treats ` +
      "the chosen lag as fixed and is too small after a search. lag_search_test: phase " +
      "pays for the search with surrogates that keep the solar regressor's whole " +
      "autocorrelation.";
  }
  const warnings: string[] = [];
  const adjusted = pSearch ?? sidak;
  if (method !== "fixed_lag" && naive < 0.05 && adjusted >= 0.05) {
    warnings.push(
      `the solar coefficient is significant only if its AIC-chosen lag (${
        fit.lags[r.name]
      }) is taken as fixed (p ${g(naive)}); paying for the search over ${m} lags, p = ${
        g(adjusted)
      } (${method === "phase" ? "Monte Carlo" : "Šidák bound"})`,
    );
  }
  return {
    json: {
      lags_searched: m,
      p_naive: naive,
      p_search: pSearch,
      p_sidak: sidak,
      method,
      surrogates: method === "phase" ? p.surrogates : null,
      seed: method === "phase" ? p.seed : null,
      naive_p_for_5_percent: threshold,
      which_to_trust: text + othersNote,
    },
    warnings,
  };
}

/** The Monte Carlo over the lag search, in a fixed split of chunks over the worker pool. */
async function searchMonteCarlo(
  p: AttributionParams,
  k: number,
  y: Float64Array,
  regressors: AttributionRegressor[],
  fit: AttributionResult,
  ctx: RunContext,
) {
  // the other regressors stay at their chosen lags and the sample stays the fitted one: each
  // surrogate searches the solar lag again, one fit per lag
  const held = regressors.map((r, j) =>
    j === k ? r : { ...r, minLag: fit.lags[r.name], maxLag: fit.lags[r.name] }
  );
  const plan = withInputPointers({ "*": "/regressors" }, () =>
    planLagSearchTest(y, held, k, {
      errors: p.errors,
      hacLags: p.hac_lags,
      seed: p.seed,
      firstIndex: fit.firstIndex,
    }));
  // a fixed split for given parameters (the answer never depends on the pool size): up to 16
  // chunks of at least 25 surrogates, in rounds of 8 so that progress moves and a cancel is
  // seen between rounds
  const per = Math.ceil(p.surrogates / Math.min(16, Math.ceil(p.surrogates / 25)));
  const chunks: LagSearchChunkInput[] = [];
  for (let s = 0; s < p.surrogates; s += per) {
    chunks.push({ plan, start: s, end: Math.min(p.surrogates, s + per) });
  }
  const outs: LagSearchChunkOutput[] = [];
  for (let c = 0; c < chunks.length; c += 8) {
    if (ctx.cancelled()) throw new CancelledError();
    outs.push(
      ...await ctx.parallel<LagSearchChunkInput, LagSearchChunkOutput>(
        LAG_SEARCH_CHUNK,
        chunks.slice(c, c + 8),
      ),
    );
    ctx.progress(0.1 + (0.85 * outs.length) / chunks.length);
  }
  if (ctx.cancelled()) throw new CancelledError();
  return combineLagSearchChunks(fit.coefficients[k + 1].pValue, outs);
}

/** The solar sensitivity and the implied solar maximum-minus-minimum response. */
function solarSummary(
  p: AttributionParams,
  k: number,
  fit: AttributionResult,
  axis: AnalysisAxis,
  climate: StoredSeries,
  solar: StoredSeries,
  lagSearch: LagSearchJson,
): NonNullable<AttributionResultIn["solar"]> {
  const c = fit.coefficients[k + 1];
  const lag = fit.lags[p.regressors[k].name];
  const xs = solarSample(p, k, fit, axis);
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
    lag_search_significance: lagSearch,
  };
}

/** Contribution of every regressor, the fitted values and the residuals over the sample. */
function outputs(
  regressors: AttributionRegressor[],
  fit: AttributionResult,
  climate: StoredSeries,
  time: number[],
  deseasonalised: boolean,
): AttributionResultIn["outputs"] {
  const series = (name: string, v: Float64Array, description?: string): OutputSeries => ({
    name,
    quantity: deseasonalisedQuantity(climate.quantity, deseasonalised),
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

/** The common axis, its seasonal step, the checks and the regression for given series. */
function regress(
  p: AttributionParams,
  climate: StoredSeries,
  series: StoredSeries[],
  ctx: RunContext,
) {
  const onAxis = analysisAxis(
    [climate, ...series],
    ["/climate", ...p.regressors.map((_, k) => sourcePointer(p, k))],
    p.resolution,
    p,
    10,
  );
  const labels: SeasonalInput[] = [
    { input: "climate", name: climate.name, quantity: climate.quantity },
    ...p.regressors.map((r, k) => ({
      input: r.name,
      name: series[k].name,
      quantity: series[k].quantity,
    })),
  ];
  const { axis, seasonal } = seasonalAxis(onAxis, labels, p.deseasonalise);
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
  return { axis, labels, seasonal, regressors, fit };
}

/** The solar regressor's values over the fitted sample, at its chosen lag. */
function solarSample(p: AttributionParams, k: number, fit: AttributionResult, axis: AnalysisAxis) {
  const lag = fit.lags[p.regressors[k].name];
  const t0 = fit.firstIndex;
  return axis.values[k + 1].subarray(t0 - lag, t0 - lag + fit.n);
}

/** Regress the climate series on the regressors, each at its AIC-chosen lag. */
export async function computeAttributions(
  p: AttributionParams,
  ctx: RunContext,
): Promise<AttributionResultIn> {
  const climate = ctx.series(refId(p.climate));
  const { series, solarIndex } = regressorSeries(p, ctx);
  const { axis, labels, seasonal, regressors, fit } = regress(p, climate, series, ctx);
  ctx.progress(0.1); // inputs checked and the regression fitted; the lag search test follows
  const seasonalLeft = annualCycleLeft(axis.resolution, axis.time, axis.values, labels);
  const solarRun = solarIndex === null ? undefined : p.regressors[solarIndex].run;
  const ensemble = solarRun
    ? solarEnsembleFromRun(ctx, solarRun, series[solarIndex!], sourcePointer(p, solarIndex!))
    : null;
  // every member through the same axis, seasonal step, lag search and regression
  const spread = ensemble
    ? attributionEnsembleSpread(ctx, ensemble, solarIndex!, p.regressors[solarIndex!].name, (s) => {
      const r = regress(p, climate, s, ctx);
      const amplitude = p.solar_cycle_amplitude ??
        withInputPointers(
          { "*": sourcePointer(p, solarIndex!) },
          () => cycleAmplitudeEstimate(solarSample(p, solarIndex!, r.fit, r.axis)),
        );
      return { fit: r.fit, amplitude };
    }, series)
    : null;
  ctx.progress(0.1);
  const t0 = fit.firstIndex;
  const sampleTime = Array.from(axis.time.subarray(t0, t0 + fit.n));
  const unitsOf = (k: number) => (k < series.length ? series[k].units : "yr");
  const lagSearch = solarIndex === null ? null : await lagSearchSignificance(
    p,
    solarIndex,
    axis.values[0],
    regressors,
    fit,
    seasonalLeft,
    ctx,
  );
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
    seasonal_cycle: seasonal.json,
    solar: solarIndex === null || lagSearch === null
      ? null
      : solarSummary(p, solarIndex, fit, axis, climate, series[solarIndex], lagSearch.json),
    outputs: outputs(regressors, fit, climate, sampleTime, seasonal.json.deseasonalise),
    // present only when the solar regressor has an ensemble, so other results keep their shape
    ...(spread ? { ensemble_spread: spread } : {}),
    warnings: [
      ...axis.warnings,
      ...seasonal.warnings,
      ...(seasonalLeft.length
        ? [
          "an annual cycle remains in the analysed series: no p-value of this regression can " +
          "be trusted; set deseasonalise to true",
        ]
        : []),
      ...fit.warnings,
      ...(lagSearch?.warnings ?? []),
    ],
    cautions: [
      ...solarCautions(solarIndex === null ? [] : [series[solarIndex]]),
      "Coefficients measure association given the chosen regressors and lags; a missing or " +
      "mis-specified regressor changes them.",
    ],
  };
}
