/**
 * Adapter of the "lag-correlations" analysis: the two series on one gap-free axis, the
 * preprocessing, the lag table with analytic significance and the surrogate test from core
 * (core/climate/lagged_correlation.ts, surrogate_lag_test.ts), and the result.
 *
 * @module
 */
import { CancelledError, InputProblem, type RunContext } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import { refId } from "../../schemas/series_ref.ts";
import {
  combineSurrogateChunks,
  laggedCorrelationTable,
  type LagRow,
  planSurrogateLagTest,
  type PreprocessOptions,
  preprocessSeries,
  type SurrogateChunkInput,
  type SurrogateChunkOutput,
  type SurrogateLagResult,
} from "../../../core/climate/mod.ts";
import { type AnalysisAxis, analysisAxis } from "../common/analysis_axis.ts";
import { solarCautions } from "../common/cautions.ts";
import {
  annualCycleLeft,
  deseasonalisedQuantity,
  seasonalAxis,
  type SeasonalInput,
} from "../common/seasonal_cycle.ts";
import { type FieldPointers, withInputPointers } from "../common/input_problem.ts";
import { solarSeriesFromRun } from "../common/solar_series_from_run.ts";
import { solarEnsembleFromRun } from "../common/solar_ensemble.ts";
import { lagEnsembleSpread } from "./ensemble_spread.ts";
import type { LagCorrelationParams } from "./request.ts";
import type { LagCorrelationResultIn } from "./result.ts";
import { SURROGATE_LAG_CHUNK } from "./tasks.ts";

/** The lag window of the request on the common axis. */
function lagWindow(p: LagCorrelationParams, axis: AnalysisAxis) {
  const maxLag = p.max_lag ?? (axis.resolution === "monthly" ? 36 : 5);
  const minLag = p.min_lag ?? -maxLag;
  const windowPointer = p.max_lag === undefined && p.min_lag !== undefined
    ? "/min_lag"
    : "/max_lag";
  if (minLag > maxLag) {
    throw new InputProblem("/min_lag", `min_lag ${minLag} is larger than max_lag ${maxLag}`);
  }
  const n = axis.time.length;
  const big = Math.max(Math.abs(minLag), Math.abs(maxLag));
  if (3 * big > n) {
    throw new InputProblem(
      windowPointer,
      `the lag window reaches ${big} ${axis.lagUnit}, more than a third of the ${n} ` +
        `overlapping ${axis.resolution} periods (at most ${Math.floor(n / 3)})`,
    );
  }
  return { minLag, maxLag, windowPointer };
}

/** Where the arguments of the core calls on (solar, climate) come from in the request. */
function pointersOf(windowPointer: string): FieldPointers {
  return {
    x: "/solar",
    y: "/climate",
    surrogateSource: "/solar",
    window: windowPointer,
    cutoffSamples: "/high_pass_cutoff_years",
    seed: "/seed",
  };
}

/** The solar and climate series of the request. */
function inputs(p: LagCorrelationParams, ctx: RunContext): [StoredSeries, StoredSeries] {
  if ((p.solar === undefined) === (p.solar_run === undefined)) {
    throw new InputProblem(
      "/solar",
      "give exactly one of solar (a series) or solar_run (a run id)",
    );
  }
  const solar = p.solar_run
    ? solarSeriesFromRun(ctx, p.solar_run, "/solar_run")
    : ctx.series(refId(p.solar!));
  return [solar, ctx.series(refId(p.climate))];
}

/** Both series with the requested trend or slow variations removed. */
function preprocessed(p: LagCorrelationParams, axis: AnalysisAxis, deseasonalised: boolean) {
  if (p.preprocess === "high_pass" && p.high_pass_cutoff_years === undefined) {
    throw new InputProblem("/high_pass_cutoff_years", "preprocess high_pass needs a cutoff");
  }
  const options: PreprocessOptions = {
    method: p.preprocess,
    cutoffSamples: p.high_pass_cutoff_years === undefined
      ? undefined
      : p.high_pass_cutoff_years / axis.step,
  };
  for (const [k, name] of [[0, "solar"], [1, "climate"]] as const) {
    const v = axis.values[k];
    if (v.every((x) => x === v[0])) {
      throw new InputProblem(
        `/${name}`,
        `the ${name} series is constant over the overlap` +
          (deseasonalised ? " once its monthly climatology is removed" : ""),
      );
    }
  }
  const [x, y] = (["/solar", "/climate"] as const).map((pointer, k) =>
    withInputPointers(
      { x: pointer, cutoffSamples: "/high_pass_cutoff_years" },
      () => preprocessSeries(axis.values[k], options),
    )
  );
  return { x, y, options };
}

