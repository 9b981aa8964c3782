/**
 * Cost model of the "forcing" analysis: one pass over the TSI series (or the reconstruction's
 * output), and one per member of the reconstruction's ensemble with its band; seconds on one
 * core of the reference machine (api/runs/estimate.ts), fitted on measured times
 * (test/bench/estimate_calibration.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf } from "../common/cost_model.ts";
import { irradianceReconstructions } from "../irradiance_reconstructions/mod.ts";
import type { ForcingParams } from "./request.ts";

/** Seconds to convert the irradiance into forcing. */
export function estimateForcingSeconds(p: ForcingParams, inputs: EstimateInputs): number {
  const rec = p.reconstruction
    ? inputs.resultOf(irradianceReconstructions, p.reconstruction, "/reconstruction")
    : null;
  const cells = rec ? rec.outputs.tsi.time.length : 0;
  const members = (rec?.ensemble?.realizations ?? 0) * cells;
  return 0.0002 + 1e-6 * (pointsOf(inputs, p.tsi) + cells) + 2.5e-7 * members;
}
