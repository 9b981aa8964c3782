/**
 * Request of the "irradiance-reconstructions" analysis: a model run, direct proxy series per
 * term, a sunspot-number series for back-extension, the period and resolution of the cells,
 * the interval level, an optional secular background scenario, the sunspot number's
 * uncertainty and the ensemble.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { parsePeriod, PeriodInput } from "../common/time_period.ts";
import { periodKeyRange } from "../../../core/series/mod.ts";
import { runRef } from "../common/run_ref.ts";
import { MAX_ENSEMBLE_VALUES } from "../common/ensemble_members.ts";
import { MAX_REALIZATIONS, SUNSPOT_SCALE_CORRELATION_YEARS } from "../../../core/irradiance/mod.ts";
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

const SunspotUncertaintyRequest = z.object({
  source: z.enum(["auto", "series", "model", "none"]).default("auto").openapi({
    description: "The sunspot number's own error, propagated where proxies are mapped from it: " +
      "`series` its own one-sigma uncertainties (taken as independent between values), " +
      "`model` the documented model that grows back in time (a scale error correlated over " +
      "decades, 5 % since 1981 to 40 % before 1749, and Poisson-like counting noise; see the " +
      "result's `sunspot_uncertainty`), `auto` the series' own when it has them, else the " +
      "model, `none` taken as exact",
  }),
  multiplier: z.number().min(0).max(10).default(1).openapi({
    description: "Scale both parts of the sunspot number's error by this factor",
  }),
  correlation_years: z.number().gt(0).max(1000).default(SUNSPOT_SCALE_CORRELATION_YEARS).openapi({
    description: "Correlation time τ (years) of the model's scale error: e^{−Δt/τ} between " +
      "cells Δt apart",
  }),
}).openapi("SunspotUncertaintyRequest");

/** Cells of a period at a resolution, or null when the period does not parse (compute says why). */
function periodCells(
  period: { start: string | number; end: string | number },
  resolution: "daily" | "monthly" | "annual",
): number | null {
  try {
    const span = parsePeriod(period, "/period");
    return periodKeyRange(span.start, span.end, resolution).count;
  } catch {
    return null;
  }
}

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
  sunspot_uncertainty: SunspotUncertaintyRequest.default({
    source: "auto",
    multiplier: 1,
    correlation_years: SUNSPOT_SCALE_CORRELATION_YEARS,
  }),
  realizations: z.number().int().min(0).max(MAX_REALIZATIONS).default(0).openapi({
    description: "Seeded ensemble members to draw (0 to 1,000; 0 = none): each draws the " +
      "calibration coefficients, the mapping parameters, the sunspot number's error and the " +
      "residual processes jointly. With members the band is the ensemble's. members × cells " +
      `is limited to ${MAX_ENSEMBLE_VALUES.toLocaleString("en")} in a JSON result: 1,000 ` +
      "members fit annual or monthly cells over 1700–2025, not daily ones",
  }),
  seed: z.number().int().min(0).max(4294967295).default(1).openapi({
    description: "Seed of the ensemble: member m draws from the random stream (seed, m)",
  }),
  variance_block_years: z.number().int().min(1).max(1000).default(50).openapi({
    description: "Length of the blocks of years over which the variance is summarised by " +
      "source (`variance_by_period`)",
  }),
}).superRefine((v, ctx) => {
  // the ensemble's size is known from the request alone: refuse it here, before any run is
  // queued (the adapter checks again with the cells it builds)
  const cells = v.realizations > 0 ? periodCells(v.period, v.resolution) : null;
  if (cells !== null && v.realizations * cells > MAX_ENSEMBLE_VALUES) {
    ctx.addIssue({
      code: "custom",
      path: ["realizations"],
      message:
        `${v.realizations} realizations × ${cells} ${v.resolution} cells = ${
          v.realizations * cells
        } member values, more than the ${MAX_ENSEMBLE_VALUES} a JSON result holds; ask for ` +
        "fewer realizations, a shorter period or coarser (monthly or annual) cells (set by " +
        "/realizations, /period, /resolution)",
    });
  }
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
