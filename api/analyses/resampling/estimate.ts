/**
 * Cost model of the "resampling" analysis: one pass over the points (calendar keys and
 * means), seconds on one core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf } from "../common/cost_model.ts";
import type { ResampleParams } from "./request.ts";

/** Seconds to resample the series. */
export function estimateResamplingSeconds(p: ResampleParams, inputs: EstimateInputs): number {
  return 0.002 + 5e-8 * pointsOf(inputs, p.series);
}
