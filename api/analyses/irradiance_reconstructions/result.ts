/**
 * Result of the "irradiance-reconstructions" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";
import { TsiCycleAmplitudeSchema } from "../common/tsi_cycle_amplitude.ts";
import { UncertaintyBandSchema } from "../common/uncertainty_band.ts";
import { EnsembleSchema } from "../common/ensemble_members.ts";
import { SunspotUncertaintySchema } from "../common/sunspot_errors.ts";
import { ERROR_SOURCES } from "../../../core/irradiance/mod.ts";

const bySource = (what: string) =>
  z.object(
    Object.fromEntries(ERROR_SOURCES.map((s) => [s, z.number()])) as Record<
      typeof ERROR_SOURCES[number],
      z.ZodNumber
    >,
  ).openapi({ description: what });

/** The error model as stored: numbers per cell, 0 where the cell does not depend on a part. */
export const ErrorModelSchema = z.object({
  description: z.string(),
  factors: z.array(z.object({
    source: z.enum(ERROR_SOURCES),
    label: z.string(),
    loading: z.array(z.number()).openapi({ description: "ℓ(t) per cell, W m-2, rounded to 1e-9" }),
  })).openapi({ description: "Standard-normal factors shared by every cell" }),
  processes: z.array(z.object({
    source: z.enum(ERROR_SOURCES),
    label: z.string(),
    loading: z.array(z.number()).openapi({ description: "L(t) per cell, W m-2, rounded to 1e-9" }),
    lag1: z.array(z.number()).openapi({
      description: "Correlation of the unit process with the previous cell (0 for the first)",
    }),
  })).openapi({ description: "Unit-variance processes over the cells" }),
}).openapi("ReconstructionErrorModel");

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
        "number gives a value; `value` is the reconstruction at the best-estimate parameters, " +
        "`uncertainty` the one-sigma predictive SD (the ensemble's with realizations, else the " +
        "analytic one) and `lower`/`upper` the band described by `band`",
    }),
  }),
  band: UncertaintyBandSchema,
  sunspot_uncertainty: SunspotUncertaintySchema,
  variance_by_period: z.array(z.object({
    start: z.number().openapi({ description: "First year of the block" }),
    end: z.number().openapi({ description: "Year after the block (exclusive)" }),
    cells: z.number().int(),
    variance: bySource("Mean analytic variance per source over the cells, W² m-4"),
    share: bySource("Each source's share of the total"),
    total: z.number(),
    dominant: z.enum(ERROR_SOURCES),
    ensemble_variance: z.number().nullable().openapi({
      description: "Mean variance of the ensemble members over the same cells; null without " +
        "an ensemble",
    }),
  })).openapi({
    description: "The predictive variance by source, averaged over blocks of " +
      "`variance_block_years` (first-order, linearised error model)",
  }),
  error_model: ErrorModelSchema.openapi({
    description: "The linearised error model: any covariance between cells follows from it " +
      "(forcing runs use it for the reference period's covariance with each cell)",
  }),
  ensemble: EnsembleSchema.nullable().openapi({
    description: "The members (rounded to 1e-4 W m-2); null with realizations 0",
  }),
  warnings,
  cautions,
  inherited,
}).openapi("ReconstructionResult");

/** The result as `compute` builds it. */
export type ReconstructionResultIn = z.input<typeof ReconstructionResult>;
/** The result as stored and read back. */
export type ReconstructionResultOut = z.output<typeof ReconstructionResult>;
