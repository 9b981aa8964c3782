/**
 * Result of the "irradiance-reconstructions" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";
import { TsiCycleAmplitudeSchema } from "../common/tsi_cycle_amplitude.ts";
import { CycleAmplitudeCheckSchema } from "./amplitude_check.ts";

const SourceCoverage = z.object({
  cells: z.number().int(),
  start: z.number().nullable().openapi({ description: "First cell middle; null without cells" }),
  end: z.number().nullable().openapi({ description: "Last cell middle; null without cells" }),
});

export const ReconstructionResult = z.object({
  model: z.string().openapi({ description: "Id of the model run" }),
  resolution: z.enum(["daily", "monthly", "annual"]),
  period: z.object({ start: z.number(), end: z.number() }).openapi({
    description: "The requested period, decimal years, end exclusive",
  }),
  level: z.number(),
  interval_quantile: z.number().openapi({
    description: "t(1 − (1 − level)/2, df) of the model, the interval's multiplier",
  }),
  normal_quantile: z.number().openapi({ description: "The normal quantile at the same level" }),
  scenario: z.discriminatedUnion("kind", [
    z.object({ kind: z.literal("none"), label: z.string() }),
    z.object({
      kind: z.literal("sunspot_running_mean"),
      label: z.string(),
      scale: z.number().openapi({ description: "W m-2 per unit of running-mean sunspot number" }),
      reference_mean: z.number(),
      later_mean: z.number(),
      calibration_mean: z.number(),
    }),
  ]).openapi({ description: "The secular background scenario added, labelled" }),
  sunspot_conversion: z.string().nullable().openapi({
    description: "How the sunspot series was converted to the model's version (the published " +
      "time-dependent factors or a constant one), in words; null if not",
  }),
  coverage: z.object({
    cells: z.number().int(),
    direct: SourceCoverage.openapi({ description: "Cells where every proxy was observed" }),
    back_extended: SourceCoverage.openapi({
      description: "Cells where some proxy was mapped from sunspot number",
    }),
    missing: z.number().int().openapi({ description: "Cells without a value" }),
  }),
  source_segments: z.array(z.object({
    source: z.enum(["none", "direct", "back_extended"]),
    start: z.number().openapi({ description: "First cell middle, decimal year" }),
    end: z.number().openapi({ description: "Last cell middle, decimal year" }),
    cells: z.number().int(),
  })).openapi({ description: "Runs of consecutive cells of one source" }),
  cycle_amplitude: TsiCycleAmplitudeSchema,
  cycle_amplitude_check: CycleAmplitudeCheckSchema.openapi({
    description: "The cycle-amplitude plausibility check: each cycle against what its " +
      "sunspot amplitude implies through the model (or, without a sunspot series, the " +
      "satellite-era cycles against the measured range), and what was compared",
  }),
  outputs: z.object({
    tsi: OutputSeriesSchema.openapi({
      description: "TSI per cell, W m-2, rounded to 1e-6; null where no proxy and no sunspot " +
        "number gives a value; `uncertainty` is the one-sigma predictive SD",
    }),
  }),
  warnings,
  cautions,
  inherited,
}).openapi("ReconstructionResult");

/** The result as `compute` builds it. */
export type ReconstructionResultIn = z.input<typeof ReconstructionResult>;
/** The result as stored and read back. */
export type ReconstructionResultOut = z.output<typeof ReconstructionResult>;
