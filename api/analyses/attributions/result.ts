/**
 * Result of the "attributions" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { AttributionEnsembleSpread } from "./ensemble_spread.ts";
import { cautions, inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";
import { SeasonalCycleSchema } from "../common/seasonal_cycle.ts";

/** The solar coefficient's p-value, naive and paying for the search of its lag. */
export const LagSearchSignificance = z.object({
  lags_searched: z.number().int().openapi({
    description: "Number of solar lags the AIC search chose from (1: a fixed lag)",
  }),
  p_naive: z.number().openapi({
    description: "NAIVE: p-value of the solar coefficient at its chosen lag as if that lag had " +
      "been fixed in advance (the `coefficients` table's p_value); too small after a search",
  }),
  p_search: z.number().nullable().openapi({
    description: "PAYS FOR THE SEARCH: Monte Carlo p-value, (1 + #{surrogates with p* ≤ " +
      "p_naive}) / (1 + surrogates), each surrogate repeating the AIC search of the solar lag " +
      "(the other regressors at their chosen lags, the same sample) with a phase-randomised " +
      "solar regressor; null with `sidak` or a fixed lag",
  }),
  p_sidak: z.number().openapi({
    description: "Šidák bound 1 − (1 − p_naive)^m over the m lags searched: conservative " +
      "about the search (neighbouring lags are correlated) but resting on the error model " +
      "like p_naive, so it can be smaller than p_search when the errors are not AR(1)",
  }),
  method: z.enum(["phase", "sidak", "fixed_lag"]).openapi({
    description: "Which adjustment was made: the Monte Carlo (`phase`), the bound only " +
      "(`sidak`), or none needed (`fixed_lag`)",
  }),
  surrogates: z.number().int().nullable(),
  seed: z.number().int().nullable(),
  naive_p_for_5_percent: z.number().nullable().openapi({
    description: "5th percentile of the surrogates' naive p-values: the naive p-value a " +
      "result needs to be significant at 5 % once the search is paid for; null without the " +
      "Monte Carlo",
  }),
  which_to_trust: z.string(),
}).openapi("AttributionLagSearchSignificance");

const LagUnit = z.enum(["months", "years"]);
const Interval = z.tuple([z.number(), z.number()]);

export const AttributionCoefficient = z.object({
  name: z.string().openapi({ description: "`intercept`, a regressor's name, or `trend`" }),
  lag: z.number().int().nullable().openapi({
    description: "Chosen lag in samples; null for the intercept",
  }),
  lag_unit: LagUnit.nullable().openapi({ description: "null for the intercept" }),
  estimate: z.number(),
  standard_error: z.number(),
  ci_lower: z.number().openapi({ description: "95 % interval, lower end" }),
  ci_upper: z.number(),
  p_value: z.number().openapi({ description: "Two-sided p-value of β = 0" }),
  units: z.string().openapi({
    description: "Units of the estimate: the climate series' units per regressor unit (per " +
      "year for the trend)",
  }),
}).openapi("AttributionCoefficient");

export const AttributionResult = z.object({
  resolution: z.enum(["monthly", "annual"]),
  lag_unit: LagUnit,
  n: z.number().int().openapi({ description: "Observations fitted (after the largest lag)" }),
  start_period: z.string().openapi({ description: "ISO 8601 first period of the common axis" }),
  end_period: z.string().openapi({ description: "ISO 8601 last period of the common axis" }),
  seasonal_cycle: SeasonalCycleSchema,
  first_fitted_time: z.number().openapi({
    description: "Decimal year of the first fitted observation",
  }),
  errors: z.enum(["ar1", "ols_hac"]),
  lag_search: z.enum(["exhaustive", "coordinate"]).openapi({
    description: "`exhaustive` over every lag combination, or `coordinate` (each regressor's " +
      "lag in turn, repeated until none changes) when there are more than 1,000",
  }),
  fits_evaluated: z.number().int(),
  aic: z.number().openapi({ description: "AIC of the chosen model (Akaike 1974)" }),
  r_squared: z.number(),
  residual_rho: z.number().openapi({
    description: "AR(1) coefficient of the errors (ar1) or lag-1 autocorrelation of the OLS " +
      "residuals (ols_hac)",
  }),
  residual_lag1_after_model: z.number().openapi({
    description: "Lag-1 autocorrelation of the whitened residuals (ar1) or residuals (ols_hac)",
  }),
  collinearity_condition_number: z.number().nullable().openapi({
    description: "Condition number of the standardised regressors at the chosen lags; null " +
      "when they are exactly collinear (infinite)",
  }),
  max_regressor_correlation: z.object({ a: z.string(), b: z.string(), r: z.number() })
    .nullable().openapi({
      description: "The pair of regressors most correlated at the chosen lags; null with one",
    }),
  coefficients: z.array(AttributionCoefficient),
  lags: z.record(z.string(), z.number().int()).openapi({
    description: "Chosen lag of every regressor, by name, in `lag_unit`",
  }),
  lag_surface: z.array(z.object({
    name: z.string(),
    lags: z.array(z.number().int()),
    aic: z.array(z.number().nullable()).openapi({
      description: "AIC at each lag, the other lags at their chosen values; null where the " +
        "regressors are collinear (no fit)",
    }),
    support: z.tuple([z.number().int(), z.number().int()]).openapi({
      description: "Smallest and largest lag within 2 AIC units of the best (Burnham & " +
        "Anderson 2002)",
    }),
  })),
  lag_grid: z.object({
    regressors: z.array(z.string()),
    lags: z.array(z.array(z.number().int())),
    aic: z.array(z.number().nullable()).openapi({
      description: "AIC of every lag combination; null where the regressors are collinear",
    }),
  }).nullable().openapi({ description: "Every combination tried; null after a coordinate search" }),
  solar: z.object({
    regressor: z.string(),
    sensitivity: z.number(),
    sensitivity_ci: Interval,
    sensitivity_units: z.string(),
    lag: z.number().int(),
    lag_unit: LagUnit,
    lag_support: z.tuple([z.number().int(), z.number().int()]),
    cycle_amplitude: z.number().openapi({
      description: "Peak-to-trough solar-cycle amplitude, in the solar regressor's units",
    }),
    cycle_amplitude_units: z.string(),
    cycle_amplitude_source: z.string(),
    max_minus_min: z.number().openapi({
      description: "Implied solar maximum-minus-minimum response, in the climate series' units",
    }),
    max_minus_min_ci: Interval,
    max_minus_min_units: z.string(),
    max_minus_min_note: z.string(),
    lag_search_significance: LagSearchSignificance,
  }).nullable().openapi({ description: "null without a regressor of role `solar`" }),
  ensemble_spread: AttributionEnsembleSpread.optional().openapi({
    description: "Present when the solar regressor is a run with an ensemble: the regression " +
      "repeated for every member",
  }),
  outputs: z.object({
    fitted: OutputSeriesSchema,
    residuals: OutputSeriesSchema,
  }).catchall(OutputSeriesSchema).openapi({
    description: "`fitted`, `residuals`, and `contribution_<name>` of every regressor (β × " +
      "(lagged regressor − its mean over the fitted sample))",
  }),
  warnings,
  cautions,
  inherited,
}).openapi("AttributionResult");

/** The result as `compute` builds it. */
export type AttributionResultIn = z.input<typeof AttributionResult>;
/** The result as stored and read back. */
export type AttributionResultOut = z.output<typeof AttributionResult>;
