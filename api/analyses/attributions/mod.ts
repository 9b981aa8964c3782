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
import { attributionTasks } from "./tasks.ts";

export const attributionKind = defineAnalysis({
  kind: "attributions",
  path: "/v1/attributions",
  // 3: the lag-search surrogates use the one mixed-radix FFT (last bits)
  algorithmVersion: "3",
  tag: "Solar–climate linkage",
  summary: "Multiple-regression attribution with a lag per regressor",
  description: "Regresses a climate series on named regressors on one calendar axis, each at " +
    "its own lag searched over a range and chosen by AIC on one common sample, with AR(1) " +
    "(Prais–Winsten) errors or OLS with Newey–West standard errors. Reports coefficients " +
    "with 95 % intervals, the AIC profile of every regressor's lag (the lag surface) with the " +
    "ΔAIC ≤ 2 support, each regressor's contribution series, the solar sensitivity and the " +
    "implied solar maximum-minus-minimum response, and warnings for collinear regressors or " +
    "residuals that stay autocorrelated. The solar coefficient's p-value is given twice: " +
    "naive (its AIC-chosen lag taken as fixed) and paying for the lag search (a Monte Carlo " +
    "repeating the search on phase surrogates of the solar regressor, or the Šidák bound). " +
    "On a monthly axis each calendar month's mean can be removed first (`deseasonalise`, on " +
    "by default for absolute quantities such as `temperature`); a strong annual cycle in an " +
    "input is warned about.",
  request: AttributionRequest,
  result: AttributionResult,
  runRefs: (p) => p.regressors.flatMap((r) => (r.run ? [r.run] : [])),
  estimateSeconds: estimateAttributionsSeconds,
  compute: computeAttributions,
  chart: attributionsChart,
  tasks: attributionTasks,
});
