/**
 * Cost model of the "forcing" analysis: one pass over the TSI series (or the reconstruction's
 * or spectral reconstruction's output), and one per member of the ensemble with its band; seconds on one
 * core of the reference machine (api/runs/estimate.ts), fitted on measured times
 * (test/bench/estimate_calibration.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf } from "../common/cost_model.ts";
import { irradianceReconstructions } from "../irradiance_reconstructions/mod.ts";
import { spectralIrradianceReconstructions } from "../spectral_irradiance_reconstructions/mod.ts";
import type { ForcingParams } from "./request.ts";

/** Cells and stored member values (every band and integral) of a spectral reconstruction. */
function spectralValues(inputs: EstimateInputs, id: string): { cells: number; values: number } {
  const r = inputs.resultOf(spectralIrradianceReconstructions, id, "/spectral_reconstruction/run");
  const cells = r.spectrum.time.length;
  const e = r.ensemble;
  const series = e ? e.bands.length + Object.keys(e.outputs).length : 0;
  return { cells, values: (e?.realizations ?? 0) * cells * series };
}

/** Seconds to convert the irradiance into forcing. */
export function estimateForcingSeconds(p: ForcingParams, inputs: EstimateInputs): number {
  const rec = p.reconstruction
    ? inputs.resultOf(irradianceReconstructions, p.reconstruction, "/reconstruction")
    : null;
  const cells = rec ? rec.outputs.tsi.time.length : 0;
  const members = (rec?.ensemble?.realizations ?? 0) * cells;
  // a spectral run's result is read whole (the members of every band too): 1.1e-7 s per stored
  // member value, from one measured case (estimate_cases.ts: 100 members × 176 annual cells ×
  // 34 series, measured 0.43 × an estimate at the reconstruction members' 2.5e-7)
  const spec = p.spectral_reconstruction
    ? spectralValues(inputs, p.spectral_reconstruction.run)
    : { cells: 0, values: 0 };
  return 0.0002 + 1e-6 * (pointsOf(inputs, p.tsi) + cells + spec.cells) + 2.5e-7 * members +
    1.1e-7 * spec.values;
}
