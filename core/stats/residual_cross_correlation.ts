/**
 * Cross-correlation of several residual series at lags 0 and 1, for the variance of sums of
 * correlated regression errors (integrated spectral bands).
 *
 * @module
 */
import { InputError } from "../errors.ts";
import { gramMatrix } from "./gram_matrix.ts";

/** Result of {@link residualCrossCorrelation}. */
export interface ResidualCrossCorrelation {
  /** r_ij = Σ_t e_i e_j / √(Σ e_i² Σ e_j²) (m×m, symmetric, positive semi-definite). */
  lag0: number[][];
  /**
   * ½ Σ_{t≥2} (e_i(t) e_j(t−1) + e_j(t) e_i(t−1)) / √(Σ e_i² Σ e_j²) (m×m, symmetric); its
   * diagonal is each series' lag-1 autocorrelation as {@link residualLag1} defines it.
   */
  lag1: number[][];
  /** Number of common points used. */
  n: number;
}

/**
 * Lag-0 and lag-1 cross-correlation of m residual series over the points where all of them
 * have a value (NaN elsewhere): uncentred, as regression residuals with an intercept have
 * mean zero (the multivariate form of the lag-1 estimate of Cochrane & Orcutt 1949; the
 * lag-0 matrix is the residual correlation of seemingly unrelated regressions, Zellner 1962,
 * J. Am. Stat. Assoc. 57, 348). Consecutive common points count as neighbours. The lag-1
 * matrix comes from the Gram matrix of s_i(t) = e_i(t) + e_i(t−1): Σ_t s_i s_j minus the two
 * lag-0 sums, so the whole costs two Gram matrices.
 *
 * @param residuals m series of equal length, NaN where a series has no value
 * @param minPoints fewest common points accepted @default 10
 * @returns {@link ResidualCrossCorrelation}, or null with fewer than `minPoints` common
 *   points; a series that is zero at every common point has zero correlations
 * @throws {InputError} (field `residuals`) when the lengths differ or no series is given
 * @example
 * ```ts
 * import { residualCrossCorrelation } from "./residual_cross_correlation.ts";
 * import assert from "node:assert/strict";
 * const e = Float64Array.of(1, -1, 2, 0, -2, 1, 1, -1, 0, 1, -2);
 * const c = residualCrossCorrelation([e, e.map((v) => -2 * v)], 5)!;
 * assert.ok(Math.abs(c.lag0[0][1] + 1) < 1e-12); // perfectly anti-correlated
 * assert.equal(c.n, 11);
 * ```
 */
export function residualCrossCorrelation(
  residuals: readonly ArrayLike<number>[],
  minPoints = 10,
): ResidualCrossCorrelation | null {
  const m = residuals.length;
  if (m === 0) {
    throw new InputError("Cannot correlate residuals: no series", {
      field: "residuals",
      reason: "empty",
    });
  }
  const len = residuals[0].length;
  residuals.forEach((r, i) => {
    if (r.length !== len) {
      throw new InputError(
        `Cannot correlate residuals: series ${i} has ${r.length} points, series 0 has ${len}`,
        { field: "residuals", reason: "length_mismatch", index: i },
      );
    }
  });
  // series by series (each read in order), not point by point across the series
  const usable = new Uint8Array(len).fill(1);
  for (const r of residuals) {
    for (let t = 0; t < len; t++) if (!Number.isFinite(r[t])) usable[t] = 0;
  }
  const common = new Int32Array(len);
  let n = 0;
  for (let t = 0; t < len; t++) if (usable[t]) common[n++] = t;
  if (n < Math.max(2, minPoints)) return null;
  const e = residuals.map((r) => {
    // every point common: the series itself (read only)
    if (n === len && r instanceof Float64Array) return r;
    const x = new Float64Array(n);
    for (let j = 0; j < n; j++) x[j] = r[common[j]];
    return x;
  });
  const g0 = gramMatrix(e);
  const s = e.map((x) => {
    const out = new Float64Array(n - 1);
    for (let t = 1; t < n; t++) out[t - 1] = x[t] + x[t - 1];
    return out;
  });
  const gs = gramMatrix(s);
  const lag0: number[][] = [], lag1: number[][] = [];
  for (let i = 0; i < m; i++) {
    lag0.push(new Array<number>(m));
    lag1.push(new Array<number>(m));
    for (let j = 0; j < m; j++) {
      const d = Math.sqrt(g0[i][i] * g0[j][j]);
      const first = e[i][0] * e[j][0], last = e[i][n - 1] * e[j][n - 1];
      // Σ_{t≥1} s_i s_j = Σ_{t≥1} e_i e_j + Σ_{t≤n−2} e_i e_j + Σ_{t≥1} (e_i(t)e_j(t−1) + e_j(t)e_i(t−1))
      const cross = gs[i][j] - (g0[i][j] - first) - (g0[i][j] - last);
      lag0[i][j] = d > 0 ? g0[i][j] / d : 0;
      lag1[i][j] = d > 0 ? cross / 2 / d : 0;
    }
  }
  return { lag0, lag1, n };
}
