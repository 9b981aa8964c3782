/**
 * Result of the "cycles" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SunspotInput } from "../common/sunspot_input.ts";
import { cautions, inherited, outputs, warnings } from "../common/result_parts.ts";
import { CycleRowSchema } from "../common/cycle_row.ts";
import { SmoothingMethod } from "../common/smoothing_method.ts";

/** Mean, sample standard deviation and range of a property over the complete cycles. */
const CycleStatistic = z.object({
  mean: z.number().nullable().openapi({ description: "null without complete cycles" }),
  sd: z.number().nullable().openapi({
    description: "Sample standard deviation (n − 1); null with fewer than 2 complete cycles",
  }),
  min: z.number().nullable(),
  max: z.number().nullable(),
  n: z.number().int(),
}).openapi("CycleStatistic");

export const CyclesResult = z.object({
  input: SunspotInput.extend({ resolution: z.enum(["monthly", "annual"]) }),
  smoothing: SmoothingMethod.openapi({ description: "Smoothing that defined the extrema" }),
  rule: z.object({
    min_separation_years: z.number(),
    prominence: z.number().openapi({ description: "Prominence threshold used, series units" }),
    prominence_default: z.boolean().openapi({
      description: "True when the threshold is the default (a tenth of the smoothed range)",
    }),
  }),
  cycles: z.array(CycleRowSchema),
  extrema: z.array(z.object({
    kind: z.enum(["minimum", "maximum"]),
    date: z.string().openapi({ description: "ISO 8601 month (or year)" }),
    decimal_year: z.number(),
    value: z.number().openapi({ description: "Smoothed value, series units" }),
    prominence: z.number().openapi({ description: "Topographic prominence, series units" }),
    provisional: z.boolean().openapi({
      description: "A maximum the series has not yet fallen from by the prominence threshold",
    }),
  })),
  summary: z.object({
    complete_cycles: z.number().int(),
    in_progress: z.boolean(),
    length_years: CycleStatistic,
    rise_years: CycleStatistic,
    amplitude: CycleStatistic.openapi({ description: "Smoothed maxima, series units" }),
  }),
  outputs: outputs(["smoothed", "phase", "since_minimum", "cycle"]),
  warnings,
  cautions,
  inherited,
}).openapi("CyclesResult");

/** The result as `compute` builds it. */
export type CyclesResultIn = z.input<typeof CyclesResult>;
/** The result as stored and read back. */
export type CyclesResultOut = z.output<typeof CyclesResult>;
