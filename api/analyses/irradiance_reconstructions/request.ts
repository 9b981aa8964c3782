/**
 * Request of the "irradiance-reconstructions" analysis: a model run, direct proxy series per
 * term, a sunspot-number series for back-extension, the period and resolution of the cells,
 * the interval level and an optional secular background scenario.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { PeriodInput } from "../common/time_period.ts";
import { runRef } from "../common/run_ref.ts";
import { duplicateProxyTerms, ReconstructionInputFields } from "../common/reconstruction_inputs.ts";
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
  ...ReconstructionInputFields,
  background: SecularBackgroundRequest.default({ kind: "none" }),
}).superRefine((v, ctx) => duplicateProxyTerms(v.proxies, (i) => ctx.addIssue(i)))
  .openapi("ReconstructionRequest", {
    example: {
      model: EXAMPLE_RUN_ID,
      sunspot_number: DEMO_SERIES.SSN,
      proxies: [{ term: "mg_ii", series: DEMO_SERIES.MG }],
      period: { start: "1700", end: "2025" },
      resolution: "annual",
    },
  });

export type ReconstructionParams = z.output<typeof ReconstructionRequest>;
