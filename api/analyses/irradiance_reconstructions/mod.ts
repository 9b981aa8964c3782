/**
 * Analysis "irradiance-reconstructions": apply a calibrated model (cited by run id) to proxy
 * series over a period, at daily, monthly or annual resolution, with prediction intervals;
 * back-extension through the model's sunspot → proxy mappings; optional secular background
 * scenario (core/irradiance/proxy_reconstruction.ts, back_extension.ts, secular_background.ts;
 * cells from core/series/period_key.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { ReconstructionRequest } from "./request.ts";
import { ReconstructionResult } from "./result.ts";
import { computeReconstruction } from "./compute.ts";
import { reconstructionChart } from "./chart.ts";
import { estimateReconstructionSeconds } from "./estimate.ts";
import { reconstructionTasks } from "./tasks.ts";

export const irradianceReconstructions = defineAnalysis({
  kind: "irradiance-reconstructions",
  path: "/v1/irradiance/reconstructions",
  // 3: a period ending on a cell boundary no longer gains an extra cell (2001-01..2001-12 is
  // 12 months, not 13); a cell whose background is missing has no SD either.
  // 4: the published time-dependent sunspot-version conversion; the cycle-amplitude warning
  // per cycle against what its sunspot amplitude implies; cells from daily or monthly inputs
  // follow the coverage rule of core/series (a partial year at an end is no annual cell).
  // 5: the band propagates the sunspot number's own error (its uncertainties, or a documented
  // model growing back in time) and is first order throughout (the mapping's product term
  // Σ_β,kk·v_k is dropped); optional ensembles; variance by source and period.
  algorithmVersion: "5",
  tag: "Irradiance",
  featured: true,
  summary: "Reconstruct TSI from a calibrated model, with prediction intervals and ensembles",
  description: "Applies a model run to proxy series averaged into daily, monthly or annual " +
    "cells over a period. Prediction intervals combine the coefficient covariance with the " +
    "residual variance, reduced for cell means by the AR(1) variance factor of the residuals " +
    "(so intervals of monthly and annual means are not too narrow). Where a proxy has no value, " +
    "its value is mapped from sunspot number with the model's fitted mapping; the band then " +
    "uses the residual process of the sunspot-only model and the mappings' parameter " +
    "uncertainty, so it widens where proxies are weaker; the sunspot number's own error (its " +
    "stated uncertainties, or a documented model that grows back in time) is propagated " +
    "through the mappings, so the band also grows back in time. With `realizations` the run " +
    "draws seeded ensemble members jointly from every source and reports the ensemble's band; " +
    "the result decomposes the variance by source per block of years and states which " +
    "sources the band contains and which it does not. The sunspot series version must match " +
    'the model\'s unless `sunspot_conversion` is given: `{"method": "published"}` for the ' +
    "time-dependent conversion between versions 1 and 2, or a constant factor. Cells average " +
    "their inputs with the coverage rule of resampling (20 days for a month, 10 months for a " +
    "year). Each solar cycle's amplitude is checked against what its sunspot amplitude " +
    "implies through the model. An optional secular background scenario is added and " +
    "labelled; the default is none.",
  request: ReconstructionRequest,
  result: ReconstructionResult,
  runRefs: (p) => [p.model],
  estimateSeconds: estimateReconstructionSeconds,
  compute: computeReconstruction,
  chart: reconstructionChart,
  tasks: reconstructionTasks,
});
