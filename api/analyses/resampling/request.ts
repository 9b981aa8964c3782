/**
 * Request of the "resampling" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";

export const ResampleRequest = z.object({
  series: SeriesRef,
  to: z.enum(["daily", "monthly", "annual"]).openapi({
    description: "Target resolution; not finer than the input's (daily needs irregular input)",
    example: "monthly",
  }),
  min_days_per_month: z.number().int().min(1).max(31).default(20).openapi({
    description: "Daily values a month needs for a monthly mean (daily input)",
    example: 20,
  }),
  min_months_per_year: z.number().int().min(1).max(12).default(10).openapi({
    description: "Monthly values a year needs for an annual mean (monthly input, or daily " +
      "input after the monthly stage)",
    example: 10,
  }),
  max_missing_run_days: z.number().int().min(0).max(31).optional().openapi({
    description: "Daily input: a month whose longest run of consecutive missing days exceeds " +
      "this is a gap, whatever its count (with min_days_per_month = days − 10 and 4 here, the " +
      'common "at most 10 missing, fewer than 5 in a row" practice); default no limit',
    example: 4,
  }),
  min_points_per_period: z.number().int().min(1).max(100_000).default(1).openapi({
    description: "Points a period needs when the input is irregular",
    example: 1,
  }),
}).openapi("ResampleRequest", {
  example: { series: DEMO_SERIES.TEMP, to: "annual" },
});

export type ResampleParams = z.output<typeof ResampleRequest>;
