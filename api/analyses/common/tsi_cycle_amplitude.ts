/**
 * The solar-cycle amplitude of a TSI series as irradiance results report it (the check of
 * core/irradiance/cycle_amplitude.ts against the measured 0.9–1.6 W m-2), schema and JSON.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import type { TsiCycleAmplitude } from "../../../core/irradiance/mod.ts";

export const TsiCycleAmplitudeSchema = z.object({
  median: z.number().nullable().openapi({
    description: "Median maximum-minus-preceding-minimum of annual means, W m-2; null when no " +
      "cycle is found",
  }),
  cycles: z.array(z.object({
    minimum_year: z.number().int(),
    maximum_year: z.number().int(),
    amplitude: z.number().openapi({ description: "W m-2" }),
  })),
}).openapi("TsiCycleAmplitude");

/** Core's amplitude as stored. */
export function cycleAmplitudeJson(a: TsiCycleAmplitude): z.input<typeof TsiCycleAmplitudeSchema> {
  return {
    median: a.median,
    cycles: a.cycles.map((c) => ({
      minimum_year: c.minimumYear,
      maximum_year: c.maximumYear,
      amplitude: c.amplitude,
    })),
  };
}
