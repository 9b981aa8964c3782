/**
 * Variance of the mean of m consecutive values of a stationary AR(1) process.
 *
 * @module
 */
import { InputError } from "../errors.ts";

/**
 * The variance inflation of a mean of m consecutive AR(1) values relative to independent
 * values: Var(x̄) = (σ²/m)·f with f = 1 + 2 Σ_{k=1}^{m−1} (1 − k/m) ρ^k, in closed form
 * f = 1 + 2[ρ/(1 − ρ) − ρ(1 − ρ^m)/(m(1 − ρ)²)] (the standard result for the mean of a
 * stationary series, e.g. Wilks 2011, Statistical Methods in the Atmospheric Sciences, 3rd
 * ed., §5.2.4, here in its exact finite-m form). Non-integer m (a month of 30.44 days) uses the
 * same expression, with ρ^m read as sign(ρ)^round(m)·|ρ|^m for negative ρ ({@link ar1Power});
 * m ≤ 1 gives 1.
 *
 * @param m number of values averaged (≥ 0)
 * @param rho lag-1 autocorrelation in (−1, 1)
 * @returns f, between 1/m·(1−ρ)/(1+ρ)-ish and m; f = 1 for ρ = 0
 * @throws {InputError} when ρ is outside (−1, 1) or m is negative / not finite
 * @example
 * ```ts
 * import { ar1MeanVarianceFactor } from "./ar1_mean_variance.ts";
 * import assert from "node:assert/strict";
 * assert.equal(ar1MeanVarianceFactor(30, 0), 1);
 * // m = 2: f = 1 + ρ
 * assert.ok(Math.abs(ar1MeanVarianceFactor(2, 0.7) - 1.7) < 1e-12);
 * ```
 */
export function ar1MeanVarianceFactor(m: number, rho: number): number {
  if (!(rho > -1 && rho < 1)) {
    throw new InputError(
      `Cannot compute AR(1) mean variance: rho must be in (-1, 1), got ${rho}`,
      { field: "rho", reason: "out_of_range", value: rho },
    );
  }
  if (!(m >= 0) || !Number.isFinite(m)) {
    throw new InputError(`Cannot compute AR(1) mean variance: m must be ≥ 0, got ${m}`, {
      field: "m",
      reason: "out_of_range",
      value: m,
    });
  }
  if (m <= 1 || rho === 0) return 1;
  const a = rho / (1 - rho);
  const b = (rho * (1 - ar1Power(rho, m))) / (m * (1 - rho) * (1 - rho));
  return 1 + 2 * (a - b);
}

/**
 * ρ^m for an AR(1) coefficient and a possibly non-integer number of steps m ≥ 0: the plain
 * power for ρ ≥ 0; for negative ρ, sign(ρ)^round(m)·|ρ|^m, which agrees with ρ^m at integer m
 * and stays finite between them (a real power of a negative number is not defined).
 *
 * @param rho lag-1 autocorrelation in (−1, 1)
 * @param m steps, ≥ 0
 * @returns the correlation after m steps
 * @example
 * ```ts
 * import { ar1Power } from "./ar1_mean_variance.ts";
 * import assert from "node:assert/strict";
 * assert.equal(ar1Power(0.5, 2), 0.25);
 * assert.equal(ar1Power(-0.5, 3), -0.125);
 * assert.ok(Number.isFinite(ar1Power(-0.5, 2.5)));
 * ```
 */
export function ar1Power(rho: number, m: number): number {
  if (rho >= 0) return Math.pow(rho, m);
  const p = Math.pow(-rho, m);
  return Math.round(m) % 2 === 0 ? p : -p;
}
