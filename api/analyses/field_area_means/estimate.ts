/**
 * Cost model of the "field-area-means" analysis: one weighted sum over the region's cells per
 * time step (steps × cells in the region, the region's share of the grid's cells taken from
 * its latitude and longitude extent; a mask counts as the whole grid), plus the area weights
 * and the region's membership per grid cell. Seconds on one core of the reference machine
 * (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { fieldSizeOf } from "../common/cost_model.ts";
import type { FieldAreaMeanParams } from "./request.ts";

/** Seconds per time step × cell in the region, and per grid cell. */
const PER_VALUE = 2e-9, PER_CELL = 2e-8;

/** Share of the grid's cells in the region (by its extent in latitude and longitude). */
function regionShare(r: FieldAreaMeanParams["region"]): number {
  switch (r.kind) {
    case "globe":
    case "mask":
      return 1;
    case "band":
      return Math.max(0, r.north - r.south) / 180;
    case "box": {
      const width = ((r.east - r.west) % 360 + 360) % 360 || 360;
      return (Math.max(0, r.north - r.south) / 180) * (width / 360);
    }
  }
}

/** Seconds to average the field over the region, step by step. */
export function estimateFieldAreaMeansSeconds(
  p: FieldAreaMeanParams,
  inputs: EstimateInputs,
): number {
  const f = fieldSizeOf(inputs, p.field);
  if (!f) return 0;
  return 0.0003 + PER_CELL * f.cells + PER_VALUE * f.steps * f.cells * regionShare(p.region);
}
