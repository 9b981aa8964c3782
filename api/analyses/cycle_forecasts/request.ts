/**
 * Request of the "cycle-forecasts" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { CycleDetectionFields } from "../common/cycle_detection.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";

export const CycleForecastsRequest = z.object({
  series: SeriesRef,
  ...CycleDetectionFields,
  seed: z.number().int().min(0).max(4294967295).default(1),
  replicates: z.number().int().min(20).max(5000).default(200).openapi({
    description: "Bootstrap replicates of the forecast band",
    example: 200,
  }),
  hindcast_replicates: z.number().int().min(20).max(2000).default(100).openapi({
    description: "Bootstrap replicates of each hindcast case",
    example: 100,
  }),
  block_length: z.number().int().min(1).max(60).default(6).openapi({
    description: "Block length (months) of the moving-block residual bootstrap; 1 = ordinary " +
      "residual bootstrap",
    example: 6,
  }),
  level: z.number().gt(0).lt(1).default(0.9).openapi({
    description: "Central probability of the band",
    example: 0.9,
  }),
  width: z.enum(["amplitude_dependent", "free"]).default("amplitude_dependent").openapi({
    description: "Shape fit: `amplitude_dependent` (a and t0, b = b(a); steadier early in a " +
      "cycle) or `free` (a, t0, b)",
    example: "amplitude_dependent",
  }),
  previous_cycle_overlap: z.boolean().default(true).openapi({
    description: "Remove the fitted tail of the previous cycle before fitting, and add it back " +
      "to the forecast",
    example: true,
  }),
}).openapi("CycleForecastsRequest", {
  example: { series: DEMO_SERIES.SSN, replicates: 200, hindcast_replicates: 50, seed: 1 },
});

export type CycleForecastsParams = z.output<typeof CycleForecastsRequest>;
