/**
 * Condition numbers of regression designs.
 *
 * @module
 */
import { Matrix, SVD } from "ml-matrix";
import { householderR } from "./least_squares_qr.ts";
import { InputError } from "../errors.ts";

/**
 * The exact 2-norm condition number κ(X) = σ_max / σ_min of a design given as columns: the
 * singular values come from ml-matrix's SVD of the p×p R factor of X = QR (the same singular
 * values as X). This equals R's `kappa(X, exact = TRUE)`.
 *
 * @param columns the design X as columns of equal length n ≥ p
 * @returns κ(X) ≥ 1, or Infinity for a rank-deficient design
 * @throws {InputError} when there are no columns, lengths differ or n < p
 * @example
 * ```ts
 * import { conditionNumber } from "./condition_number.ts";
 * import assert from "node:assert/strict";
 * const c = conditionNumber([new Float64Array([1, 0]), new Float64Array([0, 2])]);
 * assert.ok(Math.abs(c - 2) < 1e-12);
 * ```
 */
export function conditionNumber(columns: readonly Float64Array[]): number {
  const p = columns.length;
  if (p === 0) {
    throw new InputError("Cannot compute condition number: the design has no columns", {
      field: "columns",
      reason: "empty",
    });
  }
  const n = columns[0].length;
  for (const [j, c] of columns.entries()) {
    if (c.length !== n) {
      throw new InputError("Cannot compute condition number: columns differ in length", {
        field: "columns",
        reason: "length_mismatch",
        index: j,
      });
    }
  }
  if (n < p) {
    throw new InputError(`Cannot compute condition number: needs at least ${p} rows, got ${n}`, {
      field: "columns",
      reason: "too_few_points",
      value: n,
    });
  }
  return conditionNumberOfR(householderR(columns).r);
}

/**
 * κ from a triangular factor R (p×p rows) of X = QR: σ_max/σ_min of R by ml-matrix's SVD.
 *
 * @param r the R factor, p×p
 * @returns κ ≥ 1, Infinity when R is singular
 * @example
 * ```ts
 * import { conditionNumberOfR } from "./condition_number.ts";
 * import assert from "node:assert/strict";
 * assert.ok(Math.abs(conditionNumberOfR([[4, 0], [0, 1]]) - 4) < 1e-12);
 * ```
 */
export function conditionNumberOfR(r: number[][]): number {
  const svd = new SVD(new Matrix(r), {
    computeLeftSingularVectors: false,
    computeRightSingularVectors: false,
  });
  const s = svd.diagonal;
  const max = Math.max(...s);
  const min = Math.min(...s);
  return min > 0 ? max / min : Infinity;
}

/**
 * Collinearity diagnostic for a set of regressors: the condition number of the regressors
 * after centring each on its mean and scaling it to unit length (the square root of the
 * condition number of their correlation matrix). Unlike κ(X) it does not depend on units or
 * on the offset of a proxy from zero. For two regressors with correlation r it is
 * √((1 + |r|)/(1 − |r|)). Belsley, Kuh & Welsch (1980, Regression Diagnostics, ch. 3) read
 * values above about 30 as strong collinearity.
 *
 * @param columns regressors (without the intercept), each of length n ≥ 2
 * @returns the condition number ≥ 1 (1 for a single regressor), Infinity when a regressor is
 *   constant or a combination of the others
 * @throws {InputError} when there are no columns or lengths differ
 * @example
 * ```ts
 * import { collinearityConditionNumber } from "./condition_number.ts";
 * import assert from "node:assert/strict";
 * const x = new Float64Array([1, 2, 3, 4]);
 * const z = new Float64Array([1, 3, 2, 4]); // correlation 0.8
 * const c = collinearityConditionNumber([x, z]);
 * assert.ok(Math.abs(c - 3) < 1e-12); // √(1.8 / 0.2)
 * ```
 */
export function collinearityConditionNumber(columns: readonly Float64Array[]): number {
  if (columns.length === 0) {
    throw new InputError("Cannot compute collinearity condition number: no regressors", {
      field: "columns",
      reason: "empty",
    });
  }
  const n = columns[0].length;
  const scaled: Float64Array[] = [];
  for (const [j, c] of columns.entries()) {
    if (c.length !== n) {
      throw new InputError(
        "Cannot compute collinearity condition number: columns differ in length",
        { field: "columns", reason: "length_mismatch", index: j },
      );
    }
    let m = 0;
    for (let i = 0; i < n; i++) m += c[i];
    m /= n;
    const z = new Float64Array(n);
    let ss = 0;
    for (let i = 0; i < n; i++) {
      z[i] = c[i] - m;
      ss += z[i] * z[i];
    }
    if (!(ss > 0)) return Infinity;
    const f = 1 / Math.sqrt(ss);
    for (let i = 0; i < n; i++) z[i] *= f;
    scaled.push(z);
  }
  if (scaled.length === 1) return 1;
  if (n < scaled.length) return Infinity;
  return conditionNumber(scaled);
}
