/**
 * Result of the "cycle-fits" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SunspotInput } from "../common/sunspot_input.ts";
import { cautions, inherited, outputs, warnings } from "../common/result_parts.ts";

const se = z.number().nullable();

/** A parameter estimate with its standard error, and the error inflated for AR(1) residuals. */
const Estimate = z.object({
  value: z.number(),
  units: z.string(),
  standard_error: se.openapi({ description: "From (JᵀJ)⁻¹s² at the solution; null if singular" }),
  standard_error_ar1: se.openapi({
    description: "standard_error × the AR(1) inflation √((1 + r1)/(1 − r1))",
  }),
});

const FittedCycle = z.object({
  index: z.number().int().openapi({ description: "Row of the cycle table" }),
  number: z.number().int().nullable(),
  window: z.object({
    start: z.string().openapi({ description: "ISO 8601 starting minimum" }),
    end: z.string().openapi({ description: "ISO 8601 ending minimum (excluded)" }),
    points: z.number().int().openapi({ description: "Monthly values fitted" }),
  }),
  t0: z.object({
    date: z.string(),
    decimal_year: z.number().openapi({ description: "Start t0 of the shape function" }),
    standard_error_years: se,
    standard_error_years_ar1: se,
  }),
  a: Estimate.openapi({ description: "Amplitude parameter, series units per month³" }),
  b: Estimate.extend({
    derived: z.boolean().openapi({ description: "True when b = b(a) (amplitude-dependent width)" }),
  }).openapi({ description: "Width, months" }),
  c: z.number().openapi({ description: "Asymmetry parameter (fixed at 0.71)" }),
  maximum: z.object({
    date: z.string(),
    decimal_year: z.number(),
    value: z.number().openapi({ description: "Height of the fitted curve, series units" }),
    time_standard_error_years: se,
    value_standard_error: se,
  }),
  rise_months: z.number().openapi({ description: "Months from t0 to the fitted maximum" }),
  observed: z.object({
    maximum_date: z.string(),
    amplitude: z.number().nullable().openapi({ description: "Smoothed maximum, series units" }),
    rise_months: z.number(),
  }),
  residual_sd: z.number().openapi({ description: "√(RSS/dof), series units" }),
  r_squared: z.number().nullable().openapi({
    description: "1 − RSS/TSS over the window's values; null when they are constant",
  }),
  residual_lag1: z.number().openapi({ description: "Lag-1 autocorrelation of the residuals" }),
  autocorrelation_inflation: z.number(),
  dof: z.number().int(),
}).openapi("FittedCycle");

/** The Waldmeier relation fitted across cycles. */
const Relation = z.object({
  n: z.number().int(),
  form: z.string(),
  intercept: z.object({ value: z.number(), standard_error: se }).openapi({
    description: "Months",
  }),
  slope: z.object({ value: z.number(), standard_error: se }).openapi({
    description: "Months × series units (version 1 scale)",
  }),
  correlation_rise_amplitude: z.number().openapi({
    description: "Pearson correlation of rise time with amplitude (negative: the Waldmeier effect)",
  }),
  residual_sd_months: se,
  published: z.object({
    intercept: z.number(),
    slope: z.number(),
    rms_difference: z.number().openapi({
      description: "Root-mean-square difference of the published relation from these cycles' " +
        "rise times, months",
    }),
    source: z.string(),
  }),
}).nullable().openapi({ description: "null with fewer than 3 cycles of positive amplitude" });

export const CycleFitsResult = z.object({
  input: SunspotInput,
  model: z.object({
    function: z.string(),
    source: z.string(),
    width: z.enum(["free", "amplitude_dependent"]),
    overlap: z.enum(["backfit", "none"]),
    amplitude_scale: z.number().openapi({ description: "Factor to the version 1 scale" }),
    solver: z.string(),
  }),
  cycles: z.array(FittedCycle),
  waldmeier: z.object({ observed: Relation, fitted: Relation }),
  outputs: outputs(["fitted"]),
  warnings,
  cautions,
  inherited,
}).openapi("CycleFitsResult");

/** The result as `compute` builds it. */
export type CycleFitsResultIn = z.input<typeof CycleFitsResult>;
/** The result as stored and read back. */
export type CycleFitsResultOut = z.output<typeof CycleFitsResult>;
