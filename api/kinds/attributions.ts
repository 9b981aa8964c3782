/**
 * Run kind "attributions": multiple regression of a climate series on named regressors
 * (solar, ENSO, volcanic aerosol, anthropogenic, trend, others), each at a lag chosen by AIC,
 * with AR(1) or Newey–West errors (core/climate/attribution_regression.ts).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { InputProblem, type OutputSeries, type RunKind } from "../runs/kind.ts";
import { refId, SeriesRef } from "../schemas/series_ref.ts";
import {
  attributionRegression,
  type AttributionRegressor,
  cycleAmplitudeEstimate,
} from "../../core/climate/mod.ts";
import {
  analysisAxis,
  AnalysisResolution,
  CoverageFields,
  jsonArray,
  jsonNumber,
  RUN_ID,
  seriesFromRun,
  solarCautions,
} from "./climate_common.ts";

export const MAX_REGRESSORS = 8;

const Regressor = z.object({
  name: z.string().regex(/^[a-z][a-z0-9_]{0,39}$/, "lower-case letters, digits and _").openapi({
    example: "solar",
  }),
  series: SeriesRef.optional(),
  run: z.string().regex(RUN_ID, "must be a run id (UUIDv7)").optional().openapi({
    description: "Instead of series: a run whose `tsi` or `forcing` output is the regressor " +
      "(e.g. a TSI reconstruction or a forcing run)",
  }),
  role: z.enum(["solar", "enso", "volcanic", "anthropogenic", "other"]).default("other").openapi({
    description: "What the regressor stands for; exactly one `solar` regressor gives the " +
      "solar sensitivity and the implied solar maximum-minus-minimum response",
  }),
  min_lag: z.number().int().min(0).max(600).default(0).openapi({
    description: "Smallest lag searched, in samples of the common axis (the climate series " +
      "responds to the regressor this many months or years later)",
  }),
  max_lag: z.number().int().min(0).max(600).default(0).openapi({
    description: "Largest lag searched (equal to min_lag for a fixed lag)",
  }),
}).openapi("AttributionRegressor");

export const AttributionRequest = z.object({
  climate: SeriesRef,
  regressors: z.array(Regressor).min(1).max(MAX_REGRESSORS),
  trend: z.boolean().default(true).openapi({
    description: "Add a linear trend in time (per year) as a regressor named `trend`",
  }),
  errors: z.enum(["ar1", "ols_hac"]).default("ar1").openapi({
    description: "`ar1`: regression with AR(1) errors by Prais–Winsten; `ols_hac`: OLS with " +
      "Newey–West standard errors",
  }),
  hac_lags: z.number().int().min(0).max(1000).optional().openapi({
    description: "Newey–West truncation lag (default ⌊4 (n/100)^(2/9)⌋)",
  }),
  solar_cycle_amplitude: z.number().positive().optional().openapi({
    description: "Peak-to-trough solar-cycle amplitude of the solar regressor, in its units " +
      "(default: 2√2 × its detrended standard deviation over the fitted sample)",
  }),
  resolution: AnalysisResolution,
  ...CoverageFields,
}).openapi("AttributionRequest");

export const attributionKind: RunKind<typeof AttributionRequest> = {
  kind: "attributions",
  path: "/v1/attributions",
  algorithmVersion: "1",
  tag: "Solar–climate linkage",
  summary: "Multiple-regression attribution with a lag per regressor",
  description: "Regresses a climate series on named regressors on one calendar axis, each at " +
    "its own lag searched over a range and chosen by AIC on one common sample, with AR(1) " +
    "(Prais–Winsten) errors or OLS with Newey–West standard errors. Reports coefficients " +
    "with 95 % intervals, the AIC profile of every regressor's lag (the lag surface) with the " +
    "ΔAIC ≤ 2 support, each regressor's contribution series, the solar sensitivity and the " +
    "implied solar maximum-minus-minimum response, and warnings for collinear regressors or " +
    "residuals that stay autocorrelated.",
  request: AttributionRequest,
  result: LegacyResult,
  runRefs: (p) => p.regressors.flatMap((r) => (r.run ? [r.run] : [])),
  estimateSeconds: (p) =>
    0.1 + 0.02 * p.regressors.reduce((s, r) => s + r.max_lag - r.min_lag + 1, 0),
  compute(p, ctx) {
    const climate = ctx.series(refId(p.climate));
    const regs = p.regressors.map((r, k) => {
      if ((r.series === undefined) === (r.run === undefined)) {
        throw new InputProblem(`/regressors/${k}/series`, "give exactly one of series or run");
      }
      return r.run
        ? seriesFromRun(ctx, r.run, `/regressors/${k}/run`)
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
    const solarIdx = p.regressors.map((r, k) => (r.role === "solar" ? k : -1)).filter((k) =>
      k >= 0
    );
    if (solarIdx.length > 1) {
      throw new InputProblem(`/regressors/${solarIdx[1]}/role`, "only one regressor may be solar");
    }
    const axis = analysisAxis(
      [climate, ...regs],
      ["/climate", ...p.regressors.map((r, k) => `/regressors/${k}/${r.run ? "run" : "series"}`)],
      p.resolution,
      p,
      10,
    );
    const y = axis.values[0];
    const n = y.length;
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
      );
    }
    const regressors: AttributionRegressor[] = p.regressors.map((r, k) => ({
      name: r.name,
      values: axis.values[k + 1],
      minLag: r.min_lag,
      maxLag: r.max_lag,
    }));
    p.regressors.forEach((r, k) => {
      const v = axis.values[k + 1];
      if (v.every((x) => x === v[0])) {
        throw new InputProblem(`/regressors/${k}/series`, `regressor ${r.name} is constant`);
      }
    });
    if (y.every((x) => x === y[0])) {
      throw new InputProblem("/climate", "the climate series is constant");
    }
    if (p.trend) {
      regressors.push({
        name: "trend",
        values: Float64Array.from(axis.time, (t) => t - axis.time[0]),
        minLag: 0,
        maxLag: 0,
      });
    }
    if (p.hac_lags !== undefined && p.hac_lags >= n - maxLag) {
      throw new InputProblem(
        "/hac_lags",
        `hac_lags must be below the ${n - maxLag} fitted observations`,
      );
    }
    let fit;
    try {
      fit = attributionRegression(y, regressors, { errors: p.errors, hacLags: p.hac_lags });
    } catch (e) {
      if (e instanceof RangeError) throw new InputProblem("/regressors", e.message);
      throw e;
    }
    const t0 = fit.firstIndex;
    const sampleTime = Array.from(axis.time.subarray(t0, t0 + fit.n));
    const unitsOf = (k: number) => (k < regs.length ? regs[k].units : "yr");
    const coefficients = fit.coefficients.map((c, j) => ({
      name: c.name,
      lag: c.lag,
      lag_unit: c.lag === null ? null : axis.lagUnit,
      estimate: c.estimate,
      standard_error: c.standardError,
      ci_lower: c.lower,
      ci_upper: c.upper,
      p_value: c.pValue,
      units: j === 0 ? climate.units : `${climate.units} per ${unitsOf(j - 1)}`,
    }));
    let solar = null;
    if (solarIdx.length === 1) {
      const k = solarIdx[0];
      const c = fit.coefficients[k + 1];
      const lag = fit.lags[p.regressors[k].name];
      const xs = axis.values[k + 1].subarray(t0 - lag, t0 - lag + fit.n);
      const amp = p.solar_cycle_amplitude ?? cycleAmplitudeEstimate(xs);
      const s = regs[k];
      solar = {
        regressor: p.regressors[k].name,
        sensitivity: c.estimate,
        sensitivity_ci: [c.lower, c.upper],
        sensitivity_units: `${climate.units} per ${s.units}`,
        lag: lag,
        lag_unit: axis.lagUnit,
        lag_support: fit.lagProfiles[k].support,
        cycle_amplitude: amp,
        cycle_amplitude_units: s.units,
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
    const outputs: Record<string, OutputSeries> = {};
    for (const r of regressors) {
      outputs[`contribution_${r.name}`] = {
        name: `${r.name} contribution to ${climate.name}`,
        quantity: climate.quantity,
        units: climate.units,
        time: sampleTime,
        value: jsonArray(fit.contributions[r.name]),
        description: "β × (lagged regressor − its mean over the fitted sample)",
      };
    }
    outputs.fitted = {
      name: `${climate.name} (fitted)`,
      quantity: climate.quantity,
      units: climate.units,
      time: sampleTime,
      value: jsonArray(fit.fitted),
    };
    outputs.residuals = {
      name: `${climate.name} (residuals)`,
      quantity: climate.quantity,
      units: climate.units,
      time: sampleTime,
      value: jsonArray(fit.residuals),
    };
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
      collinearity_condition_number: jsonNumber(fit.collinearity),
      max_regressor_correlation: fit.maxCorrelation,
      coefficients,
      lags: fit.lags,
      lag_surface: fit.lagProfiles.map((pr) => ({
        name: pr.name,
        lags: pr.lags,
        aic: pr.aic.map((a) => jsonNumber(a)),
        support: pr.support,
      })),
      lag_grid: fit.lagGrid && {
        regressors: fit.lagProfiles.map((pr) => pr.name),
        lags: fit.lagGrid.lags,
        aic: fit.lagGrid.aic.map((a) => jsonNumber(a)),
      },
      solar,
      outputs,
      warnings: [...axis.warnings, ...fit.warnings],
      cautions: [
        ...solarCautions(solarIdx.map((k) => regs[k])),
        "Coefficients measure association given the chosen regressors and lags; a missing or " +
        "mis-specified regressor changes them.",
      ],
    };
  },
};
