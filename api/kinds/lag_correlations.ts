/**
 * Run kind "lag-correlations": how strongly, and at what lag, a climate series follows a
 * solar series, with analytic (Bretherton N_eff) and Monte Carlo (surrogate) significance side
 * by side (core/climate/lagged_correlation.ts, core/climate/surrogate_lag_test.ts).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { CancelledError, InputProblem, type RunKind } from "../runs/kind.ts";
import { refId, SeriesRef } from "../schemas/series_ref.ts";
import {
  combineSurrogateChunks,
  laggedCorrelationTable,
  planSurrogateLagTest,
  preprocessSeries,
  type SurrogateChunkInput,
  type SurrogateChunkOutput,
} from "../../core/climate/mod.ts";
import {
  analysisAxis,
  AnalysisResolution,
  CoverageFields,
  jsonArray,
  jsonNumber,
  PreprocessField,
  RUN_ID,
  seriesFromRun,
  solarCautions,
} from "./climate_common.ts";

export const LagCorrelationRequest = z.object({
  solar: SeriesRef.optional().openapi({
    description: "Solar series (sunspot number, TSI, forcing, ...)",
  }),
  solar_run: z.string().regex(RUN_ID, "must be a run id (UUIDv7)").optional().openapi({
    description: "Instead of solar: a run whose `tsi` output (a reconstruction) or `forcing` " +
      "output (a forcing run) is the solar series",
  }),
  climate: SeriesRef.openapi({ description: "Climate series (temperature anomaly, ...)" }),
  resolution: AnalysisResolution,
  ...CoverageFields,
  min_lag: z.number().int().min(-10_000).max(10_000).optional().openapi({
    description: "Smallest lag in samples (default −max_lag). Negative lags: the climate " +
      "series leads.",
  }),
  max_lag: z.number().int().min(0).max(10_000).optional().openapi({
    description: "Largest lag in samples (months or years of the common axis; default 36 " +
      "months or 5 years). Lag k > 0 means the climate series follows the solar one by k.",
    example: 24,
  }),
  normalisation: z.enum(["overlap", "full"]).default("overlap").openapi({
    description: "`overlap`: Pearson r over the overlapping pairs at each lag (default); " +
      "`full`: the normalisation of R's `ccf` (full-series means and variances, divisor N)",
  }),
  preprocess: PreprocessField.default("linear"),
  high_pass_cutoff_years: z.number().positive().max(1000).optional().openapi({
    description: "Cutoff period for `preprocess: high_pass`, years",
  }),
  significance: z.enum(["phase", "ar1", "none"]).default("phase").openapi({
    description: "Monte Carlo null: `phase` = phase-randomised surrogates of the solar series " +
      "(Ebisuzaki 1997), `ar1` = AR(1) surrogates with its fitted lag-1 coefficient, `none`",
  }),
  surrogates: z.number().int().min(100).max(100_000).default(1000).openapi({
    description: "Number of surrogates (100 to 100,000)",
  }),
  seed: z.number().int().min(0).max(4294967295).default(1),
}).openapi("LagCorrelationRequest");

type Params = z.output<typeof LagCorrelationRequest>;

function window(p: Params, resolution: "monthly" | "annual") {
  const maxLag = p.max_lag ?? (resolution === "monthly" ? 36 : 5);
  const minLag = p.min_lag ?? -maxLag;
  return { minLag, maxLag };
}

export const lagCorrelationKind: RunKind<typeof LagCorrelationRequest> = {
  kind: "lag-correlations",
  path: "/v1/lag-correlations",
  algorithmVersion: "1",
  tag: "Solar–climate linkage",
  summary: "Lagged correlation of a climate series with a solar series, with honest significance",
  description: "Brings both series onto one monthly or annual axis, removes the chosen trend " +
    "from both, and reports at every lag k (k > 0: the climate series follows the solar one " +
    "by k steps; this is R's ccf(solar, climate) at lag −k): Pearson r over the overlap (or " +
    "R's full normalisation), the overlap count, both lag-1 autocorrelations, the effective " +
    "sample size N_eff = n(1 − r1 r2)/(1 + r1 r2) (Bretherton et al. 1999), t and the " +
    "analytic p-value with N_eff − 2 degrees of freedom, the Fisher-z 95 % interval with " +
    "N_eff, and a Monte Carlo p-value from surrogates of the solar series given the same " +
    "preprocessing. The family-wise p-value compares the best |r| over the whole lag window " +
    "with the surrogates' best |r| over the same window, so searching many lags is paid for.",
  request: LagCorrelationRequest,
  result: LegacyResult,
  runRefs: (p) => (p.solar_run ? [p.solar_run] : []),
  estimateSeconds(p) {
    if (p.significance === "none") return 0.05;
    const hp = p.preprocess === "high_pass" ? 20 : 1;
    // about 0.1 ms per surrogate of 4096 months over 241 lags on one core (test/bench)
    return 0.05 + (p.surrogates * 0.12e-3 * hp * ((p.max_lag ?? 36) + 60)) / 300;
  },
  async compute(p, ctx) {
    if ((p.solar === undefined) === (p.solar_run === undefined)) {
      throw new InputProblem(
        "/solar",
        "give exactly one of solar (a series) or solar_run (a run id)",
      );
    }
    const solar = p.solar_run
      ? seriesFromRun(ctx, p.solar_run, "/solar_run")
      : ctx.series(refId(p.solar!));
    const climate = ctx.series(refId(p.climate));
    const axis = analysisAxis([solar, climate], ["/solar", "/climate"], p.resolution, p, 10);
    const n = axis.time.length;
    const { minLag, maxLag } = window(p, axis.resolution);
    if (minLag > maxLag) {
      throw new InputProblem("/min_lag", `min_lag ${minLag} is larger than max_lag ${maxLag}`);
    }
    const big = Math.max(Math.abs(minLag), Math.abs(maxLag));
    if (3 * big > n) {
      throw new InputProblem(
        p.max_lag === undefined && p.min_lag !== undefined ? "/min_lag" : "/max_lag",
        `the lag window reaches ${big} ${axis.lagUnit}, more than a third of the ${n} ` +
          `overlapping ${axis.resolution} periods (at most ${Math.floor(n / 3)})`,
      );
    }
    if (p.preprocess === "high_pass" && p.high_pass_cutoff_years === undefined) {
      throw new InputProblem("/high_pass_cutoff_years", "preprocess high_pass needs a cutoff");
    }
    const pre = {
      method: p.preprocess,
      cutoffSamples: p.high_pass_cutoff_years === undefined
        ? undefined
        : p.high_pass_cutoff_years / axis.step,
    };
    for (const [k, name] of [[0, "solar"], [1, "climate"]] as const) {
      const v = axis.values[k];
      if (v.every((x) => x === v[0])) {
        throw new InputProblem(`/${name}`, `the ${name} series is constant over the overlap`);
      }
    }
    let x: Float64Array, y: Float64Array;
    try {
      x = preprocessSeries(axis.values[0], pre);
      y = preprocessSeries(axis.values[1], pre);
    } catch (e) {
      if (e instanceof RangeError) throw new InputProblem("/high_pass_cutoff_years", e.message);
      throw e;
    }
    let rows;
    try {
      rows = laggedCorrelationTable(x, y, { minLag, maxLag }, p.normalisation);
    } catch (e) {
      if (e instanceof RangeError) {
        const who = /climate/.test(e.message) ? "/climate" : "/solar";
        throw new InputProblem(who, `after preprocessing: ${e.message}`);
      }
      throw e;
    }
    ctx.progress(0.05);
    const stat = (r: (typeof rows)[number]) => (p.normalisation === "full" ? r.r_full : r.r);
    const bestIdx = rows.reduce(
      (b, r, i) => (Math.abs(stat(r)) > Math.abs(stat(rows[b])) ? i : b),
      0,
    );
    let mc: ReturnType<typeof combineSurrogateChunks> | null = null;
    if (p.significance !== "none") {
      const plan = planSurrogateLagTest(x, y, {
        minLag,
        maxLag,
        seed: p.seed,
        method: p.significance,
        normalisation: p.normalisation,
        preprocess: pre,
        // the high-pass is not idempotent: surrogates come from the detrended solar series and
        // are high-passed once, like the observations
        surrogateSource: p.preprocess === "high_pass"
          ? preprocessSeries(axis.values[0], { method: "linear" })
          : undefined,
      });
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
            "climate.surrogate_lag_chunk",
            chunks.slice(c, c + 8),
          ),
        );
        if (ctx.cancelled()) throw new CancelledError();
        ctx.progress(0.05 + (0.9 * outs.length) / chunks.length);
      }
      mc = combineSurrogateChunks(plan, outs);
    }
    ctx.progress(0.95);
    const best = rows[bestIdx];
    const warnings = [...axis.warnings];
    const cautions = [...solarCautions([solar])];
    let verdict: string;
    if (mc) {
      const pa = best.p_analytic, pm = mc.pPerLag[bestIdx];
      const disagree = pa !== null && (pa < 0.05) !== (pm < 0.05);
      verdict = "Trust the Monte Carlo p-values: the surrogates keep the solar series' whole " +
        "autocorrelation, whereas N_eff uses only lag-1 autocorrelations, which understates the " +
        "spread of r for quasi-periodic series such as sunspot numbers (against a climate " +
        "series with a cycle-like component the analytic test rejects a true null too often) " +
        "and can overstate it in other cases. For the best lag, use the family-wise p-value, " +
        "which pays for searching the lag window." +
        (disagree
          ? ` Here they disagree at the best lag (analytic ${pa!.toPrecision(3)}, Monte Carlo ${
            pm.toPrecision(3)
          }).`
          : "");
      if (disagree) {
        warnings.push(
          "analytic and Monte Carlo p-values disagree at the best lag; the Monte Carlo one is the reliable answer",
        );
      }
    } else {
      verdict = "No Monte Carlo test was run: the analytic p-values assume AR(1)-like series " +
        "and are optimistic for quasi-periodic solar series; the best lag's analytic p-value " +
        "is not adjusted for searching the lag window.";
    }
    if (best.n_eff < 10) {
      warnings.push(
        `only about ${best.n_eff.toFixed(1)} effectively independent pairs at the best lag`,
      );
    }
    return {
      resolution: axis.resolution,
      lag_unit: axis.lagUnit,
      sign_convention: "lag k > 0: the climate series follows (lags) the solar series by k " +
        `${axis.lagUnit}; r(k) equals R's ccf(solar, climate) at lag −k`,
      n: axis.time.length,
      start_period: axis.start_period,
      end_period: axis.end_period,
      preprocess: p.preprocess,
      high_pass_cutoff_years: p.high_pass_cutoff_years ?? null,
      normalisation: p.normalisation,
      statistic: p.normalisation === "full" ? "r_full" : "r",
      lags: rows.map((r, j) => ({
        ...r,
        t: jsonNumber(r.t),
        p_monte_carlo: mc ? mc.pPerLag[j] : null,
        null_sd: mc ? mc.nullSd[j] : null,
        threshold_95: mc ? mc.threshold95PerLag[j] : null,
      })),
      best: {
        lag: best.lag,
        r: stat(best),
        n: best.n,
        n_eff: best.n_eff,
        p_analytic: best.p_analytic,
        p_monte_carlo: mc ? mc.pPerLag[bestIdx] : null,
        p_family_wise: mc ? mc.pFamilyWise : null,
        ci_lower: best.ci_lower,
        ci_upper: best.ci_upper,
      },
      monte_carlo: mc
        ? {
          method: p.significance,
          surrogates: mc.surrogates,
          seed: p.seed,
          family_wise_threshold_95: mc.maxAbs95,
          p_value_rule: "(1 + count of surrogates at least as extreme) / (1 + surrogates)",
        }
        : null,
      which_to_trust: verdict,
      outputs: {
        solar_preprocessed: {
          name: `${solar.name} (${axis.resolution}, ${p.preprocess} removed)`,
          quantity: solar.quantity,
          units: solar.units,
          time: Array.from(axis.time),
          value: jsonArray(x),
        },
        climate_preprocessed: {
          name: `${climate.name} (${axis.resolution}, ${p.preprocess} removed)`,
          quantity: climate.quantity,
          units: climate.units,
          time: Array.from(axis.time),
          value: jsonArray(y),
        },
      },
      warnings,
      cautions,
    };
  },
};
