/**
 * Result of the "field-composites" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, warnings } from "../common/result_parts.ts";
import { MapPartSchema } from "../common/map_result.ts";
import { FieldFdrSchema, FieldNullSchema, FieldSummary } from "../solar_signal_maps/result.ts";

export const FieldCompositeResult = z.object({
  field: FieldSummary,
  resolution: z.enum(["monthly", "annual"]),
  offset_unit: z.enum(["months", "years"]),
  window: z.object({
    from: z.number().int().openapi({ description: "First step after the epoch, inclusive" }),
    to: z.number().int().openapi({ description: "Last step after the epoch, inclusive" }),
  }),
  epochs_used: z.array(z.string()).openapi({ description: "ISO periods of the first set" }),
  contrast_used: z.array(z.string()).openapi({ description: "ISO periods of the second set" }),
  epochs_dropped: z.array(z.string()).openapi({
    description: "Epochs outside the field or whose window does not fit",
  }),
  statistic: z.string(),
  df: z.number().int(),
  preprocess: z.enum(["mean", "linear", "quadratic"]),
  deseasonalised: z.boolean(),
  cells: z.object({
    grid: z.number().int(),
    analysed: z.number().int(),
    missing: z.number().int(),
  }),
  map: MapPartSchema,
  field_significance: z.object({
    fdr: FieldFdrSchema,
    monte_carlo: z.object({
      random_sets: z.number().int(),
      seed: z.number().int(),
      alpha_local: z.number(),
      method: z.string(),
      observed_fraction: z.number(),
      p_field: z.number(),
      null: FieldNullSchema,
    }).nullable(),
  }),
  warnings,
  cautions,
  inherited,
}).openapi("FieldCompositeResult");

export type FieldCompositeResultIn = z.input<typeof FieldCompositeResult>;
export type FieldCompositeResultOut = z.output<typeof FieldCompositeResult>;
