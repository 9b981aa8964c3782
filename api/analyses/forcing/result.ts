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
  spectral: z.object({
    run: z.string().openapi({ description: "Id of the spectral reconstruction run" }),
    output: z.string().openapi({ description: "The integral used (its output name)" }),
    lower: z.number().openapi({ description: "Shortest wavelength of the range, nm" }),
    upper: z.number().openapi({ description: "Longest wavelength of the range, nm" }),
    covered_nm: z.number().openapi({ description: "Width of the range covered by bands, nm" }),
    missing: z.array(z.tuple([z.number(), z.number()])).openapi({
      description: "Parts of the range no band covers, nm (left out, not invented)",
    }),
    full_coverage: z.boolean().openapi({
      description: "True when the range holds the spectral model's whole integral and that " +
        "covers at least 99 % of a 5772 K blackbody: only then does the integral stand for TSI",
    }),
  }).optional().openapi({
    description: "Present when the input is a spectral reconstruction's integral: the forcing " +
      "is that of the range's variation only (the rest of the spectrum is not included)",
  }),
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
