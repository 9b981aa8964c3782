/**
 * Cost model of the "cycles" analysis: smoothing and extrema over the months, seconds on one
 * core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf } from "../common/cost_model.ts";
import type { CyclesParams } from "./request.ts";

/** Seconds to find the cycles. */
export function estimateCyclesSeconds(p: CyclesParams, inputs: EstimateInputs): number {
  return 0.0003 + 1.15e-6 * pointsOf(inputs, p.series);
}
