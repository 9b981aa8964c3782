/**
 * Result of the "smoothing" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";

export const SmoothingResult = z.object({
  input: z.object({
    id: z.string(),
    name: z.string(),
    quantity: z.string(),
    resolution: z.enum(["monthly", "annual"]),
    n: z.number().int(),
  }),
  method: z.enum(["13_month", "running_mean", "gaussian"]),
  parameters: z.object({
    window: z.number().int().nullable().openapi({ description: "Running-mean window, samples" }),
    sigma: z.number().nullable().openapi({ description: "Gaussian standard deviation, samples" }),
    truncate_sigma: z.number().nullable(),
    max_missing_weight: z.number(),
  }),
  kernel_weights: z.array(z.number()).nullable().openapi({
    description: "Weights of the 13-month or running-mean kernel; null for the Gaussian",
  }),
  grid: z.object({
    start: z.string().openapi({ description: "ISO 8601 first grid time" }),
    end: z.string(),
    points: z.number().int(),
    missing: z.number().int(),
  }),
  defined: z.number().int().openapi({ description: "Number of defined smoothed values" }),
  outputs: z.object({ smoothed: OutputSeriesSchema }),
  warnings,
  inherited,
}).openapi("SmoothingResult");

/** The result as `compute` builds it. */
export type SmoothingResultIn = z.input<typeof SmoothingResult>;
/** The result as stored and read back. */
export type SmoothingResultOut = z.output<typeof SmoothingResult>;
