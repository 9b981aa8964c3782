/**
 * Cost model of the "spectra" analysis: a Lomb–Scargle periodogram costs points × grid
 * frequencies, a rotation per term on a grid even in frequency and two trigonometric calls
 * otherwise, once for the data and once per Monte Carlo replicate; the default grid reaches
 * 200,000 frequencies for long daily series. The FFT periodogram is N log N. Seconds on one
 * core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { seriesOf } from "../common/cost_model.ts";
import { lombScargleWork } from "./compute.ts";
import type { SpectraParams } from "./request.ts";

/** Seconds per point × frequency: even grid (rotations), other grids (cos and sin). */
const EVEN = 3.1e-9, UNEVEN = 3.8e-8;

/** Seconds to compute the periodogram and its false-alarm tests. */
export function estimateSpectraSeconds(p: SpectraParams, inputs: EstimateInputs): number {
  const s = seriesOf(inputs, p.series);
  if (!s) return 0;
  if (p.method === "fft") return 0.0005 + 4.5e-7 * s.n;
  const w = lombScargleWork(p, s);
  const replicates = p.false_alarm === "horne_baliunas" ? 0 : p.replicates;
  return 0.002 + 4e-7 * w.grid + w.points * w.grid * (1 + replicates) * (w.even ? EVEN : UNEVEN);
}
