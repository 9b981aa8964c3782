/**
 * Cost model of the "energy-balance" analysis: one integration step per forcing sample (and
 * the output series), seconds on one core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf } from "../common/cost_model.ts";
import { forcing } from "../forcing/mod.ts";
import type { EnergyBalanceParams } from "./request.ts";

/** Seconds to integrate the model. */
export function estimateEnergyBalanceSeconds(
  p: EnergyBalanceParams,
  inputs: EstimateInputs,
): number {
  const steps = p.sinusoid
    ? p.sinusoid.years * p.sinusoid.steps_per_year
    : pointsOf(inputs, p.forcing) + (p.forcing_run
      ? inputs.resultOf(forcing, p.forcing_run, "/forcing_run").outputs.forcing.time.length
      : 0);
  return 0.0002 + 4.8e-7 * steps * (p.model === "two_box" ? 1.5 : 1);
}
