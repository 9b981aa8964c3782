/**
 * Request of the "irradiance-reconstructions" analysis: a model run, direct proxy series per
 * term, a sunspot-number series for back-extension, the period and resolution of the cells,
 * the interval level, an optional secular background scenario, the sunspot number's
 * uncertainty and the ensemble.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { parsePeriod, PeriodInput } from "../common/time_period.ts";
import { periodKeyRange } from "../../../core/series/mod.ts";
import { runRef } from "../common/run_ref.ts";
import { duplicateProxyTerms, ReconstructionInputFields } from "../common/reconstruction_inputs.ts";
import { MAX_ENSEMBLE_VALUES } from "../common/ensemble_members.ts";
import { MAX_REALIZATIONS } from "../../../core/irradiance/mod.ts";
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

/** Cells of a period at a resolution, or null when the period does not parse (compute says why). */
export function periodCells(
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
  ...ReconstructionInputFields,
  background: SecularBackgroundRequest.default({ kind: "none" }),
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
  duplicateProxyTerms(v.proxies, (i) => ctx.addIssue(i));
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
