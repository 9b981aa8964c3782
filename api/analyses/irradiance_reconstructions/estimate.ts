/**
 * Cost model of the "irradiance-reconstructions" analysis: period means of the proxies, then
 * the model and its interval in every cell of the period, and with `realizations` the members
 * drawn (and summarised) cell by cell; seconds on one core of the reference machine
 * (api/runs/estimate.ts), fitted on measured times (test/bench/estimate_calibration.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { perYear, pointsOf } from "../common/cost_model.ts";
import { timeBound } from "../common/time_period.ts";
import type { ReconstructionParams } from "./request.ts";

/** What the cost depends on: the reconstruction inputs (a spectral reconstruction's too). */
export type ReconstructionCostParams =
  & Pick<ReconstructionParams, "period" | "resolution" | "sunspot_number" | "proxies">
  & { realizations?: number };

/** Seconds to reconstruct the period (and draw the members). */
export function estimateReconstructionSeconds(
  p: ReconstructionCostParams,
  inputs: EstimateInputs,
): number {
  const years = timeBound(p.period.end, "end", "/period/end") -
    timeBound(p.period.start, "start", "/period/start");
  const cells = Math.max(0, years) * perYear(p.resolution);
  const points = pointsOf(inputs, p.sunspot_number) +
    p.proxies.reduce((sum, x) => sum + pointsOf(inputs, x.series), 0);
  return 0.004 + 1e-7 * points + 3.2e-6 * cells + 2.5e-7 * (p.realizations ?? 0) * cells;
}
