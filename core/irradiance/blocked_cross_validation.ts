/**
 * Time-blocked k-fold cross-validation of a linear regression.
 *
 * @module
 */
import { InputError } from "../errors.ts";
import type { RegressionFit } from "../stats/ordinary_least_squares.ts";

/** What cross-validation reads of a fit: its coefficients, and whether the first is an intercept. */
export type CrossValidationFit = Pick<RegressionFit, "coefficients" | "intercept">;

const pool: Float64Array[] = [];
/** Work array `i` of length n (a view of a pooled buffer that grows as needed). */
function work(i: number, n: number): Float64Array {
  if (!pool[i] || pool[i].length < n) pool[i] = new Float64Array(Math.max(n, 1024));
  return pool[i].subarray(0, n);
}

/** Result of {@link blockedCrossValidation}. */
export interface BlockedCrossValidation {
  folds: number;
  /** RMSE over all held-out points, and per fold, in units of y. */
  rmse: number;
  foldRmse: number[];
  /** First and last index of each block. */
  blocks: [number, number][];
}

/**
 * k-fold cross-validation with contiguous time blocks (not shuffled points): block j holds
 * indices [⌊jn/k⌋, ⌊(j+1)n/k⌋); each block is predicted from a fit on the other blocks, so the
 * serial correlation of neighbouring days does not leak into the test error (Roberts et al.
 * 2017, Ecography 40, 913, "blocked cross-validation"). For regression with AR(1) errors the
 * prediction is Xβ, without using the neighbouring residuals.
 *
 * @param columns regressors (without intercept), time-ordered
 * @param y response
 * @param k number of folds, 2 ≤ k ≤ n/2 @default 5
 * @param fit the fitting function (e.g. ordinaryLeastSquares or praisWinsten)
 * @returns {@link BlockedCrossValidation}
 * @throws {InputError} when k is out of range; errors of `fit` propagate
 * @example
 * ```ts
 * import { blockedCrossValidation } from "./blocked_cross_validation.ts";
 * import { ordinaryLeastSquares } from "../stats/ordinary_least_squares.ts";
 * import assert from "node:assert/strict";
 * const x = Float64Array.from({ length: 40 }, (_, i) => i);
 * const y = x.map((v) => 2 * v + 1);
 * const cv = blockedCrossValidation([x], y, 4, ordinaryLeastSquares);
 * assert.ok(cv.rmse < 1e-9);
 * ```
 */
export function blockedCrossValidation(
  columns: readonly Float64Array[],
  y: Float64Array,
  k: number,
  fit: (columns: Float64Array[], y: Float64Array) => CrossValidationFit,
): BlockedCrossValidation {
  return blockedCrossValidationMany(columns, [y], k, (c, ys) => [fit(c, ys[0])])[0];
}

/**
 * {@link blockedCrossValidation} of several responses that share the design: the same blocks
 * for every response, and one call of `fitMany` per fold for all of them (so a fitter that
 * factorises the training design once, such as `ordinaryLeastSquaresMany`, does so once per
 * fold). Each response's result equals that of {@link blockedCrossValidation} with the
 * equivalent one-response fitter.
 *
 * @param columns regressors (without intercept), time-ordered
 * @param ys responses, each of the columns' length
 * @param k number of folds, 2 ≤ k ≤ n/2
 * @param fitMany fits every response on the training rows, in order (only the coefficients
 *   are read: a fitter may skip the fit statistics)
 * @returns one {@link BlockedCrossValidation} per response
 * @throws {InputError} when k is out of range; errors of `fitMany` propagate
 * @example
 * ```ts
 * import { blockedCrossValidationMany } from "./blocked_cross_validation.ts";
 * import { ordinaryLeastSquaresMany } from "../stats/ordinary_least_squares.ts";
 * import assert from "node:assert/strict";
 * const x = Float64Array.from({ length: 40 }, (_, i) => i);
 * const cv = blockedCrossValidationMany([x], [x.map((v) => 2 * v + 1), x.map((v) => -v)], 4,
 *   (c, ys) => ordinaryLeastSquaresMany(c, ys));
 * assert.equal(cv.length, 2);
 * assert.ok(cv[0].rmse < 1e-9 && cv[1].rmse < 1e-9);
 * ```
 */
export function blockedCrossValidationMany(
  columns: readonly Float64Array[],
  ys: readonly Float64Array[],
  k: number,
  fitMany: (columns: Float64Array[], ys: Float64Array[]) => CrossValidationFit[],
): BlockedCrossValidation[] {
  const n = ys[0]?.length ?? 0;
  if (!Number.isInteger(k) || k < 2 || k > Math.floor(n / 2)) {
    throw new InputError(
      `Cannot cross-validate: folds must be an integer in [2, ${
        Math.floor(n / 2)
      }], current value is ${k}`,
      { field: "k", reason: "out_of_range", value: k },
    );
  }
  const blocks: [number, number][] = [];
  const foldRmse: number[][] = ys.map(() => []);
  const sse = new Float64Array(ys.length);
  for (let j = 0; j < k; j++) {
    const a = Math.floor((j * n) / k), b = Math.floor(((j + 1) * n) / k);
    blocks.push([a, b - 1]);
    const m = n - (b - a);
    // the training rows in pooled work arrays: the fits' results are read for their
    // coefficients and dropped, so nothing kept refers to them (fresh arrays cost page faults
    // per fold)
    const cut = (c: Float64Array, q: number) => {
      const out = work(q, m);
      out.set(c.subarray(0, a), 0);
      out.set(c.subarray(b), a);
      return out;
    };
    const trainCols = columns.map((c, q) => cut(c, q));
    const fits = fitMany(trainCols, ys.map((y, r) => cut(y, columns.length + r)));
    // the predictions column by column (each in the order of the columns, as one at a time)
    const pred = new Float64Array(b - a);
    ys.forEach((y, r) => {
      const beta = fits[r].coefficients;
      const off = fits[r].intercept ? 1 : 0;
      pred.fill(off ? beta[0] : 0);
      for (let c = 0; c < columns.length; c++) {
        const x = columns[c], bc = beta[c + off];
        for (let i = a; i < b; i++) pred[i - a] += bc * x[i];
      }
      let s = 0;
      for (let i = a; i < b; i++) s += (y[i] - pred[i - a]) ** 2;
      sse[r] += s;
      foldRmse[r].push(Math.sqrt(s / (b - a)));
    });
  }
  return ys.map((_, r) => ({
    folds: k,
    rmse: Math.sqrt(sse[r] / n),
    foldRmse: foldRmse[r],
    blocks: blocks.map(([a, b]) => [a, b] as [number, number]),
  }));
}
