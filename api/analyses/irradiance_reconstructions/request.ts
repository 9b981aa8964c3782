/**
 * Request of the "irradiance-reconstructions" analysis: a model run, direct proxy series per
 * term, a sunspot-number series for back-extension, the period and resolution of the cells,
 * the interval level and an optional secular background scenario.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { PeriodInput } from "../common/time_period.ts";
import { runRef } from "../common/run_ref.ts";
import { SunspotConversion } from "../../schemas/sunspot_conversion.ts";
import { DEMO_SERIES, EXAMPLE_RUN_ID } from "../../schemas/examples.ts";

const SecularBackgroundRequest = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("none") }),
  z.object({
    kind: z.literal("sunspot_running_mean"),
    window_years: z.number().min(1).max(100).default(11),
    reference_minimum: PeriodInput.openapi({
      description: "Period of the reference minimum (e.g. a grand minimum)",
    }),
    later_period: PeriodInput.openapi({
      description: "Later period whose background exceeds the reference by delta_tsi",
    }),
    delta_tsi: z.number().min(-10).max(10).openapi({
      description: "Background change from the reference minimum to the later period, W m-2",
    }),
  }).openapi({
    description: "A scenario, not a measurement: B(t) ∝ the running mean of sunspot number, " +
      "scaled so that its change from reference_minimum to later_period is delta_tsi, and zero " +
      "on average over the calibration period",
  }),
]).openapi("SecularBackground");

export const ReconstructionRequest = z.object({
  model: runRef("Id of a succeeded /v1/irradiance/models run"),
  proxies: z.array(z.object({
    term: z.string().min(1).max(40).openapi({ description: "A term name of the model" }),
    series: SeriesRef,
  })).max(6).default([]).openapi({
    description: "Direct proxy series per model term; where a term has no value the " +
      "reconstruction back-extends from sunspot_number",
  }),
  sunspot_number: SeriesRef.optional().openapi({
    description: "Sunspot-number series for back-extension; its version must match the " +
      "model's unless `sunspot_conversion` is given",
  }),
  sunspot_conversion: SunspotConversion.optional().openapi({
    description: "How to put the sunspot series on the model's version: " +
      '`{"method": "published"}` (the time-dependent conversion between versions 1 and 2) ' +
      'or a constant `{"factor": f}` (warned about when the series crosses 1849, 1868 or ' +
      "1947, where the ratio of the versions changes)",
  }),
  period: PeriodInput.openapi({
    description: "The cells are every day, month or year from the one holding the start to " +
      "the one holding the last instant before the end: ISO bounds name whole periods, so " +
      '"2001-01" to "2001-12" is 12 months and "2001-01-01" to "2001-01-31" is 31 days',
  }),
  resolution: z.enum(["daily", "monthly", "annual"]).default("monthly"),
  level: z.number().min(0.5).max(0.999).default(0.95).openapi({
    description: "Level of the prediction intervals",
  }),
  background: SecularBackgroundRequest.default({ kind: "none" }),
}).superRefine((v, ctx) => {
  const seen = new Set<string>();
  v.proxies.forEach((p, i) => {
    if (seen.has(p.term)) {
      ctx.addIssue({ code: "custom", path: ["proxies", i, "term"], message: "duplicate term" });
    }
    seen.add(p.term);
  });
}).openapi("ReconstructionRequest", {
  example: {
    model: EXAMPLE_RUN_ID,
    sunspot_number: DEMO_SERIES.SSN,
    proxies: [{ term: "mg_ii", series: DEMO_SERIES.MG }],
    period: { start: "1700", end: "2025" },
    resolution: "annual",
  },
});

export type ReconstructionParams = z.output<typeof ReconstructionRequest>;
