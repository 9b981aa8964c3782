/**
 * Request of the "forcing" analysis: a TSI series, a reconstruction run or a spectral
 * reconstruction run's integral, the reference (a period, or a window around a cycle minimum)
 * and the planetary albedo.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { PLANETARY_ALBEDO } from "../../../core/irradiance/mod.ts";
import { PeriodInput, TimeInput } from "../common/time_period.ts";
import { runRef } from "../common/run_ref.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";
import { oneOfFields } from "../common/alternatives.ts";

const ForcingReference = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("period"), period: PeriodInput }),
  z.object({
    kind: z.literal("cycle_minimum"),
    time: TimeInput.openapi({
      description: "Time of a cycle minimum (e.g. from a cycle analysis)",
    }),
    half_width_years: z.number().gt(0).max(5).default(0.5).openapi({
      description: "Average TSI over the minimum ± this many years",
    }),
  }),
]).openapi("ForcingReference");

const SpectralIntegralRef = z.object({
  run: runRef("A /v1/irradiance/spectral-reconstructions run"),
  output: z.string().min(1).max(64).default("integral").openapi({
    description: "Which of its integrals: `integral` (over the covered range, the default) or " +
      "a requested range's output name, e.g. `range_200_400`",
  }),
}).openapi("ForcingSpectralIntegral");

export const ForcingRequest = z.object({
  tsi: SeriesRef.optional().openapi({ description: "A TSI series (W m-2)" }),
  reconstruction: runRef(
    "Instead of tsi: a /v1/irradiance/reconstructions run (its uncertainty is carried)",
  ).optional(),
  spectral_reconstruction: SpectralIntegralRef.optional().openapi({
    description: "Instead of tsi: an integral of a spectral reconstruction run (its members " +
      "are carried). A band integral over part of the spectrum is not TSI: the forcing is " +
      "then that of the range's variation only, and the result says so",
  }),
  reference: ForcingReference,
  albedo: z.number().min(0).max(0.99).default(PLANETARY_ALBEDO).openapi({
    description: "Planetary albedo α (IPCC AR6 WG1 §7.3.4.4: 0.29)",
  }),
}).superRefine((v, ctx) => {
  const given = [v.tsi, v.reconstruction, v.spectral_reconstruction].filter((x) => x !== undefined);
  if (given.length !== 1) {
    ctx.addIssue({
      code: "custom",
      path: ["tsi"],
      message: "give exactly one of tsi (a series), reconstruction (a run id) or " +
        "spectral_reconstruction (a run id and an integral's output name)",
    });
  }
}).openapi("ForcingRequest", {
  ...oneOfFields("tsi", "reconstruction", "spectral_reconstruction"),
  example: {
    tsi: DEMO_SERIES.TSIM,
    reference: { kind: "period", period: { start: "1986", end: "1996" } },
  },
});

export type ForcingParams = z.output<typeof ForcingRequest>;
