/**
 * Cost model of the "irradiance-models" analysis: aligning the TSI and proxy series, the
 * regression and its blocked cross-validation folds, about linear in the points of the
 * inputs; seconds on one core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf } from "../common/cost_model.ts";
import type { ModelParams } from "./request.ts";

/** Seconds to calibrate the model. */
export function estimateModelSeconds(p: ModelParams, inputs: EstimateInputs): number {
  const points = pointsOf(inputs, p.tsi) + pointsOf(inputs, p.sunspot_number) +
    p.terms.reduce((sum, t) => sum + pointsOf(inputs, t.series), 0);
  return 0.005 + 8e-7 * points * (1 + p.folds / 10);
}
