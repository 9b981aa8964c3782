/**
 * Request of the "cycle-fits" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { CycleDetectionFields } from "../common/cycle_detection.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";

export const CycleFitsRequest = z.object({
  series: SeriesRef,
  ...CycleDetectionFields,
  width: z.enum(["free", "amplitude_dependent"]).default("free").openapi({
    description: "`free`: fit amplitude a, start t0 and width b; `amplitude_dependent`: fit a " +
      "and t0 with b = 27.12 + 25.15/(a·1e3)^(1/4) months (Hathaway et al. 1994)",
    example: "free",
  }),
  overlap: z.enum(["backfit", "none"]).default("backfit").openapi({
    description: "`backfit`: refit each cycle after removing its neighbours' fitted curves " +
      "(cycles overlap near minima), two passes; `none`: each cycle on its own",
    example: "backfit",
  }),
}).openapi("CycleFitsRequest", {
  example: { series: DEMO_SERIES.SSN, width: "free" },
});

export type CycleFitsParams = z.output<typeof CycleFitsRequest>;
