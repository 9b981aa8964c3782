/**
 * Request of the "smoothing" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";

export const SmoothingRequest = z.object({
  series: SeriesRef,
  method: z.enum(["13_month", "running_mean", "gaussian"]).default("13_month").openapi({
    description: "`13_month`: the standard 13-month smoothed sunspot number (half weights at " +
      "±6 months; monthly series); `running_mean`: centred mean over `window` samples (an even " +
      "window averages the two straddling means: half weights at both ends); `gaussian`: " +
      "Gaussian kernel of standard deviation `sigma` samples, truncated at 3 sigma",
    example: "13_month",
  }),
  window: z.number().int().min(1).max(1200).default(13).openapi({
    description: "Running-mean window, samples (months or years)",
    example: 13,
  }),
  sigma: z.number().positive().max(600).default(6).openapi({
    description: "Gaussian standard deviation, samples",
    example: 6,
  }),
  max_missing_weight: z.number().min(0).max(0.5).default(0).openapi({
    description: "Largest share of a window's weight that may fall on missing samples (the " +
      "present ones are then reweighted); above it the value is null. 0 (default): complete " +
      "windows only, so no value is biased by a gap",
    example: 0,
  }),
}).openapi("SmoothingRequest", {
  example: { series: DEMO_SERIES.SSN, method: "13_month" },
});

export type SmoothingParams = z.output<typeof SmoothingRequest>;
