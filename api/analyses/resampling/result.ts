/**
 * Result of the "resampling" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";
import { InputSummary } from "../common/input_summary.ts";

export const ResampleResult = z.object({
  input: InputSummary,
  to: z.enum(["daily", "monthly", "annual"]),
  rule: z.string().openapi({ description: "The coverage rule applied, in words" }),
  required: z.number().int().openapi({
    description: "The count a period needs (days, months or points of the last stage)",
  }),
  periods: z.number().int().openapi({ description: "Output periods" }),
  covered: z.number().int().openapi({ description: "Periods that meet the coverage rule" }),
  gaps: z.number().int().openapi({ description: "Periods that do not (null values)" }),
  coverage: z.array(z.object({
    period: z.string().openapi({ description: "ISO 8601 period" }),
    decimal_year: z.number().openapi({ description: "Middle of the period" }),
    start: z.number().openapi({ description: "Start of the period, decimal years" }),
    end: z.number().openapi({ description: "End of the period (exclusive), decimal years" }),
    count: z.number().int().openapi({ description: "Values averaged in the last stage" }),
    points: z.number().int().openapi({ description: "Input points in the period" }),
    required: z.number().int(),
    longest_missing_run: z.number().int().optional().openapi({
      description: "Daily to monthly only: the longest run of consecutive missing days",
    }),
    covered: z.boolean(),
  })),
  outputs: z.object({ resampled: OutputSeriesSchema }).openapi({
    description: "`resampled`: the period means, null where a period fails the coverage rule",
  }),
  warnings,
  cautions,
  inherited,
}).openapi("ResampleResult");

/** The result as `compute` builds it. */
export type ResampleResultIn = z.input<typeof ResampleResult>;
/** The result as stored and read back. */
export type ResampleResultOut = z.output<typeof ResampleResult>;
