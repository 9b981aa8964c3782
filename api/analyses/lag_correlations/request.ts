/**
 * Request of the "lag-correlations" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { AnalysisResolution, CoverageFields } from "../common/analysis_axis.ts";
import { RunRef } from "../common/run_ref.ts";
import { DeseasonaliseField } from "../common/seasonal_cycle.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";
import { oneOfFields } from "../common/alternatives.ts";

/** Preprocessing applied to observations and surrogates alike. */
export const PreprocessField = z.enum(["mean", "linear", "quadratic", "high_pass"]).openapi({
  description: "Removed from every series before the analysis (and from every surrogate): " +
    "the mean, a linear or quadratic trend in time, or variations slower than " +
    "`high_pass_cutoff_years` (Gaussian high-pass, half power at the cutoff).",
});

export const LagCorrelationRequest = z.object({
  solar: SeriesRef.optional().openapi({
    description: "Solar series (sunspot number, TSI, forcing, ...)",
  }),
  solar_run: RunRef.optional().openapi({
    description: "Instead of solar: a run whose `tsi` output (a reconstruction) or `forcing` " +
      "output (a forcing run) is the solar series",
  }),
  climate: SeriesRef.openapi({ description: "Climate series (temperature anomaly, ...)" }),
  resolution: AnalysisResolution,
  ...CoverageFields,
  deseasonalise: DeseasonaliseField,
  min_lag: z.number().int().min(-10_000).max(10_000).optional().openapi({
    description: "Smallest lag in samples (default −max_lag). Negative lags: the climate " +
      "series leads.",
    example: -24,
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
}).openapi("LagCorrelationRequest", {
  ...oneOfFields("solar", "solar_run"),
  example: {
    solar: DEMO_SERIES.TSIM,
    climate: DEMO_SERIES.TEMP,
    min_lag: -24,
    max_lag: 24,
    surrogates: 1000,
    seed: 42,
  },
});

export type LagCorrelationParams = z.output<typeof LagCorrelationRequest>;
