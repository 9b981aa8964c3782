/**
 * Cost model of the "energy-balance" analysis: one integration step per forcing sample (and
 * the output series), and again per member of the forcing run's ensemble with its band;
 * seconds on one core of the reference machine (api/runs/estimate.ts), fitted on measured
 * times (test/bench/estimate_calibration.ts).
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
  const run = p.forcing_run && !p.sinusoid
    ? inputs.resultOf(forcing, p.forcing_run, "/forcing_run")
    : null;
  const runSteps = run ? run.outputs.forcing.time.length : 0;
  const steps = p.sinusoid
    ? p.sinusoid.years * p.sinusoid.steps_per_year
    : pointsOf(inputs, p.forcing) + runSteps;
  const memberSteps = (run?.ensemble?.realizations ?? 0) * runSteps;
  const twoBox = p.model === "two_box";
  return 0.0002 + 4.8e-7 * steps * (twoBox ? 1.5 : 1) +
    2.9e-7 * memberSteps * (twoBox ? 1.3 : 1);
}
