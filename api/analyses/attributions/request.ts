/**
 * Request of the "attributions" analysis.
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

export const MAX_REGRESSORS = 8;

/** A regressor name: also a key of the result (`contribution_<name>`), so snake_case. */
export const REGRESSOR_NAME = /^[a-z][a-z0-9_]{0,39}$/;

const Regressor = z.object({
  name: z.string().regex(REGRESSOR_NAME, "lower-case letters, digits and _").openapi({
    example: "solar",
  }),
  series: SeriesRef.optional(),
  run: RunRef.optional().openapi({
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
}).openapi("AttributionRegressor", oneOfFields("series", "run"));

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
  deseasonalise: DeseasonaliseField,
  lag_search_test: z.enum(["phase", "sidak"]).default("phase").openapi({
    description: "How the solar coefficient's p-value pays for choosing its lag by AIC over " +
      "a range: `phase` = Monte Carlo repeating the same search on phase-randomised " +
      "surrogates of the solar regressor (Ebisuzaki 1997), with the Šidák bound beside it; " +
      "`sidak` = only the Šidák bound 1 − (1 − p)^m over the m lags searched (conservative " +
      "about the search, instant, but resting on the error model). Nothing to pay for when the solar lag is fixed (min_lag = max_lag).",
  }),
  surrogates: z.number().int().min(100).max(10_000).default(500).openapi({
    description: "Surrogates of the `phase` lag-search test (each repeats the whole lag search)",
  }),
  seed: z.number().int().min(0).max(4294967295).default(1).openapi({
    description: "Seed of the surrogates' random streams",
  }),
}).openapi("AttributionRequest", {
  example: {
    climate: DEMO_SERIES.TEMP,
    regressors: [
      { name: "solar", series: DEMO_SERIES.TSIM, role: "solar", min_lag: 0, max_lag: 24 },
      { name: "enso", series: DEMO_SERIES.ENSO, role: "enso", min_lag: 0, max_lag: 6 },
      { name: "volcanic", series: DEMO_SERIES.AOD, role: "volcanic", min_lag: 0, max_lag: 12 },
    ],
    surrogates: 200,
  },
});

export type AttributionParams = z.output<typeof AttributionRequest>;
