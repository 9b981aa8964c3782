/**
 * Pieces every analysis' result schema is built from: the series-like output, the warnings
 * and cautions every result carries (its own, and those it inherits from the runs it is built
 * on), and number arrays with their null policy. A result
 * schema describes the stored JSON exactly: the tests parse every result with its schema and
 * require that nothing is stripped, so an undocumented field fails.
 *
 * Null policy (one for the whole service): a number that is undefined by its method (the ends
 * of a 13-month smoothing, a lag with too little overlap) is `null`, and the schema's
 * description says when; a computed NaN or infinity anywhere else is refused by the
 * serializer (`api/runs/json.ts`) as a defect, never silently written as null.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";

/** A finite number. */
export const num = z.number();

/** An array of finite numbers. */
export const nums = z.array(z.number());

/** An array of numbers with null where the method leaves a value undefined. */
export const numsOrNull = z.array(z.number().nullable());

/** What a series-like output's `time` measures. */
export const TimeAxis = z.enum(["decimal_year", "years_from_epoch", "model_years"]).openapi({
  description: "`decimal_year` (default): calendar time on the proleptic Gregorian calendar; " +
    "`years_from_epoch` (superposed-epoch composites) and `model_years` (idealised " +
    "experiments) are not calendar times: no ISO dates, not savable as series",
});

/** A series-like part of a result; fetchable as JSON/CSV/NetCDF and savable as a series. */
export const OutputSeriesSchema = z.object({
  name: z.string(),
  quantity: z.string(),
  units: z.string().openapi({ description: "UDUNITS string" }),
  time: nums.openapi({ description: "Decimal years (or the `time_axis` stated)" }),
  value: numsOrNull.openapi({ description: "null where the value is undefined" }),
  uncertainty: numsOrNull.optional().openapi({ description: "Standard uncertainty (1σ)" }),
  lower: numsOrNull.optional().openapi({ description: "Lower bound of `interval`" }),
  upper: numsOrNull.optional().openapi({ description: "Upper bound of `interval`" }),
  interval: z.string().optional().openapi({
    description: 'What lower/upper bound, e.g. "95 % prediction interval"',
  }),
  time_axis: TimeAxis.optional(),
  description: z.string().optional(),
}).openapi("OutputSeries");

/** Plausibility or data warnings (never silent) and scientific cautions. */
export const warnings = z.array(z.string()).openapi({
  description: "Plausibility or data warnings about this result",
});
export const cautions = z.array(z.string()).openapi({
  description: "Scientific cautions that hold for every result of this kind",
});

/** One warning or caution of a run this run is built on (`api/runs/inherit.ts`). */
export const InheritedNote = z.object({
  run: z.string().openapi({ description: "Id of the run the text comes from" }),
  kind: z.string().openapi({ description: "Its analysis (run kind)" }),
  level: z.enum(["warning", "caution"]),
  text: z.string(),
}).openapi("InheritedNote");

/**
 * The warnings and cautions of the runs this run is built on, added by the run machinery to
 * every result (an analysis never sets it itself).
 */
export const inherited = z.array(InheritedNote).optional().openapi({
  description: "The warnings and cautions of the runs this run is built on: its input runs " +
    "and the runs that made its input series (`derived_from`), recursively. Each text once, " +
    "from the nearest run that carries it; texts this result states itself are not repeated. " +
    "Absent when there are none.",
});

/** Outputs by name. */
export function outputs<K extends string>(names: readonly [K, ...K[]]) {
  return z.object(
    Object.fromEntries(names.map((n) => [n, OutputSeriesSchema])) as Record<
      K,
      typeof OutputSeriesSchema
    >,
  );
}
