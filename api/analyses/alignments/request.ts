/**
 * Request of the "alignments" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";

/** Most series in one alignment. */
export const MAX_ALIGNED = 20;

export const AlignRequest = z.object({
  series: z.array(SeriesRef).min(2).max(MAX_ALIGNED).openapi({
    description: `Two to ${MAX_ALIGNED} series`,
  }),
  resolution: z.enum(["daily", "monthly", "annual"]).optional().openapi({
    description: "Common resolution (default: the coarsest input resolution)",
    example: "monthly",
  }),
  rule: z.enum(["intersection", "common_span"]).default("intersection").openapi({
    description: "`intersection`: only periods where every series has a covered value; " +
      "`common_span`: every period of the overlap, with null where a series lacks a value",
    example: "intersection",
  }),
  min_days_per_month: z.number().int().min(1).max(31).default(20),
  min_months_per_year: z.number().int().min(1).max(12).default(10),
  min_points_per_period: z.number().int().min(1).max(100_000).default(1),
}).openapi("AlignRequest", {
  example: { series: [DEMO_SERIES.TEMP, DEMO_SERIES.ENSO], resolution: "annual" },
});

export type AlignParams = z.output<typeof AlignRequest>;
