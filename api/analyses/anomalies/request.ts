/**
 * Request of the "anomalies" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef, TimeValue } from "../../schemas/series_ref.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";

const BaseBound = TimeValue.openapi({
  description: "ISO 8601 period (`1961`, `1961-01`, `1961-01-01`) or decimal year",
  example: "1961",
});

export const AnomalyRequest = z.object({
  series: SeriesRef,
  base: z.object({
    start: BaseBound,
    end: BaseBound,
  }).openapi({
    description: "Base period, both ends included when given as ISO periods (`1961`..`1990` " +
      "is 1961-01-01 to 1990-12-31); decimal years are taken as [start, end)",
    example: { start: "1961", end: "1990" },
  }),
  climatology: z.enum(["auto", "mean", "monthly"]).default("auto").openapi({
    description: "`mean`: subtract one base-period mean; `monthly`: subtract the base-period " +
      "mean of each calendar month; `auto`: monthly for daily and monthly series, else mean",
    example: "auto",
  }),
}).openapi("AnomalyRequest", {
  example: { series: DEMO_SERIES.TEMP, base: { start: "1961", end: "1990" } },
});

export type AnomalyParams = z.output<typeof AnomalyRequest>;
