/**
 * Request of the "forcing" analysis: a TSI series or a reconstruction run, the reference (a
 * period, or a window around a cycle minimum) and the planetary albedo.
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

export const ForcingRequest = z.object({
  tsi: SeriesRef.optional().openapi({ description: "A TSI series (W m-2)" }),
  reconstruction: runRef(
    "Instead of tsi: a /v1/irradiance/reconstructions run (its uncertainty is carried)",
  ).optional(),
  reference: ForcingReference,
  albedo: z.number().min(0).max(0.99).default(PLANETARY_ALBEDO).openapi({
    description: "Planetary albedo α (IPCC AR6 WG1 §7.3.4.4: 0.29)",
  }),
}).superRefine((v, ctx) => {
  if ((v.tsi === undefined) === (v.reconstruction === undefined)) {
    ctx.addIssue({
      code: "custom",
      path: ["tsi"],
      message: "give exactly one of tsi (a series) or reconstruction (a run id)",
    });
  }
}).openapi("ForcingRequest", {
  ...oneOfFields("tsi", "reconstruction"),
  example: {
    tsi: DEMO_SERIES.TSIM,
    reference: { kind: "period", period: { start: "1986", end: "1996" } },
  },
});

export type ForcingParams = z.output<typeof ForcingRequest>;
