/**
 * Effective sample size for the correlation of two autocorrelated series.
 *
 * Bretherton, Widmann, Dymnikov, Wallace & Bladé 1999, J. Climate 12, 1990, §5, eq. 31:
 * for two AR(1) series with lag-1 autocorrelations r₁, r₂,
 * N_eff = N (1 − r₁ r₂) / (1 + r₁ r₂).
 *
 * @module
 */
import { InputError } from "../errors.ts";

/**
 * Bretherton et al. (1999) effective sample size N (1 − r₁r₂)/(1 + r₁r₂), capped at N.
 *
 * When r₁r₂ < 0 the formula exceeds N; the cap keeps the test from claiming more independent
 * pairs than there are (common practice).
 *
 * @param n number of pairs, ≥ 1
 * @param r1 lag-1 autocorrelation of the first series, in (−1, 1)
 * @param r2 lag-1 autocorrelation of the second series, in (−1, 1)
 * @returns N_eff in (0, n]
 * @throws {InputError} (field `n`, `r1` or `r2`) when n < 1 or an autocorrelation is outside
 *   (−1, 1)
 * @example
 * ```ts
 * import { brethertonEffectiveSampleSize } from "./effective_sample_size.ts";
 * import assert from "node:assert/strict";
 * // derived from eq. 31: N = 100, r1 = 0.5, r2 = 0.8 → 100 · 0.6 / 1.4 = 42.857
 * assert.ok(Math.abs(brethertonEffectiveSampleSize(100, 0.5, 0.8) - 42.857142857) < 1e-8);
 * ```
 */
export function brethertonEffectiveSampleSize(n: number, r1: number, r2: number): number {
  if (!(n >= 1) || !Number.isFinite(n)) {
    throw new InputError(`Cannot compute effective sample size: n must be ≥ 1, got ${n}`, {
      field: "n",
      reason: "out_of_range",
      value: n,
    });
  }
  for (const [name, r] of [["r1", r1], ["r2", r2]] as const) {
    if (!(r > -1 && r < 1)) {
      throw new InputError(
        `Cannot compute effective sample size: ${name} must be in (−1, 1), got ${r}`,
        { field: name, reason: "out_of_range", value: r },
      );
    }
  }
  const p = r1 * r2;
  return Math.min(n, (n * (1 - p)) / (1 + p));
}
