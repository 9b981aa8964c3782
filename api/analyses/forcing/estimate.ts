/**
 * Cost model of the "forcing" analysis: one pass over the TSI series (or the reconstruction's
 * output), seconds on one core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf } from "../common/cost_model.ts";
import { irradianceReconstructions } from "../irradiance_reconstructions/mod.ts";
import type { ForcingParams } from "./request.ts";

/** Seconds to convert the irradiance into forcing. */
export function estimateForcingSeconds(p: ForcingParams, inputs: EstimateInputs): number {
  const points = pointsOf(inputs, p.tsi) +
    (p.reconstruction
      ? inputs.resultOf(irradianceReconstructions, p.reconstruction, "/reconstruction").outputs
        .tsi.time.length
      : 0);
  return 0.0002 + 1e-6 * points;
}
