/**
 * Cost model of the "anomalies" analysis: calendar keys and climatology over the points,
 * seconds on one core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf } from "../common/cost_model.ts";
import type { AnomalyParams } from "./request.ts";

/** Seconds to compute the anomalies. */
export function estimateAnomaliesSeconds(p: AnomalyParams, inputs: EstimateInputs): number {
  return 0.0005 + 7.5e-7 * pointsOf(inputs, p.series);
}
