/**
 * Cost model of the "attributions" analysis: regressions (Prais–Winsten or OLS, n points ×
 * p² coefficients each) at every lag combination of an exhaustive search, or about two sweeps
 * over each regressor's lags in a coordinate search, plus the lag profiles; then, for the
 * p-value that pays for the solar lag search (`lag_search_test: phase`), the solar lag search
 * again on each phase surrogate (one fit per solar lag, the other regressors at their chosen
 * lags). Seconds on one core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { commonAxisLength, seriesOf } from "../common/cost_model.ts";
import type { AttributionParams } from "./request.ts";

/** Largest number of lag combinations searched exhaustively (core default). */
const EXHAUSTIVE_LIMIT = 1000;

/**
 * One fit of a surrogate's lag search: a fixed part (the search's checks and profiles, the
 * surrogate's transform, shared over its fits) and a share of a full fit's cost.
 */
const SURROGATE_FIT_FIXED = 6e-5, SURROGATE_FIT_SHARE = 0.45;

/** Seconds to choose the lags, fit the regression and test the solar lag search. */
export function estimateAttributionsSeconds(
  p: AttributionParams,
  inputs: EstimateInputs,
): number {
  const series = [
    seriesOf(inputs, p.climate),
    ...p.regressors.map((r) => seriesOf(inputs, r.series)),
  ]
    .filter((s) => s !== null);
  const n = commonAxisLength(series, p.resolution);
  const ranges = p.regressors.map((r) => Math.max(1, r.max_lag - r.min_lag + 1));
  const combos = ranges.reduce((a, b) => a * b, 1);
  const total = ranges.reduce((a, b) => a + b, 0);
  const fits = combos <= EXHAUSTIVE_LIMIT ? combos + total : 2 * total;
  const coefficients = p.regressors.length + 1 + (p.trend ? 1 : 0);
  const perFit = (p.errors === "ar1" ? 1.5e-8 : 6e-9) * n * coefficients ** 2;
  const search = 0.003 + fits * perFit;
  const solar = p.regressors.find((r) => r.role === "solar");
  if (!solar || solar.max_lag === solar.min_lag || p.lag_search_test !== "phase") return search;
  const solarFits = solar.max_lag - solar.min_lag + 1;
  return search +
    p.surrogates * solarFits * (SURROGATE_FIT_FIXED + SURROGATE_FIT_SHARE * perFit);
}
