/**
 * Analysis "cycle-forecasts": the cycle in progress forecast from its observed months by the
 * Hathaway, Wilson & Reichmann (1994) shape function, with a residual-bootstrap band and a
 * hindcast score on past cycles (core/cycles/cycle_forecast.ts, cycle_hindcast.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { CycleForecastsRequest } from "./request.ts";
import { CycleForecastsResult } from "./result.ts";
import { computeCycleForecasts } from "./compute.ts";
import { cycleForecastsChart } from "./chart.ts";
import { cycleForecastsTasks } from "./tasks.ts";
import { estimateCycleForecastsSeconds } from "./estimate.ts";

export const cycleForecastsKind = defineAnalysis({
  kind: "cycle-forecasts",
  path: "/v1/cycle-forecasts",
  // 3: the standard deviation of the next minimum from d3-array (Welford), which may differ
  // from version 2's two-pass formula in the last bits
  algorithmVersion: "3",
  tag: "Solar cycles",
  summary: "Forecast of the cycle in progress, with a bootstrap band and hindcast errors",
  description: "Fits the Hathaway, Wilson & Reichmann (1994) shape function to the months " +
    "observed since the cycle in progress began (its smoothed minimum), after removing the " +
    "fitted tail of the previous cycle, and predicts the date and size of its maximum and its " +
    "curve to the next minimum. The band is the percentile interval of a seeded moving-block " +
    "bootstrap of the residuals (scaled to the fitted level). The same method is run on every " +
    "past cycle truncated at the same number of months after its minimum (`same_phase`) and at " +
    "half its rise (`mid_rise`), and its errors and band coverage are reported, so that you " +
    "can judge how far to trust the forecast; the same-phase errors also give an empirical " +
    "interval for the maximum (`hindcast_interval`). The next minimum is estimated from the lengths " +
    "of the past cycles in the series.",
  request: CycleForecastsRequest,
  result: CycleForecastsResult,
  estimateSeconds: estimateCycleForecastsSeconds,
  compute: computeCycleForecasts,
  chart: cycleForecastsChart,
  tasks: cycleForecastsTasks,
});
