/**
 * Result of the "energy-balance" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { UncertaintyBandSchema } from "../common/uncertainty_band.ts";
import { EnsembleSchema } from "../common/ensemble_members.ts";
import { cautions, inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";

export const EnergyBalanceResult = z.object({
  model: z.enum(["one_box", "two_box"]),
  parameters: z.object({
    heat_capacity: z.number().openapi({ description: "C, W yr m-2 K-1" }),
    feedback: z.number().openapi({ description: "λ, W m-2 K-1" }),
    deep_heat_capacity: z.number().optional().openapi({
      description: "Two-box only: C_d, W yr m-2 K-1",
    }),
    exchange: z.number().optional().openapi({ description: "Two-box only: γ, W m-2 K-1" }),
    units: z.object({ heat_capacity: z.string(), feedback: z.string(), exchange: z.string() }),
    sources: z.string().openapi({ description: "Where the default parameters come from" }),
  }),
  equilibrium_sensitivity_k_per_w_m2: z.number().openapi({
    description: "1/λ, K per W m-2",
  }),
  sinusoid_analytic: z.object({
    period_years: z.number(),
    gain_k_per_w_m2: z.number().openapi({
      description: "Steady-state amplitude of the surface response per W m-2 of forcing " +
        "amplitude",
    }),
    phase_degrees: z.number(),
    lag_years: z.number(),
    amplitude_k: z.number().optional().openapi({
      description: "With a sinusoidal forcing: response amplitude, K",
    }),
    peak_to_peak_k: z.number().optional(),
  }).openapi({
    description: "Analytic steady-state response to a sinusoid of the forcing's (or 11-year) " +
      "period",
  }),
  sinusoid_numerical: z.object({
    amplitude_k: z.number(),
    peak_to_peak_k: z.number(),
    lag_years: z.number(),
    relative_difference_amplitude: z.number().openapi({
      description: "(numerical − analytic) / analytic amplitude",
    }),
    relative_difference_lag: z.number(),
    fitted_over_years: z.number().openapi({
      description: "Length of the whole periods at the end of the run the sinusoid was fitted to",
    }),
  }).nullable().openapi({
    description: "Amplitude and lag measured on the integrated response by a least-squares " +
      "sinusoid fit; null without a sinusoidal forcing, or when the fit is undefined",
  }),
  outputs: z.object({
    temperature: OutputSeriesSchema,
    deep_temperature: OutputSeriesSchema.optional(),
  }).openapi({
    description: "`temperature`: the surface (mixed-layer) response, with the band of the " +
      "responses to the forcing's members when the forcing run has an ensemble; " +
      "`deep_temperature`: the deep ocean's, two-box only",
  }),
  band: UncertaintyBandSchema.optional().openapi({
    description: "What the response's band contains (the forcing's statement, passed on); " +
      "present only with a forcing ensemble",
  }),
  ensemble: EnsembleSchema.optional().openapi({
    description: "Surface response to each member of the forcing run's ensemble (K, rounded to " +
      "1e-6); present only when the forcing run has one",
  }),
  warnings,
  cautions,
  inherited,
}).openapi("EnergyBalanceResult");

/** The result as `compute` builds it. */
export type EnergyBalanceResultIn = z.input<typeof EnergyBalanceResult>;
/** The result as stored and read back. */
export type EnergyBalanceResultOut = z.output<typeof EnergyBalanceResult>;
