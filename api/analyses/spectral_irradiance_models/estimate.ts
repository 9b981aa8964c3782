/**
 * Cost model of the "spectral-irradiance-models" analysis: the proxies and band records as
 * cell means, then per band a fit over its cells and one per cross-validation fold (least
 * squares about 0.4 of Prais–Winsten, its design factorised once per chunk of bands), and the
 * back-extension and integrals; seconds on one core of the reference machine
 * (api/runs/estimate.ts), fitted on measured times (test/bench/estimate_calibration.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf, seriesOf } from "../common/cost_model.ts";
import type { SpectralModelParams } from "./request.ts";

/** Seconds to calibrate every band's model. */
export function estimateSpectralModelSeconds(
  p: SpectralModelParams,
  inputs: EstimateInputs,
): number {
  const bandPoints = p.bands.map((b) => seriesOf(inputs, b.series)?.n ?? 0);
  const points = bandPoints.reduce((s, n) => s + n, 0) + pointsOf(inputs, p.sunspot_number) +
    p.proxies.reduce((s, x) => s + pointsOf(inputs, x.series), 0);
  // the calibration cells: the longest band record's (at most; the proxies may cut it)
  const cells = Math.max(0, ...bandPoints);
  const perBandCell = (1.8e-6 + 2.2e-7 * p.folds) * (p.method === "ols" ? 0.4 : 1);
  return 0.007 + 1e-7 * points + perBandCell * p.bands.length * cells;
}
