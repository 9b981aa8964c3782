/**
 * Result of the "composites" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeasonalCycleSchema } from "../common/seasonal_cycle.ts";
import { cautions, inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";

const noEpochData = (what: string) =>
  z.number().nullable().openapi({
    description: `${what}; null where no epoch has a value at this offset`,
  });

export const CompositeResult = z.object({
  resolution: z.enum(["monthly", "annual"]),
  offset_unit: z.enum(["months", "years"]),
  epochs_used: z.array(z.string()).openapi({ description: "ISO 8601 periods of the epochs" }),
  epochs_dropped: z.array(z.string()).openapi({
    description: "Epochs whose window does not fit inside the series",
  }),
  min_spacing: z.number().int().openapi({
    description: "Smallest spacing of the epochs used, in `offset_unit`; random epoch sets " +
      "keep it",
  }),
  window: z.object({
    before: z.number().int().openapi({ description: "Offsets before the epoch" }),
    after: z.number().int().openapi({ description: "Offsets after the epoch" }),
  }),
  seasonal_cycle: SeasonalCycleSchema,
  preprocess: z.enum(["none", "mean", "linear", "quadratic"]),
  baseline: z.enum(["none", "pre_epoch"]),
  offsets: z.array(z.object({
    offset: z.number().int().openapi({ description: "Samples from the epoch" }),
    offset_years: z.number(),
    composite: noEpochData("Mean over the epochs, in the series' units"),
    count: z.number().int().openapi({ description: "Epochs with a value at this offset" }),
    band_lower: noEpochData("95 % bootstrap percentile band over epochs, lower end"),
    band_upper: noEpochData("Upper end of the band"),
    p_random_epochs: noEpochData(
      "Pointwise p-value of |composite| against random epoch sets",
    ),
  })),
  p_family_wise: z.number().openapi({
    description: "p-value of the largest |composite| in the window against the random sets' " +
      "largest",
  }),
  band: z.string(),
  random_epochs: z.string().openapi({ description: "How the random epoch sets were drawn" }),
  outputs: z.object({
    composite: OutputSeriesSchema,
    series_preprocessed: OutputSeriesSchema,
  }).openapi({
    description: "`composite`: against years from the epoch, with its band; " +
      "`series_preprocessed`: the series on the composite's calendar axis after " +
      "preprocessing, null where a period is not covered (a gap)",
  }),
  warnings,
  cautions,
  inherited,
}).openapi("CompositeResult");

/** The result as `compute` builds it. */
export type CompositeResultIn = z.input<typeof CompositeResult>;
/** The result as stored and read back. */
export type CompositeResultOut = z.output<typeof CompositeResult>;
