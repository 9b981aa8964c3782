/**
 * Analysis "irradiance-models": calibrate a proxy-regression TSI model against a measured TSI
 * record, with optional sunspot-number → proxy mappings for back-extension
 * (core/irradiance/proxy_model.ts, sunspot_proxy_mapping.ts, back_extension.ts). The result is
 * a stored model that reconstructions cite by run id.
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { ModelRequest } from "./request.ts";
import { ModelResult } from "./result.ts";
import { computeModel } from "./compute.ts";
import { modelChart } from "./chart.ts";
import { estimateModelSeconds } from "./estimate.ts";

export const irradianceModels = defineAnalysis({
  kind: "irradiance-models",
  path: "/v1/irradiance/models",
  // 4: the default quiet level F_Q is d3-array's quantile (R type 7, as before), whose
  // interpolation differs from the former hand-written one in the last bit.
  // 5: proxies averaged into coarser cells follow the coverage rule of core/series (20 days
  // for a monthly cell, 10 months for an annual one), and so do the annual means of the
  // fitted cycle amplitude (a partial year at an end is no extremum).
  // 6: both of the above (the coverage rule and the interval's level)
  // 5 (another change): the fitted band's interval names its level (95 %)
  algorithmVersion: "6",
  tag: "Irradiance",
  summary: "Calibrate a proxy-regression TSI model against a measured TSI record",
  description: "Fits TSI(t) = S_Q + Σ a_k·(F_k(t) − F_k,Q) − b·S_ref·PSI(t) (Foukal & Lean " +
    "1988; Lean 2000; Fröhlich & Lean 2004) by ordinary least squares or by regression with " +
    "AR(1) errors (Prais–Winsten), on the calendar cells of the TSI record where every proxy " +
    "has a value. Reports coefficients with covariance and 95 % intervals, the quiet-Sun " +
    "level S_Q with its interval, residual RMS, R², adjusted R², AIC/BIC, residual lag-1 " +
    "autocorrelation and time-blocked k-fold cross-validation RMSE. With a sunspot-number " +
    "series, also fits linear and saturating sunspot → proxy mappings in the overlap era and " +
    "the residual process of the sunspot-only model, which reconstructions use to back-extend " +
    "with honest uncertainty.",
  request: ModelRequest,
  result: ModelResult,
  estimateSeconds: estimateModelSeconds,
  compute: computeModel,
  chart: modelChart,
});
