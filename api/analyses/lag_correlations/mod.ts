/**
 * Analysis "lag-correlations": how strongly, and at what lag, a climate series follows a solar
 * series, with analytic (Bretherton N_eff) and Monte Carlo (surrogate) significance side by
 * side (core/climate/lagged_correlation.ts, core/climate/surrogate_lag_test.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { LagCorrelationRequest } from "./request.ts";
import { LagCorrelationResult } from "./result.ts";
import { computeLagCorrelations } from "./compute.ts";
import { lagCorrelationChart } from "./chart.ts";
import { lagCorrelationTasks } from "./tasks.ts";
import { estimateLagCorrelationsSeconds } from "./estimate.ts";

export const lagCorrelationKind = defineAnalysis({
  kind: "lag-correlations",
  path: "/v1/lag-correlations",
  // 2: deseasonalising by default for absolute monthly quantities, best-lag warnings;
  // 3: also `best.r` is the overlap r whatever the normalisation, `best.r_full` beside it
  // 4: one mixed-radix FFT in the surrogate loop (tallies change in the last bits)
  algorithmVersion: "4",
  tag: "Solar–climate linkage",
  featured: true,
  summary: "Lagged correlation of a climate series with a solar series, with honest significance",
  description: "Brings both series onto one monthly or annual axis, removes each calendar " +
    "month's mean over the overlap on a monthly axis (`deseasonalise`, on by default for " +
    "absolute quantities such as `temperature`) and the chosen trend from both, and reports at every lag k (k > 0: the climate series follows the solar one " +
    "by k steps; this is R's ccf(solar, climate) at lag −k): Pearson r over the overlap (or " +
    "R's full normalisation), the overlap count, both lag-1 autocorrelations, the effective " +
    "sample size N_eff = n(1 − r1 r2)/(1 + r1 r2) (Bretherton et al. 1999), t and the " +
    "analytic p-value with N_eff − 2 degrees of freedom, the Fisher-z 95 % interval with " +
    "N_eff, and a Monte Carlo p-value from surrogates of the solar series given the same " +
    "preprocessing. The family-wise p-value compares the best |r| over the whole lag window " +
    "with the surrogates' best |r| over the same window, so searching many lags is paid for. " +
    "Warnings: a strong annual cycle in an input (share of variance in the calendar-month " +
    "means; no p-value is recommended while one remains), a best lag at the edge of the " +
    "window, and a negative best lag (the climate series leading the solar one).",
  request: LagCorrelationRequest,
  result: LagCorrelationResult,
  runRefs: (p) => (p.solar_run ? [p.solar_run] : []),
  estimateSeconds: estimateLagCorrelationsSeconds,
  compute: computeLagCorrelations,
  chart: lagCorrelationChart,
  tasks: lagCorrelationTasks,
});
