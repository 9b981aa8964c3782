/**
 * Request of the "cycles" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { CycleDetectionFields } from "../common/cycle_detection.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";

export const CyclesRequest = z.object({
  series: SeriesRef,
  ...CycleDetectionFields,
}).openapi("CyclesRequest", {
  example: { series: DEMO_SERIES.SSN },
});

export type CyclesParams = z.output<typeof CyclesRequest>;
