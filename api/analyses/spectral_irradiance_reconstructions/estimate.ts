/**
 * Cost model of the "spectral-irradiance-reconstructions" analysis: the TSI reconstruction of
 * the same proxies it is compared with (../irradiance_reconstructions/estimate.ts), then every
 * band's model and interval in every cell, and the integrals; seconds on one core of the
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
  const tsi = estimateReconstructionSeconds(p, inputs);
  return tsi + 0.008 + 8e-7 * bands * cells;
}
