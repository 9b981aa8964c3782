/**
 * Analysis "attributions": multiple regression of a climate series on named regressors
 * (solar, ENSO, volcanic aerosol, anthropogenic, trend, others), each at a lag chosen by AIC,
 * with AR(1) or Newey–West errors (core/climate/attribution_regression.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { AttributionRequest } from "./request.ts";
import { AttributionResult } from "./result.ts";
import { computeAttributions } from "./compute.ts";
import { attributionsChart } from "./chart.ts";
import { estimateAttributionsSeconds } from "./estimate.ts";

export const attributionKind = defineAnalysis({
  kind: "attributions",
  path: "/v1/attributions",
  algorithmVersion: "1",
  tag: "Solar–climate linkage",
  summary: "Multiple-regression attribution with a lag per regressor",
  description: "Regresses a climate series on named regressors on one calendar axis, each at " +
    "its own lag searched over a range and chosen by AIC on one common sample, with AR(1) " +
    "(Prais–Winsten) errors or OLS with Newey–West standard errors. Reports coefficients " +
    "with 95 % intervals, the AIC profile of every regressor's lag (the lag surface) with the " +
    "ΔAIC ≤ 2 support, each regressor's contribution series, the solar sensitivity and the " +
    "implied solar maximum-minus-minimum response, and warnings for collinear regressors or " +
    "residuals that stay autocorrelated.",
  request: AttributionRequest,
  result: AttributionResult,
  runRefs: (p) => p.regressors.flatMap((r) => (r.run ? [r.run] : [])),
  estimateSeconds: estimateAttributionsSeconds,
  compute: computeAttributions,
  chart: attributionsChart,
});
