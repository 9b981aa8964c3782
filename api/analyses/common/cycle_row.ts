/**
 * A row of the cycle table as the API writes it (schema and conversion from core's
 * `CycleRow`), with ISO 8601 dates beside decimal years; shared by the cycles analysis and
 * the forecast's cycle in progress.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import type { CycleRow } from "../../../core/cycles/mod.ts";
import { formatIsoTime } from "../../../core/time/mod.ts";
import { undefinedAsNull } from "./undefined_as_null.ts";

/** A point of the smoothed series. */
export const CyclePointSchema = z.object({
  date: z.string().openapi({ description: "ISO 8601 month (or year) of the point" }),
  decimal_year: z.number(),
  value: z.number().openapi({ description: "Smoothed value, series units" }),
});

export const CycleRowSchema = z.object({
  index: z.number().int().openapi({ description: "Position in the table, from 1" }),
  number: z.number().int().nullable().openapi({
    description: "Cycle number from the numbering anchor; null without an anchor",
  }),
  in_progress: z.boolean().openapi({
    description: "True for the last cycle, whose ending minimum is not yet seen",
  }),
  start: CyclePointSchema.openapi({ description: "Starting minimum" }),
  maximum: CyclePointSchema.extend({
    provisional: z.boolean().openapi({
      description: "True while the series has not yet fallen from it (the cycle may still rise)",
    }),
  }).nullable().openapi({ description: "Smoothed maximum" }),
  end: CyclePointSchema.nullable().openapi({
    description: "Ending minimum (the next cycle's start); null in progress",
  }),
  length_years: z.number().nullable().openapi({
    description: "end − start, years; null in progress",
  }),
  rise_years: z.number().nullable().openapi({
    description: "maximum − start, years; null while the maximum is provisional",
  }),
  decline_years: z.number().nullable().openapi({
    description: "end − maximum, years; null in progress",
  }),
  amplitude: z.number().nullable().openapi({
    description: "Smoothed maximum, series units; null while provisional",
  }),
  mean_activity: z.number().nullable().openapi({
    description: "Mean of the unsmoothed values from start to end, series units",
  }),
  integrated_activity: z.number().nullable().openapi({
    description: "Mean activity × duration, series units × years (to the last value in progress)",
  }),
  samples: z.object({
    present: z.number().int(),
    expected: z.number().int(),
  }).openapi({ description: "Values present and expected over the cycle" }),
}).openapi("CycleRow");

/** A cycle row as JSON, with ISO dates beside decimal years. */
export function cycleRowJson(
  r: CycleRow,
  res: "monthly" | "annual",
): z.input<typeof CycleRowSchema> {
  const pt = (p: { time: number; value: number }) => ({
    date: formatIsoTime(p.time, res),
    decimal_year: p.time,
    value: p.value,
  });
  return {
    index: r.index,
    number: r.number,
    in_progress: r.inProgress,
    start: pt(r.start),
    maximum: r.maximum && { ...pt(r.maximum), provisional: r.maximum.provisional },
    end: r.end && pt(r.end),
    length_years: undefinedAsNull(r.length),
    rise_years: undefinedAsNull(r.riseTime),
    decline_years: undefinedAsNull(r.declineTime),
    amplitude: undefinedAsNull(r.amplitude),
    mean_activity: undefinedAsNull(r.meanActivity),
    integrated_activity: undefinedAsNull(r.integratedActivity),
    samples: r.samples,
  };
}
