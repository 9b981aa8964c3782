/**
 * Result of the "forcing" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { UncertaintyBandSchema } from "../common/uncertainty_band.ts";
import { EnsembleSchema } from "../common/ensemble_members.ts";
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
    description: "One-sigma uncertainty of the reference mean TSI, W m-2 (analytic); null " +
      "without input uncertainty",
  }),
  uncertainty_method: z.string().openapi({
    description: "How the forcing's uncertainty was computed",
  }),
  source: z.string().openapi({ description: "The series or run the TSI came from" }),
  band: UncertaintyBandSchema.nullable().openapi({
    description: "What the forcing's interval contains and leaves out (a reconstruction's " +
      "statement, passed on); null without uncertainty",
  }),
  outputs: z.object({
    forcing: OutputSeriesSchema.openapi({
      description: "ΔF, W m-2; null where the TSI has no value",
    }),
  }),
  ensemble: EnsembleSchema.nullable().openapi({
    description: "Forcing members (rounded to 1e-6 W m-2), one per member of the " +
      "reconstruction's ensemble, each against its own reference mean; null without one",
  }),
  warnings,
  cautions,
  inherited,
}).openapi("ForcingResult");

/** The result as `compute` builds it. */
export type ForcingResultIn = z.input<typeof ForcingResult>;
/** The result as stored and read back. */
export type ForcingResultOut = z.output<typeof ForcingResult>;
