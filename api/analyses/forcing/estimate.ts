/**
 * Cost model of the "forcing" analysis: one pass over the TSI series (or the reconstruction's
 * output), seconds on one core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf, runOutputPoints } from "../common/cost_model.ts";
import type { ForcingParams } from "./request.ts";

/** Seconds to convert the irradiance into forcing. */
export function estimateForcingSeconds(p: ForcingParams, inputs: EstimateInputs): number {
  const points = pointsOf(inputs, p.tsi) + runOutputPoints(inputs, p.reconstruction, "tsi");
  return 0.0002 + 1e-6 * points;
}