/** The surrogate test, in a fixed split of chunks mapped over the worker pool. */
async function monteCarlo(
  p: LagCorrelationParams & { significance: "phase" | "ar1" },
  ctx: RunContext,
  series: { x: Float64Array; y: Float64Array; options: PreprocessOptions },
  axis: AnalysisAxis,
  window: { minLag: number; maxLag: number; windowPointer: string },
): Promise<SurrogateLagResult> {
  const plan = withInputPointers(
    pointersOf(window.windowPointer),
    () =>
      planSurrogateLagTest(series.x, series.y, {
        minLag: window.minLag,
        maxLag: window.maxLag,
        seed: p.seed,
        method: p.significance,
        normalisation: p.normalisation,
        preprocess: series.options,
        // the high-pass is not idempotent: surrogates come from the detrended solar series and
        // are high-passed once, like the observations
        surrogateSource: p.preprocess === "high_pass"
          ? preprocessSeries(axis.values[0], { method: "linear" })
          : undefined,
      }),
  );
  if (ctx.cancelled()) throw new CancelledError();
  // a fixed split for given parameters (so sums are added in one order whatever the pool
  // size): up to 16 chunks of at least 250 surrogates
  const per = Math.ceil(p.surrogates / Math.min(16, Math.ceil(p.surrogates / 250)));
  const chunks: SurrogateChunkInput[] = [];
  for (let s = 0; s < p.surrogates; s += per) {
    chunks.push({ plan, start: s, end: Math.min(p.surrogates, s + per) });
  }
  // in rounds of 8 chunks, so that progress moves and a cancel is seen between rounds
  const outs: SurrogateChunkOutput[] = [];
  for (let c = 0; c < chunks.length; c += 8) {
    outs.push(
      ...await ctx.parallel<SurrogateChunkInput, SurrogateChunkOutput>(
        SURROGATE_LAG_CHUNK,
        chunks.slice(c, c + 8),
      ),
    );
    if (ctx.cancelled()) throw new CancelledError();
    ctx.progress(0.05 + (0.9 * outs.length) / chunks.length);
  }
  return combineSurrogateChunks(plan, outs);
}

/**
 * Which p-values to trust, and a warning when the analytic and Monte Carlo ones disagree. Never
 * recommends a p-value a known confounder can produce: with a strong annual cycle left in an
 * input as analysed, none is trusted.
 */
function verdict(
  best: LagRow,
  pMonteCarlo: number | null,
  seasonalLeft: string[],
): { text: string; warning?: string } {
  if (seasonalLeft.length > 0) {
    return {
      text: `Trust none of the p-values here: the ${seasonalLeft.join(" and ")} series keeps a ` +
        "strong annual cycle as analysed. It dominates r at every lag; the analytic test's " +
        "N_eff uses lag-1 autocorrelations that miss the 12-month periodicity, and the Monte " +
        "Carlo p-value cannot be trusted either, because phase surrogates of a series without " +
        "an annual cycle leave the confounder out of the null. Remove it (deseasonalise: true) " +
        "and read the family-wise Monte Carlo p-value of that run.",
      warning: "an annual cycle remains in the analysed series: the Monte Carlo p-values " +
        "cannot be trusted (nor the analytic ones); set deseasonalise to true",
    };
  }
  if (pMonteCarlo === null) {
    return {
      text: "No Monte Carlo test was run: the analytic p-values assume AR(1)-like series " +
        "and are optimistic for quasi-periodic solar series; the best lag's analytic p-value " +
        "is not adjusted for searching the lag window.",
    };
  }
  const pa = best.p_analytic;
  const disagree = pa !== null && (pa < 0.05) !== (pMonteCarlo < 0.05);
  return {
    text: "Trust the Monte Carlo p-values: the surrogates keep the solar series' whole " +
      "autocorrelation, whereas N_eff uses only lag-1 autocorrelations, which understates the " +
      "spread of r for quasi-periodic series such as sunspot numbers (against a climate " +
      "series with a cycle-like component the analytic test rejects a true null too often) " +
      "and can overstate it in other cases. For the best lag, use the family-wise p-value, " +
      "which pays for searching the lag window." +
      (disagree
        ? ` Here they disagree at the best lag (analytic ${pa!.toPrecision(3)}, Monte Carlo ${
          pMonteCarlo.toPrecision(3)
        }).`
        : ""),
    ...(disagree
      ? {
        warning:
          "analytic and Monte Carlo p-values disagree at the best lag; the Monte Carlo one is the reliable answer",
      }
      : {}),
  };
}

/**
 * Warnings on where the best lag lies: at an edge of the window (the largest |r| may lie
 * outside it, as the attributions warn for an edge lag), and at a negative lag (the climate
 * series leads the solar one, which a response to the Sun cannot do).
 */
function bestLagWarnings(rows: LagRow[], bestIdx: number, unit: string): string[] {
  const out: string[] = [];
  const lag = rows[bestIdx].lag;
  if (rows.length > 1 && (bestIdx === 0 || bestIdx === rows.length - 1)) {
    out.push(
      `the best lag (${lag} ${unit}) is at the ${bestIdx === 0 ? "lower" : "upper"} edge of ` +
        `the lag window ${rows[0].lag} to ${rows[rows.length - 1].lag}: the largest |r| may ` +
        "lie outside it, so this lag is a bound, not an estimate; widen the window to see",
    );
  }
  if (lag < 0) {
    out.push(
      `the best lag is negative (${lag} ${unit}): the climate series leads the solar one, ` +
        "which a response to the Sun cannot do; read it as chance, a shared slow variation " +
        "or a common driver, not as a solar influence",
    );
  }
  return out;
}

