/**
 * Cost model of the "smoothing" analysis: a weighted moving average over the points (a
 * Gaussian one costs points × kernel width), seconds on one core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf } from "../common/cost_model.ts";
import type { SmoothingParams } from "./request.ts";

/** Seconds to smooth the series. */
export function estimateSmoothingSeconds(p: SmoothingParams, inputs: EstimateInputs): number {
  const n = pointsOf(inputs, p.series);
  // the Gaussian kernel's weights reach 4σ on either side of each point
  return 0.001 + 4.5e-7 * n + (p.method === "gaussian" ? 3.4e-9 * n * p.sigma : 0);
}
