/**
 * Analysis "spectral-irradiance-models": calibrate the TSI proxy model (facular brightening
 * and sunspot darkening, on a TSI model's proxies and quiet-Sun levels) for each wavelength
 * band of a measured spectral irradiance record, with the cross-band error correlation, the
 * integral over the bands checked against the TSI model, integrated ranges and each band's
 * back-extension residual process (core/irradiance/spectral_band_models.ts). Spectral
 * reconstructions cite the result by run id.
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { estimateSpectralModelSeconds } from "./estimate.ts";
import { SpectralModelRequest } from "./request.ts";
import { SpectralModelResult } from "./result.ts";
import { computeSpectralModel } from "./compute.ts";
import { spectralModelChart } from "./chart.ts";
import { spectralModelTasks } from "./tasks.ts";

export const spectralIrradianceModels = defineAnalysis({
  kind: "spectral-irradiance-models",
  path: "/v1/irradiance/spectral-models",
  algorithmVersion: "1",
  tag: "Irradiance",
  summary: "Calibrate proxy models of spectral solar irradiance, one per wavelength band",
  description: "For each band of a measured spectral irradiance record (one series per band, " +
    "W m-2 nm-1 or W m-2 per band, with the band bounds in nm), fits S_i(t) = S_Q,i + " +
    "Σ a_ik·(F_k(t) − F_k,Q) − b_i·S_ref·PSI(t) on the proxies, quiet-Sun proxy levels and " +
    "S_ref of a TSI model run (Foukal & Lean 1988; Lean 2000), by ordinary least squares or " +
    "with AR(1) errors (Prais–Winsten), with time-blocked cross-validation. Reports each " +
    "band's sensitivities with covariance and 95 % intervals, the fraction of its variance " +
    "explained (R², and out of sample from the cross-validation), its relative cycle " +
    "variability and, with a sunspot series, its back-extension residual process through the " +
    "TSI model's sunspot → proxy mappings. The errors of different bands are correlated: their " +
    "lag-0 and lag-1 cross-correlation enters the integral over the bands and any integrated " +
    "range (exact for least squares with a common design, Zellner 1962). The integral check " +
    "compares the integral's coefficients with the TSI model's and states the spectral " +
    "coverage (share of a 5772 K blackbody, share of the TSI quiet level); only a record that " +
    "covers the whole spectrum must agree, and nothing is invented outside the bands.",
  request: SpectralModelRequest,
  result: SpectralModelResult,
  runRefs: (p) => [p.tsi_model],
  estimateSeconds: estimateSpectralModelSeconds,
  compute: computeSpectralModel,
  chart: spectralModelChart,
  tasks: spectralModelTasks,
});
