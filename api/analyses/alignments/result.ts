/**
 * Result of the "alignments" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";
import { InputSummary } from "../common/input_summary.ts";

export const AlignResult = z.object({
  resolution: z.enum(["daily", "monthly", "annual"]),
  rule: z.enum(["intersection", "common_span"]),
  n: z.number().int().openapi({ description: "Periods on the common axis" }),
  start_period: z.string().openapi({ description: "ISO 8601 first period" }),
  end_period: z.string().openapi({ description: "ISO 8601 last period" }),
  inputs: z.array(InputSummary.extend({
    resampling: z.string().openapi({ description: "How the series became period means" }),
    points: z.number().int().openapi({ description: "Input points inside the periods" }),
    covered_periods: z.number().int(),
    uncovered_periods: z.number().int().openapi({
      description: "Periods that failed the coverage rule",
    }),
    dropped_outside_span: z.number().int().openapi({
      description: "Covered periods outside the common span",
    }),
    dropped_by_intersection: z.number().int().openapi({
      description: "Covered periods left out because another series lacks a value",
    }),
  })),
  coverage: z.array(z.object({
    period: z.string().openapi({ description: "ISO 8601 period" }),
    decimal_year: z.number(),
    counts: z.array(z.number().int()).openapi({
      description: "Count behind each series' value (days, months or points), in input order",
    }),
  })),
  outputs: z.record(z.string(), OutputSeriesSchema).openapi({
    description: "`aligned_0`, `aligned_1`, ... in request order: each series on the common " +
      "axis, null where it lacks a covered value (common_span rule)",
  }),
  warnings,
  cautions,
  inherited,
}).openapi("AlignResult");

/** The result as `compute` builds it. */
export type AlignResultIn = z.input<typeof AlignResult>;
/** The result as stored and read back. */
export type AlignResultOut = z.output<typeof AlignResult>;
