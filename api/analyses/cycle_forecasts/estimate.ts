/**
 * Cost model of the "cycle-forecasts" analysis: a full shape fit and `replicates` bootstrap
 * refits for the cycle in progress, and the same with `hindcast_replicates` for two hindcast
 * cases of every past cycle (about one cycle per 11 years of months); seconds on one core of
 * the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { seriesOf } from "../common/cost_model.ts";
import type { CycleForecastsParams } from "./request.ts";

/** Seconds of a full fit, and of one bootstrap refit (12 iterations from the point estimate). */
const FULL_FIT = 0.013, REFIT = 0.0008;

/** Seconds to forecast the cycle and score the hindcasts. */
export function estimateCycleForecastsSeconds(
  p: CycleForecastsParams,
  inputs: EstimateInputs,
): number {
  const s = seriesOf(inputs, p.series);
  const cycles = s ? (s.end - s.start) / 11 : 0;
  return 0.01 + cycles * (FULL_FIT + p.hindcast_replicates * REFIT) + FULL_FIT +
    p.replicates * REFIT;
}