/** Correlate the climate series with the solar series over the lag window. */
export async function computeLagCorrelations(
  p: LagCorrelationParams,
  ctx: RunContext,
): Promise<LagCorrelationResultIn> {
  const [solar, climate] = inputs(p, ctx);
  const onAxis = analysisAxis([solar, climate], ["/solar", "/climate"], p.resolution, p, 10);
  const labels: SeasonalInput[] = [
    { input: "solar", name: solar.name, quantity: solar.quantity },
    { input: "climate", name: climate.name, quantity: climate.quantity },
  ];
  const { axis, seasonal } = seasonalAxis(onAxis, labels, p.deseasonalise);
  const deseasonalised = seasonal.json.deseasonalise;
  const window = lagWindow(p, axis);
  const series = preprocessed(p, axis, deseasonalised);
  const rows = withInputPointers(
    pointersOf(window.windowPointer),
    () => laggedCorrelationTable(series.x, series.y, window, p.normalisation),
  );
  ctx.progress(0.05);
  const stat = (r: LagRow) => (p.normalisation === "full" ? r.r_full : r.r);
  const bestIdx = rows.reduce(
    (b, r, i) => (Math.abs(stat(r)) > Math.abs(stat(rows[b])) ? i : b),
    0,
  );
  const mc = p.significance === "none"
    ? null
    : await monteCarlo({ ...p, significance: p.significance }, ctx, series, axis, window);
  ctx.progress(0.95);
  const best = rows[bestIdx];
  const ensemble = p.solar_run ? solarEnsembleFromRun(ctx, p.solar_run, solar, "/solar_run") : null;
  // every member through the same axis, seasonal step and preprocessing as the central series
  const spread = ensemble
    ? lagEnsembleSpread(
      p,
      ctx,
      ensemble,
      climate,
      window,
      (a) => preprocessed(p, seasonalAxis(a, labels, p.deseasonalise).axis, deseasonalised),
      bestIdx,
    )
    : null;
  const warnings = [...axis.warnings, ...seasonal.warnings];
  const left = annualCycleLeft(axis.resolution, axis.time, [series.x, series.y], labels);
  const trust = verdict(best, mc ? mc.pPerLag[bestIdx] : null, left);
  if (trust.warning) warnings.push(trust.warning);
  warnings.push(...bestLagWarnings(rows, bestIdx, axis.lagUnit));
  if (best.n_eff < 10) {
    warnings.push(
      `only about ${best.n_eff.toFixed(1)} effectively independent pairs at the best lag`,
    );
  }
  const removed = `${deseasonalised ? "monthly climatology and " : ""}${p.preprocess} removed`;
  const preprocessedOutput = (s: StoredSeries, v: Float64Array) => ({
    name: `${s.name} (${axis.resolution}, ${removed})`,
    quantity: deseasonalisedQuantity(s.quantity, deseasonalised),
    units: s.units,
    time: Array.from(axis.time),
    value: Array.from(v),
  });
  return {
    resolution: axis.resolution,
    lag_unit: axis.lagUnit,
    sign_convention: "lag k > 0: the climate series follows (lags) the solar series by k " +
      `${axis.lagUnit}; r(k) equals R's ccf(solar, climate) at lag −k`,
    n: axis.time.length,
    start_period: axis.start_period,
    end_period: axis.end_period,
    seasonal_cycle: seasonal.json,
    preprocess: p.preprocess,
    high_pass_cutoff_years: p.high_pass_cutoff_years ?? null,
    normalisation: p.normalisation,
    statistic: p.normalisation === "full" ? "r_full" : "r",
    lags: rows.map((r, j) => ({
      ...r,
      p_monte_carlo: mc ? mc.pPerLag[j] : null,
      null_sd: mc ? mc.nullSd[j] : null,
      threshold_95: mc ? mc.threshold95PerLag[j] : null,
    })),
    best: {
      lag: best.lag,
      // the same two r as the lag table; `statistic` says which one the tests use
      r: best.r,
      r_full: best.r_full,
      n: best.n,
      n_eff: best.n_eff,
      p_analytic: best.p_analytic,
      p_monte_carlo: mc ? mc.pPerLag[bestIdx] : null,
      p_family_wise: mc ? mc.pFamilyWise : null,
      ci_lower: best.ci_lower,
      ci_upper: best.ci_upper,
    },
    monte_carlo: mc && p.significance !== "none"
      ? {
        method: p.significance,
        surrogates: mc.surrogates,
        seed: p.seed,
        family_wise_threshold_95: mc.maxAbs95,
        p_value_rule: "(1 + count of surrogates at least as extreme) / (1 + surrogates)",
      }
      : null,
    which_to_trust: trust.text,
    outputs: {
      solar_preprocessed: preprocessedOutput(solar, series.x),
      climate_preprocessed: preprocessedOutput(climate, series.y),
    },
    // present only when the solar input has an ensemble, so other results keep their shape
    ...(spread ? { ensemble_spread: spread } : {}),
    warnings,
    cautions: solarCautions([solar]),
  };
}
