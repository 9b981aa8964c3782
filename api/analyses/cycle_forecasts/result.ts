/**
 * Result of the "cycle-forecasts" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SunspotInput } from "../common/sunspot_input.ts";
import { cautions, inherited, outputs, warnings } from "../common/result_parts.ts";
import { CycleRowSchema } from "../common/cycle_row.ts";

const pair = z.tuple([z.number(), z.number()]);
const datePair = z.tuple([z.string(), z.string()]);

/** Error statistics of hindcast cases (predicted − observed). */
const ErrorStats = z.object({
  mean_error: z.number(),
  mean_absolute_error: z.number(),
  rmse: z.number(),
  coverage: z.number().openapi({
    description: "Share of observed maxima inside the predictive interval",
  }),
});

/** Hindcast cases of one truncation rule and their summary. */
const HindcastSet = z.object({
  summary: z.object({
    cases: z.number().int(),
    maximum_time_years: ErrorStats.openapi({ description: "Errors of the maximum's date, years" }),
    maximum_value: ErrorStats.openapi({ description: "Errors of its value, series units" }),
  }).nullable().openapi({ description: "null when no case could be run" }),
  cases: z.array(z.object({
    index: z.number().int().openapi({ description: "Row of the past cycle in the cycle table" }),
    truncated_at: z.string().openapi({ description: "ISO 8601 month of the last value used" }),
    months_used: z.number().int(),
    predicted: z.object({
      maximum_date: z.string(),
      maximum_decimal_year: z.number(),
      maximum_value: z.number(),
      date_interval: pair.openapi({
        description: "Band of the fitted curve's maximum date, decimal years",
      }),
      value_interval: pair.openapi({ description: "Band of its value, series units" }),
      smoothed_date_interval: pair.nullable().openapi({
        description: "Predictive interval of the smoothed maximum's date, decimal years; null " +
          "when the past cycle's months do not continue past the truncation",
      }),
      smoothed_value_interval: pair.nullable(),
    }),
    observed: z.object({
      maximum_date: z.string(),
      maximum_decimal_year: z.number(),
      maximum_value: z.number().openapi({ description: "Observed smoothed maximum" }),
    }),
    error: z.object({
      time_years: z.number().openapi({ description: "Predicted − observed date, years" }),
      value: z.number().openapi({ description: "Predicted − observed value, series units" }),
    }),
    covered: z.object({ time: z.boolean(), value: z.boolean() }),
    covered_by_curve_band: z.object({ time: z.boolean(), value: z.boolean() }),
  })),
});

export const CycleForecastsResult = z.object({
  input: SunspotInput,
  cycle_in_progress: CycleRowSchema.extend({
    months_observed: z.number().int().openapi({ description: "Values since its minimum" }),
    months_since_minimum: z.number().int(),
  }),
  method: z.object({
    model: z.string(),
    width: z.enum(["amplitude_dependent", "free"]),
    amplitude_scale: z.number().openapi({ description: "Factor to the version 1 scale" }),
    previous_cycle_overlap: z.boolean(),
    band: z.string(),
  }),
  forecast: z.object({
    maximum: z.object({
      date: z.string(),
      decimal_year: z.number(),
      value: z.number().openapi({ description: "Maximum of the forecast curve, series units" }),
      date_interval: datePair,
      decimal_year_interval: pair,
      value_interval: pair,
      smoothed_observation: z.object({
        description: z.string(),
        date_interval: datePair,
        decimal_year_interval: pair,
        value_interval: pair,
      }).nullable(),
      level: z.number(),
      hindcast_interval: z.object({
        cases: z.number().int(),
        date_interval: datePair,
        decimal_year_interval: pair,
        value_interval: pair,
        basis: z.string(),
      }).nullable().openapi({ description: "null with fewer than 10 same-phase hindcasts" }),
    }),
    next_minimum: z.object({
      date: z.string(),
      decimal_year: z.number(),
      sd_years: z.number().nullable(),
      basis: z.string(),
    }).nullable().openapi({ description: "null without complete cycles" }),
    fit: z.object({
      t0: z.number().openapi({ description: "Start of the shape function, decimal year" }),
      a: z.number().openapi({ description: "Series units per month³" }),
      b_months: z.number(),
      residual_sd: z.number(),
      months_fitted: z.number().int(),
    }),
    failed_replicates: z.number().int(),
  }),
  hindcast: z.object({
    description: z.string(),
    same_phase: HindcastSet.extend({ months_used: z.number().int() }),
    mid_rise: HindcastSet,
  }),
  outputs: outputs(["forecast"]),
  warnings,
  cautions,
  inherited,
}).openapi("CycleForecastsResult");

/** The result as `compute` builds it. */
export type CycleForecastsResultIn = z.input<typeof CycleForecastsResult>;
/** The result as stored and read back. */
export type CycleForecastsResultOut = z.output<typeof CycleForecastsResult>;
/** A set of hindcast cases as `compute` builds it. */
export type HindcastSetIn = z.input<typeof HindcastSet>;
