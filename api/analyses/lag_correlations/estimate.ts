/**
 * Cost model of the "lag-correlations" analysis: the lag table (n points × lags) and, per
 * surrogate, one complex FFT of the common axis (phase surrogates of a polynomial-detrended
 * pair) or, for AR(1) surrogates and the high-pass, a generation, filter and circular
 * correlation of several transforms; seconds on one core of the reference machine
 * (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { commonAxisLength, seriesOf } from "../common/cost_model.ts";
import type { LagCorrelationParams } from "./request.ts";

/** Seconds per n·log2(n) of one phase surrogate. */
const PER_SURROGATE = 5.3e-9;

/** Seconds to correlate over the lag window and run the surrogate test. */
export function estimateLagCorrelationsSeconds(
  p: LagCorrelationParams,
  inputs: EstimateInputs,
): number {
  const series = [seriesOf(inputs, p.solar), seriesOf(inputs, p.climate)].filter((s) => s !== null);
  const n = Math.max(2, commonAxisLength(series, p.resolution));
  const maxLag = p.max_lag ?? (p.resolution === "annual" ? 5 : 36);
  const lags = maxLag - (p.min_lag ?? -maxLag) + 1;
  const table = 0.005 + 1.5e-7 * n * lags;
  if (p.significance === "none") return table;
  // the time-domain path (high-pass filter, or AR(1) surrogates): more transforms each
  const slow = p.preprocess === "high_pass" ? 2.7 : p.significance === "ar1" ? 1.5 : 1;
  return table + p.surrogates * PER_SURROGATE * slow * n * Math.log2(n);
}
