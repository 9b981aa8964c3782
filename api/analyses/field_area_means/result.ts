/**
 * Result of the "field-area-means" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, outputs, warnings } from "../common/result_parts.ts";
import { AreaRegionRequest } from "./request.ts";

export const FieldAreaMeanResult = z.object({
  field: z.object({ id: z.string(), name: z.string(), units: z.string(), calendar: z.string() }),
  region: AreaRegionRequest,
  weights: z.enum(["cell_areas_from_bounds", "cos_latitude"]),
  min_coverage: z.number(),
  cells_in_region: z.number().int().openapi({ description: "Cells with a positive weight" }),
  region_weight: z.number().openapi({
    description: "Σ weight × share over the region (steradians with bounds, Σ cos φ without)",
  }),
  steps: z.number().int(),
  undefined_steps: z.number().int().openapi({
    description: "Time steps whose coverage is under min_coverage (mean missing)",
  }),
  mean_coverage: z.number().openapi({ description: "Average covered share of the region" }),
  outputs: outputs(["area_mean", "coverage"]),
  warnings,
  cautions,
  inherited,
}).openapi("FieldAreaMeanResult");

export type FieldAreaMeanResultIn = z.input<typeof FieldAreaMeanResult>;
export type FieldAreaMeanResultOut = z.output<typeof FieldAreaMeanResult>;
