/**
 * Cost model of the "cycle-fits" analysis: one Levenberg–Marquardt shape fit per cycle (and
 * the back-fit passes), each over the cycle's months, so about linear in the months; seconds
 * on one core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf } from "../common/cost_model.ts";
import type { CycleFitsParams } from "./request.ts";

/** Seconds to fit every cycle. */
export function estimateCycleFitsSeconds(p: CycleFitsParams, inputs: EstimateInputs): number {
  return 0.005 + 6.4e-5 * pointsOf(inputs, p.series);
}
