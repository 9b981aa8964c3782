/**
 * The lag-1 autocorrelation of regression residuals as the Cochrane–Orcutt (1949, J. Am.
 * Stat. Assoc. 44, 32) and Prais–Winsten (1954) procedures estimate it (citations from memory):
 * ρ̂ = Σ_{t≥2} e_t e_{t−1} / Σ_t e_t², residuals taken as they are (no mean removed: OLS
 * residuals with an intercept have mean zero already).
 *
 * @module
 */

/**
 * Lag-1 autocorrelation of residuals, ρ̂ = Σ e_t e_{t−1} / Σ e_t².
 *
 * @param e residuals (any units), finite
 * @returns ρ̂, in [−1, 1]; 0 when every residual is 0 or fewer than 2 are given
 * @example
 * ```ts
 * import { residualLag1 } from "./residual_lag1.ts";
 * import assert from "node:assert/strict";
 * // (1·(−1) + (−1)·1) / (1 + 1 + 1) = −2/3
 * assert.ok(Math.abs(residualLag1(Float64Array.of(1, -1, 1)) + 2 / 3) < 1e-15);
 * ```
 */
export function residualLag1(e: ArrayLike<number>): number {
  let num = 0, den = 0;
  for (let i = 0; i < e.length; i++) {
    den += e[i] * e[i];
    if (i > 0) num += e[i] * e[i - 1];
  }
  return den > 0 ? num / den : 0;
}
