/**
 * Cost model of the "irradiance-darkening" analysis: one pass over the group records or the
 * area series, seconds on one core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf } from "../common/cost_model.ts";
import type { DarkeningParams } from "./request.ts";

/** Seconds to compute the darkening. */
export function estimateDarkeningSeconds(p: DarkeningParams, inputs: EstimateInputs): number {
  const records = p.groups ? p.groups.time.length : pointsOf(inputs, p.total_area);
  return 0.001 + 7e-7 * records;
}
