/**
 * Newey–West heteroskedasticity- and autocorrelation-consistent (HAC) covariance for OLS.
 *
 * @module
 */
import { leastSquaresQr } from "./least_squares_qr.ts";
import type { RegressionFit } from "./ordinary_least_squares.ts";
import { normalCdf, normalQuantile } from "./distributions.ts";
import { InputError } from "../errors.ts";

/** Options for {@link neweyWest}. */
export interface NeweyWestOptions {
  /**
   * Bartlett truncation lag L. @default the Newey & West (1994) rule ⌊4 (n/100)^(2/9)⌋
   */
  maxLags?: number;
  /** Multiply by n/(n − p) (small-sample correction). @default true */
  useCorrection?: boolean;
}

/** Newey–West covariance and the inference that follows from it. */
export interface NeweyWestResult {
  maxLags: number;
  useCorrection: boolean;
  covariance: number[][];
  standardErrors: number[];
  /** z statistics β/SE and two-sided normal p-values (as statsmodels' HAC default). */
  zValues: number[];
  pValues: number[];
  /** 95 % normal intervals β ± 1.96·SE. */
  lower: number[];
  upper: number[];
}

/**
 * The default truncation lag ⌊4 (n/100)^(2/9)⌋ (Newey & West 1994, Rev. Econ. Stud. 61, 631).
 *
 * @param n number of observations, ≥ 1
 * @returns the lag, ≥ 0
 * @example
 * ```ts
 * import { neweyWestDefaultLag } from "./newey_west.ts";
 * import assert from "node:assert/strict";
 * assert.equal(neweyWestDefaultLag(100), 4);
 * assert.equal(neweyWestDefaultLag(17000), 12);
 * ```
 */
export function neweyWestDefaultLag(n: number): number {
  return Math.floor(4 * Math.pow(n / 100, 2 / 9));
}

/**
 * Newey & West (1987, Econometrica 55, 703) HAC covariance of OLS coefficients:
 * (XᵀX)⁻¹ S (XᵀX)⁻¹ with S = Σ_t x_t x_tᵀ e_t² + Σ_{l=1..L} w_l Σ_t (x_t x_{t−l}ᵀ + x_{t−l} x_tᵀ)
 * e_t e_{t−l} and Bartlett weights w_l = 1 − l/(L + 1), optionally times n/(n − p). This is
 * statsmodels' `OLS(...).fit(cov_type="HAC", cov_kwds={"maxlags": L, "use_correction":
 * True})`, whose p-values use the normal distribution; we do the same.
 *
 * @param fit an OLS {@link RegressionFit} (its design and residuals are used)
 * @param options {@link NeweyWestOptions}
 * @returns the {@link NeweyWestResult}
 * @throws {InputError} when maxLags is not an integer in [0, n − 1]
 * @example
 * ```ts
 * import { ordinaryLeastSquares } from "./ordinary_least_squares.ts";
 * import { neweyWest } from "./newey_west.ts";
 * import assert from "node:assert/strict";
 * const x = new Float64Array([1, 2, 3, 4, 5, 6, 7, 8]);
 * const y = new Float64Array([1.2, 1.9, 3.2, 3.8, 5.1, 6.3, 6.8, 8.1]);
 * const nw = neweyWest(ordinaryLeastSquares([x], y), { maxLags: 0, useCorrection: false });
 * assert.equal(nw.maxLags, 0); // L = 0 is White's (1980) heteroskedasticity-robust HC0
 * assert.ok(nw.standardErrors[1] > 0);
 * ```
 */
export function neweyWest(fit: RegressionFit, options: NeweyWestOptions = {}): NeweyWestResult {
  const x = fit.design, e = fit.residuals;
  const n = e.length, p = x.length;
  const L = options.maxLags ?? neweyWestDefaultLag(n);
  const useCorrection = options.useCorrection ?? true;
  if (!Number.isInteger(L) || L < 0 || L > n - 1) {
    throw new InputError(
      `Cannot compute Newey–West covariance: maxLags must be an integer in [0, ${
        n - 1
      }], current value is ${L}`,
      { field: "maxLags", reason: "out_of_range", value: L },
    );
  }
  // scores x_t e_t
  const u = x.map((c) => {
    const s = new Float64Array(n);
    for (let i = 0; i < n; i++) s[i] = c[i] * e[i];
    return s;
  });
  const S: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let a = 0; a < p; a++) {
    for (let b = a; b < p; b++) {
      let s = 0;
      const ua = u[a], ub = u[b];
      for (let t = 0; t < n; t++) s += ua[t] * ub[t];
      S[a][b] += s;
      if (b !== a) S[b][a] += s;
    }
  }
  for (let l = 1; l <= L; l++) {
    const w = 1 - l / (L + 1);
    for (let a = 0; a < p; a++) {
      for (let b = 0; b < p; b++) {
        let s = 0;
        const ua = u[a], ub = u[b];
        for (let t = l; t < n; t++) s += ua[t] * ub[t - l];
        // Γ_l[a][b] + Γ_l[b][a]
        S[a][b] += w * s;
        S[b][a] += w * s;
      }
    }
  }
  const xtxInv = leastSquaresQr(x, e).xtxInverse;
  const tmp = xtxInv.map((row) =>
    row.map((_, j) => row.reduce((acc, v, k) => acc + v * S[k][j], 0))
  );
  const corr = useCorrection ? n / (n - p) : 1;
  const covariance = tmp.map((row) =>
    xtxInv.map((_, j) => corr * row.reduce((acc, v, k) => acc + v * xtxInv[k][j], 0))
  );
  const standardErrors = covariance.map((row, j) => Math.sqrt(Math.max(0, row[j])));
  const beta = fit.coefficients;
  const zValues = beta.map((b, j) => standardErrors[j] > 0 ? b / standardErrors[j] : 0);
  const pValues = zValues.map((z) => 2 * normalCdf(-Math.abs(z)));
  const zc = normalQuantile(0.975);
  return {
    maxLags: L,
    useCorrection,
    covariance,
    standardErrors,
    zValues,
    pValues,
    lower: beta.map((b, j) => b - zc * standardErrors[j]),
    upper: beta.map((b, j) => b + zc * standardErrors[j]),
  };
}
