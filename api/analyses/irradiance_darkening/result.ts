/**
 * Result of the "irradiance-darkening" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, OutputSeriesSchema, warnings } from "../common/result_parts.ts";
import { SpotContrast } from "./request.ts";

export const DarkeningResult = z.object({
  method: z.string().openapi({ description: "The published method applied" }),
  position_factor: z.string().openapi({
    description: "How the position factor μ(3μ + 2)/2 was applied (per group, or its disc " +
      "average 1 for total areas)",
  }),
  contrast: SpotContrast,
  quiet_sun_tsi: z.number().openapi({ description: "S_Q in ΔS = −S_Q·PSI, W m-2" }),
  days: z.number().int().openapi({ description: "Days with a PSI value" }),
  groups_per_day: z.array(z.number().int()).nullable().openapi({
    description: "Group records per day (null for a total-area series)",
  }),
  summary: z.object({
    mean_psi: z.number().nullable().openapi({
      description: "Mean daily PSI (fraction of quiet-Sun TSI); null without days",
    }),
    max_psi: z.number().openapi({ description: "Largest daily PSI (0 without days)" }),
    max_darkening: z.number().openapi({ description: "−S_Q·max_psi, W m-2" }),
  }),
  outputs: z.object({
    psi: OutputSeriesSchema.openapi({ description: "Daily PSI, dimensionless" }),
    darkening: OutputSeriesSchema.openapi({ description: "Daily ΔS = −S_Q·PSI, W m-2" }),
  }),
  warnings,
  cautions,
  inherited,
}).openapi("DarkeningResult");

/** The result as `compute` builds it. */
export type DarkeningResultIn = z.input<typeof DarkeningResult>;
/** The result as stored and read back. */
export type DarkeningResultOut = z.output<typeof DarkeningResult>;
