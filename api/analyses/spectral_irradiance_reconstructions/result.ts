/**
 * Result of the "spectral-irradiance-reconstructions" analysis: the spectrum per band over
 * the period with its uncertainty, the integral over the covered range and over the requested
 * ranges, the TSI reconstruction of the same proxies and the integral's difference from it,
 * relative cycle variability per band, where the values come from, what the intervals contain,
 * and with `realizations` the members of every band and integral.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";
import { BandBounds, SpectrumBlock } from "../common/spectrum_block.ts";
import { SpectralCoverageJson } from "../spectral_irradiance_models/result.ts";
import { SunspotUncertaintySchema } from "../common/sunspot_errors.ts";
import { UncertaintyBandSchema } from "../common/uncertainty_band.ts";
import { SpectralEnsembleSchema } from "./ensemble.ts";

const SourceCoverage = z.object({
  cells: z.number().int(),
  start: z.number().nullable(),
  end: z.number().nullable(),
});

const BandVariability = z.object({
  band: BandBounds,
  amplitude: z.number().nullable().openapi({
    description: "Mean over the cycles of (annual mean at the maximum − at the preceding " +
      "minimum), band units; negative when the band falls as activity rises",
  }),
  min: z.number().nullable().openapi({ description: "Smallest single-cycle change" }),
  max: z.number().nullable().openapi({ description: "Largest single-cycle change" }),
  level: z.number().nullable().openapi({ description: "Mean annual level at those extrema" }),
  relative: z.number().nullable().openapi({
    description: "amplitude / level; null when the band has no value at any cycle's extrema",
  }),
});

export const SpectralReconstructionResult = z.object({
  model: z.string().openapi({ description: "Id of the spectral model run" }),
  tsi_model: z.string().openapi({ description: "Id of the TSI model run it builds on" }),
  resolution: z.enum(["daily", "monthly", "annual"]),
  period: z.object({ start: z.number(), end: z.number() }),
  level: z.number(),
  sunspot_conversion: z.string().nullable(),
  sunspot_uncertainty: SunspotUncertaintySchema,
  coverage: z.object({
    cells: z.number().int(),
    direct: SourceCoverage.openapi({ description: "Cells where every proxy was observed" }),
    back_extended: SourceCoverage.openapi({
      description: "Cells where some proxy was mapped from sunspot number",
    }),
    missing: z.number().int(),
  }).openapi({ description: "Of the integral over the covered range (as of every band)" }),
  source_segments: z.array(z.object({
    source: z.enum(["none", "direct", "back_extended"]),
    start: z.number(),
    end: z.number(),
    cells: z.number().int(),
  })),
  spectrum: SpectrumBlock,
  ranges: z.array(z.object({
    output: z.string().openapi({ description: "Name of the range's output series" }),
    range: BandBounds,
    covered_nm: z.number(),
    missing: z.array(z.tuple([z.number(), z.number()])).openapi({
      description: "Parts of the range no band covers, nm (left out, not invented)",
    }),
  })),
  consistency: z.object({
    spectral_coverage: SpectralCoverageJson,
    full_coverage: z.boolean(),
    compared_cells: z.number().int(),
    within: z.number().int().openapi({
      description: "Cells where |integral − TSI| ≤ 1.96 × the SD of the difference (from the " +
        "two models' coefficients and the mapped proxies, not measurement noise)",
    }),
    fraction_within: z.number().nullable(),
    inside_tsi_interval: z.number().nullable().openapi({
      description: "Fraction of cells whose integral lies inside the TSI reconstruction's " +
        "prediction interval",
    }),
    mean_difference: z.number().nullable().openapi({ description: "W m-2" }),
    rms_difference: z.number().nullable(),
    max_abs_z: z.number().nullable(),
    outside: z.array(z.object({
      start: z.number(),
      end: z.number(),
      cells: z.number().int(),
      max_abs_difference: z.number(),
    })).openapi({ description: "Runs of cells where the difference exceeds its uncertainty" }),
    verdict: z.string(),
  }).nullable().openapi({
    description: "The integral against the TSI reconstruction of the same proxies; null when " +
      "the model has no cross-band correlation (no integral)",
  }),
  variability: z.object({
    cycles: z.array(z.object({ minimum_year: z.number().int(), maximum_year: z.number().int() }))
      .openapi({ description: "Cycles of the TSI reconstruction of the same proxies" }),
    bands: z.array(BandVariability),
  }),
  chart_bands: z.array(z.number().int()).openapi({
    description: "Indices of the bands the chart draws over time",
  }),
  outputs: z.record(z.string(), OutputSeriesSchema).openapi({
    description: "integral (the covered range, W m-2), range_<lower>_<upper> per requested " +
      "range, tsi (the TSI reconstruction of the same proxies) and integral_minus_tsi",
  }),
  band: UncertaintyBandSchema.openapi({
    description: "What the intervals of the bands and integrals contain and what they do not " +
      "(the TSI output keeps its analytic interval)",
  }),
  ensemble: SpectralEnsembleSchema.nullable().openapi({
    description: "The members of every band and integral (offsets from the central values); " +
      "null with realizations 0",
  }),
  warnings,
  cautions,
  inherited,
}).openapi("SpectralReconstructionResult");

/** The result as `compute` builds it. */
export type SpectralReconstructionResultIn = z.input<typeof SpectralReconstructionResult>;
/** The result as stored and read back. */
export type SpectralReconstructionResultOut = z.output<typeof SpectralReconstructionResult>;
