/**
 * Result of the "lag-correlations" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";
import { PreprocessField } from "./request.ts";
import { LagEnsembleSpread } from "./ensemble_spread.ts";
import { SeasonalCycleSchema } from "../common/seasonal_cycle.ts";

const nullWhenNeffSmall = (what: string, limit: number) =>
  z.number().nullable().openapi({
    description: `${what}; null when N_eff ≤ ${limit} (too few effectively independent pairs)`,
  });
const nullWithoutMonteCarlo = (what: string) =>
  z.number().nullable().openapi({
    description: `${what}; null when no Monte Carlo test was run (significance: none)`,
  });

/** The analytic and Monte Carlo statistics at one lag. */
export const LagRow = z.object({
  lag: z.number().int().openapi({
    description: "Lag k in samples of the common axis (k > 0: the climate series follows)",
  }),
  n: z.number().int().openapi({ description: "Overlapping pairs N − |k|" }),
  r: z.number().openapi({ description: "Pearson r over the overlapping pairs" }),
  r_full: z.number().openapi({
    description: "r with R's ccf normalisation (full-series means and variances, divisor N)",
  }),
  r1_solar: z.number().openapi({
    description: "Lag-1 autocorrelation of the solar segment used at this lag",
  }),
  r1_climate: z.number().openapi({
    description: "Lag-1 autocorrelation of the climate segment used at this lag",
  }),
  n_eff: z.number().openapi({
    description: "Effective sample size n(1 − r1 r2)/(1 + r1 r2), capped at n (Bretherton " +
      "et al. 1999)",
  }),
  t: nullWhenNeffSmall("t statistic of the tested r with N_eff − 2 degrees of freedom", 2),
  df: nullWhenNeffSmall("Degrees of freedom N_eff − 2", 2),
  p_analytic: nullWhenNeffSmall("Two-sided p-value of the t test with N_eff − 2 df", 2),
  p_naive: z.number().nullable().openapi({
    description: "Two-sided p-value with n − 2 df, ignoring autocorrelation (for comparison " +
      "only); null when n ≤ 2",
  }),
  ci_lower: z.number().nullable().openapi({
    description: "Fisher-z 95 % interval of r with N_eff, lower end; null when N_eff ≤ 3 or " +
      "|r| = 1",
  }),
  ci_upper: z.number().nullable().openapi({ description: "Upper end, as `ci_lower`" }),
  p_monte_carlo: nullWithoutMonteCarlo(
    "Pointwise Monte Carlo p-value: (1 + surrogates with |r| at least the observed) / (1 + " +
      "surrogates)",
  ),
  null_sd: nullWithoutMonteCarlo("Standard deviation of the surrogates' r at this lag"),
  threshold_95: nullWithoutMonteCarlo(
    "|r| that 95 % of the surrogates stay below at this lag (pointwise 5 % threshold)",
  ),
}).openapi("LagCorrelationRow");

export const LagCorrelationResult = z.object({
  resolution: z.enum(["monthly", "annual"]),
  lag_unit: z.enum(["months", "years"]),
  sign_convention: z.string(),
  n: z.number().int().openapi({ description: "Periods on the common gap-free axis" }),
  start_period: z.string().openapi({ description: "ISO 8601 first period of the axis" }),
  end_period: z.string().openapi({ description: "ISO 8601 last period of the axis" }),
  seasonal_cycle: SeasonalCycleSchema,
  preprocess: PreprocessField,
  high_pass_cutoff_years: z.number().nullable().openapi({
    description: "Cutoff of the high-pass, years; null for the other preprocessings",
  }),
  normalisation: z.enum(["overlap", "full"]),
  statistic: z.enum(["r", "r_full"]).openapi({
    description: "Which r the tests, intervals and the choice of the best lag use: `r` (the " +
      "overlap Pearson r, normalisation `overlap`) or `r_full` (R's ccf normalisation, " +
      "normalisation `full`). The lag table and `best` carry both, under the same names",
  }),
  lags: z.array(LagRow),
  best: z.object({
    lag: z.number().int().openapi({ description: "Lag with the largest |statistic|" }),
    r: z.number().openapi({
      description: "Pearson r over the overlapping pairs at the best lag (the table's `r`)",
    }),
    r_full: z.number().openapi({
      description: "r with R's ccf normalisation at the best lag (the table's `r_full`)",
    }),
    n: z.number().int(),
    n_eff: z.number(),
    p_analytic: z.number().nullable().openapi({
      description: "Not adjusted for searching the lag window; null when N_eff ≤ 2",
    }),
    p_monte_carlo: nullWithoutMonteCarlo("Pointwise Monte Carlo p-value at the best lag"),
    p_family_wise: nullWithoutMonteCarlo(
      "Monte Carlo p-value of the best |r| against the surrogates' best |r| over the same window",
    ),
    ci_lower: z.number().nullable(),
    ci_upper: z.number().nullable(),
  }),
  monte_carlo: z.object({
    method: z.enum(["phase", "ar1"]),
    surrogates: z.number().int(),
    seed: z.number().int(),
    family_wise_threshold_95: z.number().openapi({
      description: "95th percentile of the surrogates' largest |r| over the window",
    }),
    p_value_rule: z.string(),
  }).nullable().openapi({ description: "null when no Monte Carlo test was run" }),
  ensemble_spread: LagEnsembleSpread.optional().openapi({
    description: "Present when solar_run has an ensemble: the answer repeated for every member",
  }),
  which_to_trust: z.string().openapi({
    description: "Which p-values to rely on for this result, and why",
  }),
  outputs: z.object({
    solar_preprocessed: OutputSeriesSchema,
    climate_preprocessed: OutputSeriesSchema,
  }),
  warnings,
  cautions,
  inherited,
}).openapi("LagCorrelationResult");

/** The result as `compute` builds it. */
export type LagCorrelationResultIn = z.input<typeof LagCorrelationResult>;
/** The result as stored and read back. */
export type LagCorrelationResultOut = z.output<typeof LagCorrelationResult>;
