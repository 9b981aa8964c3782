/**
 * Request of the "composites" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef, TimeValue } from "../../schemas/series_ref.ts";
import { CoverageFields } from "../common/analysis_axis.ts";
import { RunRef } from "../common/run_ref.ts";
import { DeseasonaliseField } from "../common/seasonal_cycle.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";
import { oneOfFields } from "../common/alternatives.ts";

export const CompositeRequest = z.object({
  series: SeriesRef.openapi({ description: "The climate series to composite" }),
  epoch_dates: z.array(TimeValue).min(2).max(2000).optional().openapi({
    description: "Key dates: ISO 8601 (`1958-03`) or decimal years",
    example: ["1947-05", "1958-03", "1968-11", "1979-12", "1989-11"],
  }),
  cycle_run: RunRef.optional().openapi({
    description: "Instead of epoch_dates: a /v1/cycles run; the maxima (or starting minima) " +
      "of its cycle table become the epochs (a provisional maximum is left out)",
  }),
  cycle_epoch: z.enum(["maximum", "minimum"]).default("maximum"),
  resolution: z.enum(["monthly", "annual"]).optional().openapi({
    description: "Axis of the composite (default: the series' own monthly or annual " +
      "resolution; daily series default to monthly)",
  }),
  ...CoverageFields,
  deseasonalise: DeseasonaliseField,
  before_years: z.number().min(0).max(100).default(5),
  after_years: z.number().min(0).max(100).default(5),
  preprocess: z.enum(["none", "mean", "linear", "quadratic"]).default("linear").openapi({
    description: "Removed from the series before compositing (a trend would otherwise make " +
      "late epochs look warmer than early ones)",
  }),
  baseline: z.enum(["none", "pre_epoch"]).default("none").openapi({
    description: "`pre_epoch`: reference each epoch's window to its own mean before the epoch",
  }),
  bootstrap: z.number().int().min(100).max(100_000).default(1000),
  random_sets: z.number().int().min(100).max(100_000).default(1000),
  seed: z.number().int().min(0).max(4294967295).default(1),
}).openapi("CompositeRequest", {
  ...oneOfFields("epoch_dates", "cycle_run"),
  example: {
    series: DEMO_SERIES.TEMP,
    epoch_dates: ["1949-07", "1959-09", "1968-12", "1981-09", "1992-04", "2003-04", "2013-07"],
    before_years: 5,
    after_years: 5,
  },
});

export type CompositeParams = z.output<typeof CompositeRequest>;
