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
import type { ForcingParams } from "./request.ts";

/** Stored member values of a spectral reconstruction result (every band and integral), read by shape. */
function spectralValues(inputs: EstimateInputs, id: string): { cells: number; values: number } {
  const r = inputs.run(id).result as {
    spectrum?: { time?: unknown[] };
    ensemble?: { realizations?: number; bands?: unknown[]; outputs?: object } | null;
  } | null;
  const cells = r?.spectrum?.time?.length ?? 0;
  const e = r?.ensemble;
  const series = (e?.bands?.length ?? 0) + Object.keys(e?.outputs ?? {}).length;
  return { cells, values: (e?.realizations ?? 0) * cells * series };
}

/** Seconds to convert the irradiance into forcing. */
export function estimateForcingSeconds(p: ForcingParams, inputs: EstimateInputs): number {
  const rec = p.reconstruction
    ? inputs.resultOf(irradianceReconstructions, p.reconstruction, "/reconstruction")
    : null;
  const cells = rec ? rec.outputs.tsi.time.length : 0;
  const members = (rec?.ensemble?.realizations ?? 0) * cells;
  // a spectral run's result is read whole (its members of every band too): counted at the
  // per-member rate of a reconstruction's members (not refitted for this input)
  const spec = p.spectral_reconstruction
    ? spectralValues(inputs, p.spectral_reconstruction.run)
    : { cells: 0, values: 0 };
  return 0.0002 + 1e-6 * (pointsOf(inputs, p.tsi) + cells + spec.cells) +
    2.5e-7 * (members + spec.values);
}
