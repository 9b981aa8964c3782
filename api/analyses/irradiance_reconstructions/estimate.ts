/**
 * Cost model of the "irradiance-reconstructions" analysis: period means of the proxies, then
 * the model and its interval in every cell of the period; seconds on one core of the reference
 * machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { perYear, pointsOf } from "../common/cost_model.ts";
import { timeBound } from "../common/time_period.ts";
import type { ReconstructionParams } from "./request.ts";

/** Seconds to reconstruct the period. */
export function estimateReconstructionSeconds(
  p: ReconstructionParams,
  inputs: EstimateInputs,
): number {
  const years = timeBound(p.period.end, "end", "/period/end") -
    timeBound(p.period.start, "start", "/period/start");
  const cells = Math.max(0, years) * perYear(p.resolution);
  const points = pointsOf(inputs, p.sunspot_number) +
    p.proxies.reduce((sum, x) => sum + pointsOf(inputs, x.series), 0);
  return 0.004 + 1e-7 * points + 1e-6 * cells;
}
