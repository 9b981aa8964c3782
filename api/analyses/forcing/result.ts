/**
 * Result of the "forcing" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";

export const ForcingResult = z.object({
  formula: z.string(),
  albedo: z.number().openapi({ description: "Planetary albedo α" }),
  reference: z.object({
    start: z.number().openapi({ description: "Decimal year, inclusive" }),
    end: z.number().openapi({ description: "Decimal year, exclusive" }),
    label: z.string(),
    tsi: z.number().openapi({ description: "Mean TSI of the reference, W m-2" }),
    points: z.number().int().openapi({ description: "Points averaged" }),
  }),
  reference_sd: z.number().nullable().openapi({
    description: "Mean one-sigma TSI uncertainty in the reference, W m-2; null without one",
  }),
  source: z.string().openapi({ description: "The series or run the TSI came from" }),
  outputs: z.object({
    forcing: OutputSeriesSchema.openapi({
      description: "ΔF, W m-2; null where the TSI has no value",
    }),
  }),
  warnings,
  cautions,
  inherited,
}).openapi("ForcingResult");

/** The result as `compute` builds it. */
export type ForcingResultIn = z.input<typeof ForcingResult>;
/** The result as stored and read back. */
export type ForcingResultOut = z.output<typeof ForcingResult>;
