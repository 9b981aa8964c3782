/**
 * Cost model of the "spectral-irradiance-reconstructions" analysis: the TSI reconstruction of
 * the same proxies it is compared with (../irradiance_reconstructions/estimate.ts), then every
 * band's model and interval in every cell, the integrals, and the ensemble's members (every
 * band in every cell per member: about 5.5e-8 s each, from one member of 100 bands × 119,000
 * days measured at 0.61 s to draw plus 0.065 s to summarise); seconds on one core of the
 * reference machine (api/runs/estimate.ts), fitted on measured times
 * (test/bench/estimate_calibration.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { perYear } from "../common/cost_model.ts";
import { timeBound } from "../common/time_period.ts";
import { estimateReconstructionSeconds } from "../irradiance_reconstructions/estimate.ts";
import { spectralIrradianceModels } from "../spectral_irradiance_models/mod.ts";
import type { SpectralReconstructionParams } from "./request.ts";

/** Seconds to reconstruct every band over the period. */
export function estimateSpectralReconstructionSeconds(
  p: SpectralReconstructionParams,
  inputs: EstimateInputs,
): number {
  const years = timeBound(p.period.end, "end", "/period/end") -
    timeBound(p.period.start, "start", "/period/start");
  const cells = Math.max(0, years) * perYear(p.resolution);
  const bands = inputs.resultOf(spectralIrradianceModels, p.model, "/model").bands.length;
  // the TSI reconstruction it is compared with is analytic: no members
  const tsi = estimateReconstructionSeconds({ ...p, realizations: 0 }, inputs);
  return tsi + 0.008 + 8e-7 * bands * cells + 5.5e-8 * p.realizations * bands * cells;
}
