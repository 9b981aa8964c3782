/**
 * Draws from a multivariate normal distribution N(μ, Σ) through the Cholesky factor Σ = LLᵀ:
 * x = μ + Lz with z standard normal (e.g. Gentle 2003, Random Number Generation and Monte
 * Carlo Methods, 2nd ed., §5.3.1). The factor comes from ml-matrix.
 *
 * @module
 */
import { CholeskyDecomposition, Matrix } from "ml-matrix";
import { InputError } from "../errors.ts";
import type { RandomStream } from "../random/mod.ts";

/**
 * The lower Cholesky factor L of a covariance matrix (Σ = LLᵀ), after symmetrising Σ as
 * (Σ + Σᵀ)/2 to remove rounding asymmetry. A zero matrix (a parameter held fixed) gives a zero
 * factor.
 *
 * @param covariance p × p covariance matrix
 * @returns L as p rows of p numbers, zero above the diagonal
 * @throws {InputError} (field `covariance`) when it is not square, not finite or not positive
 *   definite
 * @example
 * ```ts
 * import { choleskyLower } from "./multivariate_normal.ts";
 * import assert from "node:assert/strict";
 * const L = choleskyLower([[4, 2], [2, 5]]);
 * assert.deepEqual(L, [[2, 0], [1, 2]]); // LLᵀ = [[4, 2], [2, 5]]
 * ```
 */
export function choleskyLower(covariance: readonly (readonly number[])[]): number[][] {
  const p = covariance.length;
  if (!covariance.every((row) => row.length === p && row.every(Number.isFinite))) {
    throw new InputError(
      `Cannot factor a covariance matrix: it must be a square matrix of finite numbers (${p} rows)`,
      { field: "covariance", reason: "not_finite" },
    );
  }
  if (covariance.every((row) => row.every((v) => v === 0))) {
    return covariance.map((row) => row.map(() => 0));
  }
  const sym = new Matrix(covariance.map((row, a) => row.map((v, b) => (v + covariance[b][a]) / 2)));
  const chol = new CholeskyDecomposition(sym);
  if (!chol.isPositiveDefinite()) {
    throw new InputError("Cannot factor a covariance matrix: it is not positive definite", {
      field: "covariance",
      reason: "invalid",
    });
  }
  return chol.lowerTriangularMatrix.to2DArray();
}

/**
 * One draw x = μ + Lz from N(μ, LLᵀ), z taken from `stream` with `normal()` (p values, in
 * order).
 *
 * @param mean μ (p numbers)
 * @param lower the lower Cholesky factor L ({@link choleskyLower})
 * @param stream a seeded random stream
 * @returns x (p numbers)
 * @throws {InputError} (field `lower`) when L is not p × p
 * @example
 * ```ts
 * import { choleskyLower, drawMultivariateNormal } from "./multivariate_normal.ts";
 * import { randomStream } from "../random/mod.ts";
 * import assert from "node:assert/strict";
 * const L = choleskyLower([[1, 0.9], [0.9, 1]]);
 * const s = randomStream(3);
 * let c = 0;
 * for (let i = 0; i < 20_000; i++) {
 *   const [a, b] = drawMultivariateNormal([0, 0], L, s);
 *   c += a * b / 20_000;
 * }
 * assert.ok(Math.abs(c - 0.9) < 0.05); // the covariance is recovered
 * ```
 */
export function drawMultivariateNormal(
  mean: readonly number[],
  lower: readonly (readonly number[])[],
  stream: RandomStream,
): number[] {
  const p = mean.length;
  if (lower.length !== p || !lower.every((row) => row.length === p)) {
    throw new InputError(
      `Cannot draw a multivariate normal: the factor is not ${p} × ${p}`,
      { field: "lower", reason: "length_mismatch", value: lower.length },
    );
  }
  const z = new Array<number>(p);
  for (let a = 0; a < p; a++) z[a] = stream.normal();
  const x = new Array<number>(p);
  for (let a = 0; a < p; a++) {
    let s = mean[a];
    const row = lower[a];
    for (let b = 0; b <= a; b++) s += row[b] * z[b];
    x[a] = s;
  }
  return x;
}
