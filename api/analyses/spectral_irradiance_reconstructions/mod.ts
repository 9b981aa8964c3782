/**
 * Analysis "spectral-irradiance-reconstructions": apply a spectral model (cited by run id) to
 * proxy series over a period, per band and integrated over wavelength ranges, back to where
 * only sunspot numbers exist, with prediction intervals; compare the integral over the bands
 * with the TSI reconstruction of the same proxies.
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { estimateSpectralReconstructionSeconds } from "./estimate.ts";
import { SpectralReconstructionRequest } from "./request.ts";
import { SpectralReconstructionResult } from "./result.ts";
import { computeSpectralReconstruction } from "./compute.ts";
import { spectralReconstructionChart } from "./chart.ts";
import { spectralReconstructionTasks } from "./tasks.ts";

export const spectralIrradianceReconstructions = defineAnalysis({
  kind: "spectral-irradiance-reconstructions",
  path: "/v1/irradiance/spectral-reconstructions",
  // 2: the result states what its intervals contain (`band`) and the caution no longer says
  // "no ensemble yet"; the numbers without realizations are unchanged. Optional ensembles.
  algorithmVersion: "2",
  tag: "Irradiance",
  summary: "Reconstruct spectral solar irradiance per band and over wavelength ranges",
  description: "Applies a spectral model run to proxy series averaged into daily, monthly or " +
    "annual cells, for every band, with prediction intervals from each band's coefficient " +
    "covariance and AR(1) residual process (reduced for cell means); where a proxy has no " +
    "value it is mapped from sunspot number with the TSI model's mapping and the band's " +
    "back-extension residual process widens the band. Integrals over the covered range and " +
    "over requested ranges (e.g. 200–400 nm) carry the correlation of the bands' errors; parts " +
    "of a range without a band are left out and reported. The integral is compared cell by " +
    "cell with the TSI reconstruction of the same proxies (the difference and its uncertainty " +
    "from both models' coefficients), with the spectral coverage stated. The spectrum is " +
    "served per band by GET /v1/runs/{id}/spectrum as JSON, long-form CSV or NetCDF-CF (a " +
    "wavelength coordinate with wavelength_bnds, on any model calendar). With `realizations` " +
    "the run draws seeded members of every band jointly (the sunspot number's error and the " +
    "mapping parameters shared by all bands, the calibration coefficients and residual " +
    "processes correlated across bands), integrals as the weighted sums of each member's " +
    "bands, and reports the ensemble's band; the NetCDF spectrum then carries the members on " +
    "a realization dimension.",
  request: SpectralReconstructionRequest,
  result: SpectralReconstructionResult,
  runRefs: (p) => [p.model],
  estimateSeconds: estimateSpectralReconstructionSeconds,
  compute: computeSpectralReconstruction,
  chart: spectralReconstructionChart,
  tasks: spectralReconstructionTasks,
});
