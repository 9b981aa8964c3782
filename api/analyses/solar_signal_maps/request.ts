/**
 * Request of the "solar-signal-maps" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { DEMO_FIELD, DEMO_SERIES } from "../../schemas/examples.ts";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { CoverageFields } from "../common/analysis_axis.ts";
import { RunRef } from "../common/run_ref.ts";
import { fieldRef } from "../common/field_ref.ts";
import { PreprocessField } from "../lag_correlations/request.ts";

/** A control regressor of the per-cell multiple regression. */
export const FieldControl = z.object({
  name: z.string().regex(/^[a-z][a-z0-9_]{0,30}$/, "lower-case letters, digits and _").openapi({
    description: "Short name of the control, e.g. enso or aerosol",
    example: "enso",
  }),
  series: SeriesRef.openapi({ description: "The control series (on any finer or equal axis)" }),
});

export const SolarSignalMapRequest = z.object({
  field: fieldRef("The gridded field (POST /v1/fields), monthly or annual"),
  solar: SeriesRef.optional().openapi({
    description: "Solar series (sunspot number, TSI, forcing, ...): the predictor",
  }),
  solar_run: RunRef.optional().openapi({
    description: "Instead of solar: a run whose `tsi` output (a reconstruction) or `forcing` " +
      "output (a forcing run) is the predictor",
  }),
  controls: z.array(FieldControl).max(5).default([]).openapi({
    description: "Controls of the per-cell multiple regression (an ENSO index, volcanic " +
      "aerosol, ...), taken at the field's time step; the slope and r of the solar predictor " +
      "are then partial ones",
  }),
  trend_control: z.boolean().default(false).openapi({
    description: "Add a linear trend in time as a control",
  }),
  ...CoverageFields,
  min_lag: z.number().int().min(-600).max(600).default(0).openapi({
    description: "Smallest lag in time steps of the field (months or years). Lag k > 0: the " +
      "field follows the solar series by k steps",
  }),
  max_lag: z.number().int().min(-600).max(600).optional().openapi({
    description: "Largest lag (default 24 months or 2 years); at most a third of the common " +
      "period",
    example: 24,
  }),
  preprocess: PreprocessField.default("linear"),
  high_pass_cutoff_years: z.number().positive().max(1000).optional().openapi({
    description: "Cutoff period for `preprocess: high_pass`, years",
  }),
  deseasonalise: z.boolean().default(true).openapi({
    description: "Monthly fields: remove each calendar month's mean from every cell first " +
      "(the solar series is not deseasonalised). Ignored for annual fields",
  }),
  alpha_global: z.number().gt(0).max(0.5).default(0.05).openapi({
    description: "Level of the test of the field as a whole",
  }),
  fdr_factor: z.number().gt(0).max(4).default(2).openapi({
    description: "The false discovery rate runs at α_FDR = fdr_factor · alpha_global " +
      "(Wilks 2016 recommends 2 for spatially correlated fields)",
  }),
  alpha_local: z.number().gt(0).max(0.5).default(0.05).openapi({
    description: "Level of the local test whose area fraction the Monte Carlo test counts",
  }),
  surrogates: z.number().int().min(0).max(100_000).default(1000).refine(
    (m) => m === 0 || m >= 99,
    "0 (no Monte Carlo test) or at least 99",
  ).openapi({
    description: "Phase-randomised surrogates of the solar series for the Monte Carlo field " +
      "significance (Livezey & Chen 1983); 0 skips it",
  }),
  seed: z.number().int().min(0).max(4294967295).default(1),
  keep_lag_maps: z.boolean().default(false).openapi({
    description: "Also keep r and p of every lag (lags × cells numbers in the result)",
  }),
}).openapi("SolarSignalMapRequest", {
  example: {
    field: DEMO_FIELD,
    solar: DEMO_SERIES.TSIM,
    min_lag: 0,
    max_lag: 24,
    surrogates: 200,
  },
});

export type SolarSignalMapParams = z.output<typeof SolarSignalMapRequest>;
