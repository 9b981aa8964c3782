/**
 * Request of the "field-composites" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { DEMO_FIELD } from "../../schemas/examples.ts";
import { TimeValue } from "../../schemas/series_ref.ts";
import { RunRef } from "../common/run_ref.ts";
import { fieldRef } from "../common/field_ref.ts";

const dates = (what: string) =>
  z.array(TimeValue).min(2).max(2000).optional().openapi({
    description: `${what}: ISO 8601 (\`1958-03\`) or decimal years`,
    example: ["1968-11", "1979-12", "1989-07", "2000-04", "2014-04"],
  });

export const FieldCompositeRequest = z.object({
  field: fieldRef("The gridded field (POST /v1/fields), monthly or annual"),
  epoch_dates: dates("Key dates of the first set (e.g. solar maxima)"),
  contrast_dates: dates("Key dates of a second set (e.g. minima): the map is first − second"),
  cycle_run: RunRef.optional().openapi({
    description: "Instead of dates: a run with a cycle table (the cycles analysis); its maxima " +
      "(or minima, `cycle_epoch`) are the epochs, and with `contrast: true` the other extrema " +
      "are the second set",
  }),
  cycle_epoch: z.enum(["maximum", "minimum"]).default("maximum"),
  contrast: z.boolean().default(true).openapi({
    description: "With cycle_run: map maxima minus minima (or the reverse), not maxima alone",
  }),
  from_years: z.number().min(-50).max(50).default(0).openapi({
    description: "Start of the window averaged after each epoch, years from the epoch",
  }),
  to_years: z.number().min(-50).max(50).default(2).openapi({
    description: "End of the window (exclusive), years from the epoch; 0..2 averages the two " +
      "years that start at the epoch's time step",
  }),
  preprocess: z.enum(["mean", "linear", "quadratic"]).default("linear").openapi({
    description: "Removed from every cell first (a trend would make late epochs warmer)",
  }),
  deseasonalise: z.boolean().default(true).openapi({
    description: "Monthly fields: remove each calendar month's mean from every cell first",
  }),
  alpha_global: z.number().gt(0).max(0.5).default(0.05),
  fdr_factor: z.number().gt(0).max(4).default(2).openapi({
    description: "The false discovery rate runs at α_FDR = fdr_factor · alpha_global (Wilks 2016)",
  }),
  alpha_local: z.number().gt(0).max(0.5).default(0.05),
  random_sets: z.number().int().min(0).max(100_000).default(1000).refine(
    (m) => m === 0 || m >= 99,
    "0 (no Monte Carlo test) or at least 99",
  ).openapi({
    description: "Random epoch sets for the Monte Carlo field significance; 0 skips it",
  }),
  seed: z.number().int().min(0).max(4294967295).default(1),
}).openapi("FieldCompositeRequest", {
  example: {
    field: DEMO_FIELD,
    epoch_dates: ["1969-03", "1980-01", "1991-01", "2001-06", "2014-04"],
    contrast_dates: ["1964-10", "1976-03", "1986-09", "1996-08", "2008-12"],
    random_sets: 200,
  },
});

export type FieldCompositeParams = z.output<typeof FieldCompositeRequest>;
