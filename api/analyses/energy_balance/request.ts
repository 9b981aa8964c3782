/**
 * Request of the "energy-balance" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { RunRef } from "../common/run_ref.ts";
import { oneOfFields } from "../common/alternatives.ts";

const Sinusoid = z.object({
  amplitude: z.number().positive().max(1000).default(0.08875).openapi({
    description: "Forcing amplitude F₀, W m-2 (default: half of a 1 W m-2 peak-to-peak TSI " +
      "cycle × (1 − 0.29)/4; cycle amplitude and planetary albedo from IPCC AR6 WG1 §7.3.4.4)",
  }),
  period_years: z.number().positive().max(10_000).default(11),
  years: z.number().positive().max(10_000).default(110).openapi({
    description: "Length of the run, years (whole periods are best)",
  }),
  steps_per_year: z.number().int().min(1).max(3660).default(365).openapi({
    description: "Samples of the forcing per year; the first-order-hold integration reads the " +
      "sine piecewise-linearly, lowering the amplitude by about (ωh)²/12",
  }),
}).openapi("SinusoidForcing");

export const EnergyBalanceRequest = z.object({
  model: z.enum(["one_box", "two_box"]).default("one_box"),
  forcing: SeriesRef.optional().openapi({
    description: "Radiative forcing series, W m-2 (e.g. a saved /v1/forcing output)",
  }),
  forcing_run: RunRef.optional().openapi({
    description: "Instead of forcing: a /v1/forcing run (its `forcing` output is used)",
  }),
  sinusoid: Sinusoid.optional().openapi({
    description: "Instead of forcing: F₀ sin(2πt/P), started on the steady state so the " +
      "numerical answer can be compared with the analytic one",
  }),
  heat_capacity: z.number().min(0.01).max(10_000).optional().openapi({
    description: "Mixed-layer heat capacity C, W yr m-2 K-1 (one-box default 8.0, a mixed " +
      "layer of about 60 m of sea water, common practice; two-box default 7.3, Held et al. " +
      "2010, from memory)",
  }),
  feedback: z.number().min(0.01).max(100).optional().openapi({
    description: "Feedback parameter λ, W m-2 K-1 (default 1.3, Held et al. 2010, from memory)",
  }),
  deep_heat_capacity: z.number().min(0.01).max(100_000).optional().openapi({
    description: "Two-box: deep-ocean heat capacity C_d, W yr m-2 K-1 (default 106, Held et " +
      "al. 2010, from memory)",
  }),
  exchange: z.number().min(1e-6).max(100).optional().openapi({
    description: "Two-box: exchange coefficient γ, W m-2 K-1 (default 0.7, Held et al. 2010, " +
      "from memory)",
  }),
}).openapi("EnergyBalanceRequest", {
  ...oneOfFields("forcing", "forcing_run", "sinusoid"),
  example: {
    model: "one_box",
    sinusoid: { amplitude: 0.08875, period_years: 11, years: 110, steps_per_year: 365 },
  },
});

export type EnergyBalanceParams = z.output<typeof EnergyBalanceRequest>;
