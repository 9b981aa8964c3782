/**
 * Result of the "anomalies" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";
import { InputSummary } from "../common/input_summary.ts";

export const AnomalyResult = z.object({
  input: InputSummary,
  base: z.object({
    start: z.number().openapi({ description: "Start of the base period, decimal years" }),
    end: z.number().openapi({ description: "End of the base period (exclusive), decimal years" }),
    start_date: z.string().openapi({ description: "ISO 8601 first day of the base period" }),
    last_date: z.string().openapi({ description: "ISO 8601 last day of the base period" }),
    climatology: z.enum(["mean", "monthly"]),
    means: z.array(z.object({
      month: z.number().int().min(1).max(12).optional().openapi({
        description: "Calendar month (monthly climatology only)",
      }),
      mean: z.number().openapi({ description: "Base-period mean, in the series' units" }),
      count: z.number().int().openapi({ description: "Points it rests on" }),
    })),
  }),
  outputs: z.object({ anomalies: OutputSeriesSchema, baseline: OutputSeriesSchema }).openapi({
    description: "`anomalies`: the series minus `baseline`, the value subtracted at each point",
  }),
  warnings,
  cautions,
  inherited,
}).openapi("AnomalyResult");

/** The result as `compute` builds it. */
export type AnomalyResultIn = z.input<typeof AnomalyResult>;
/** The result as stored and read back. */
export type AnomalyResultOut = z.output<typeof AnomalyResult>;
