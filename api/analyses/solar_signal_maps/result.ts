/**
 * Result of the "solar-signal-maps" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, nums, numsOrNull, warnings } from "../common/result_parts.ts";
import { MapPartSchema } from "../common/map_result.ts";
import { PreprocessField } from "../lag_correlations/request.ts";

/** A field input as the result names it. */
export const FieldSummary = z.object({
  id: z.string(),
  name: z.string(),
  variable: z.string(),
  units: z.string(),
  quantity: z.string(),
  calendar: z.string().openapi({ description: "CF calendar of the uploaded file" }),
  steps: z.array(z.number().int()).openapi({
    description: "Stored time steps used: first and one past the last",
  }),
}).openapi("FieldSummary");

/** The null distribution summary of a field Monte Carlo test. */
export const FieldNullSchema = z.object({
  mean: z.number(),
  sd: z.number(),
  q50: z.number(),
  q90: z.number(),
  q95: z.number(),
  q99: z.number(),
  max: z.number(),
  zero_fraction: z.number().openapi({
    description: "Share of replicates with no significant cell",
  }),
  histogram: z.array(z.number().int()).openapi({
    description: "Counts in bins of width 0.02 of the area fraction over [0, 1]",
  }),
  bimodality: z.number().nullable().openapi({
    description: "Sarle's bimodality coefficient; above 5/9 suggests a bimodal or flat null; " +
      "null with fewer than 4 replicates or no spread",
  }),
}).openapi("FieldNullSummary");

/** False discovery rate over a map (Benjamini & Hochberg 1995; Wilks 2016). */
export const FieldFdrSchema = z.object({
  alpha_global: z.number(),
  alpha_fdr: z.number().openapi({ description: "fdr_factor · alpha_global, the level of BH" }),
  p_used: z.string().openapi({ description: "Which per-cell p-value entered the procedure" }),
  p_threshold: z.number().openapi({ description: "Largest rejected p (0 when none)" }),
  cells_tested: z.number().int(),
  cells_significant: z.number().int(),
  area_fraction: z.number().openapi({
    description: "Area-weighted share of the tested cells declared significant",
  }),
  field_significant: z.boolean().openapi({
    description: "At least one cell declared significant: the global null is rejected at " +
      "about alpha_global",
  }),
}).openapi("FieldFdr");

export const SolarSignalMapResult = z.object({
  field: FieldSummary,
  predictor: z.object({
    id: z.string(),
    name: z.string(),
    quantity: z.string(),
    units: z.string(),
  }),
  controls: z.array(z.string()).openapi({ description: "Control names (trend included)" }),
  resolution: z.enum(["monthly", "annual"]),
  lag_unit: z.enum(["months", "years"]),
  sign_convention: z.string(),
  n: z.number().int().openapi({ description: "Time steps on the common axis" }),
  start_period: z.string(),
  end_period: z.string(),
  preprocess: PreprocessField,
  high_pass_cutoff_years: z.number().nullable(),
  deseasonalised: z.boolean(),
  slope_units: z.string().openapi({ description: "Field units per unit of the predictor" }),
  cells: z.object({
    grid: z.number().int(),
    analysed: z.number().int(),
    missing: z.number().int().openapi({ description: "Left out: missing values in the period" }),
    constant: z.number().int().openapi({ description: "Left out: constant after preprocessing" }),
  }),
  lags: z.array(z.object({
    lag: z.number().int(),
    n: z.number().int().openapi({ description: "Overlapping steps at this lag" }),
    r1_predictor: z.number().openapi({ description: "Lag-1 autocorrelation of the predictor" }),
    area_fraction_local: z.number().openapi({
      description: "Area-weighted share of analysed cells with analytic p ≤ alpha_local",
    }),
    p_monte_carlo: z.number().nullable().openapi({
      description: "Monte Carlo p of this lag's area fraction; null without the test",
    }),
  })),
  map: MapPartSchema,
  lag_maps: z.object({
    lags: z.array(z.number().int()),
    r: z.array(numsOrNull),
    p: z.array(numsOrNull),
  }).nullable().openapi({ description: "r and analytic p per lag and cell (keep_lag_maps)" }),
  field_significance: z.object({
    fdr: FieldFdrSchema,
    monte_carlo: z.object({
      surrogates: z.number().int(),
      seed: z.number().int(),
      alpha_local: z.number(),
      method: z.string(),
      observed_fraction: nums.openapi({ description: "Area fraction per lag" }),
      observed_best: z.number(),
      best_lag: z.number().int().openapi({ description: "Lag of the largest fraction" }),
      p_field: z.number().openapi({
        description: "p of the largest fraction against the surrogates' largest (the lag " +
          "search paid for): (1 + count at least as large) / (1 + surrogates)",
      }),
      null_best: FieldNullSchema,
    }).nullable(),
  }),
  which_to_trust: z.string(),
  warnings,
  cautions,
  inherited,
}).openapi("SolarSignalMapResult");

export type SolarSignalMapResultIn = z.input<typeof SolarSignalMapResult>;
export type SolarSignalMapResultOut = z.output<typeof SolarSignalMapResult>;
