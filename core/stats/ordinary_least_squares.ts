/**
 * Ordinary least squares with the full set of classical fit statistics.
 *
 * @module
 */
import { residualLag1 } from "./residual_lag1.ts";
import { leastSquaresQrMany } from "./least_squares_qr.ts";
import { conditionNumberOfR } from "./condition_number.ts";
import { tCdf, tQuantile } from "./distributions.ts";
import { InputError } from "../errors.ts";

/** Options for {@link ordinaryLeastSquares}. */
export interface OlsOptions {
  /** Prepend a column of ones (the intercept) to the design. @default true */
  intercept?: boolean;
  /** Coefficient names, one per given column (the intercept is named "intercept"). */
  names?: string[];
  /** Confidence level of the coefficient intervals. @default 0.95 */
  level?: number;
}

/**
 * A fitted linear regression. Per-observation arrays are `Float64Array`; per-coefficient
 * arrays are plain `number[]` in design order (intercept first when present).
 */
export interface RegressionFit {
  /** Method name, "ols" or "prais-winsten". */
  method: string;
  names: string[];
  /** Number of observations and of coefficients; residual degrees of freedom n − p. */
  n: number;
  p: number;
  dfResidual: number;
  intercept: boolean;
  coefficients: number[];
  /** Coefficient covariance σ̂²(XᵀX)⁻¹ (p×p). */
  covariance: number[][];
  standardErrors: number[];
  tValues: number[];
  /** Two-sided p-values from Student's t with dfResidual degrees of freedom. */
  pValues: number[];
  /** Confidence level and interval bounds β ± t(1 − (1 − level)/2, df)·SE. */
  level: number;
  lower: number[];
  upper: number[];
  /** Residual standard error σ̂ = √(RSS/(n − p)) (R's `sigma(lm)`). */
  sigma: number;
  /** Residual RMS √(RSS/n) on the original scale. */
  residualRms: number;
  rss: number;
  /**
   * R² = 1 − RSS/TSS with TSS about the mean when an intercept is present, about zero
   * otherwise (as R's `summary.lm`); on the original scale.
   */
  rSquared: number;
  /** Adjusted R² = 1 − (1 − R²)(n − i)/(n − p), i = 1 with an intercept, else 0 (as R). */
  adjRSquared: number;
  /** Gaussian log-likelihood at the ML variance RSS/n (R's `logLik(lm)`). */
  logLikelihood: number;
  /** AIC = −2 logL + 2(p + 1) and BIC = −2 logL + ln(n)(p + 1), σ counted (R's `AIC(lm)`). */
  aic: number;
  bic: number;
  /** Lag-1 autocorrelation of the residuals, Σ e_t e_{t−1} / Σ e_t². */
  residualLag1: number;
  /** Exact 2-norm condition number of the design (R's `kappa(X, exact = TRUE)`). */
  conditionNumber: number;
  /** Fitted values Xβ and residuals y − Xβ on the original scale. */
  fitted: Float64Array;
  residuals: Float64Array;
  /** The design used (intercept column included), shared, not copied. */
  design: Float64Array[];
}

/**
 * Throw an {@link InputError} naming the function, the array and the index unless every value
 * is finite.
 *
 * @param fn what was being done, e.g. "fit ordinary least squares"
 * @param what the array's name in the message
 * @param x the values
 * @param at the argument the error names and, for an array of arrays, which one (default: `what`
 *   and the index of the value)
 * @throws {InputError} at the first NaN or ±Infinity
 * @example
 * ```ts
 * import { assertFinite } from "./ordinary_least_squares.ts";
 * import assert from "node:assert/strict";
 * assert.throws(() => assertFinite("fit", "y", [1, NaN]), { field: "y", index: 1 });
 * ```
 */
export function assertFinite(
  fn: string,
  what: string,
  x: ArrayLike<number>,
  at: { field: string; index?: number } = { field: what },
): void {
  for (let i = 0; i < x.length; i++) {
    if (!Number.isFinite(x[i])) {
      throw new InputError(`Cannot ${fn}: ${what} has a non-finite value at index ${i} (${x[i]})`, {
        field: at.field,
        reason: "not_finite",
        index: at.index ?? i,
        value: x[i],
      });
    }
  }
}

/**
 * Build the design (intercept column first when asked) and check shapes and values; shared by
 * the regression methods.
 *
 * @param fn what was being done (for messages)
 * @param columns regressors
 * @param y response
 * @param intercept prepend a column of ones
 * @param names regressor names, or undefined for x1, x2, ...
 * @returns the design columns and the coefficient names
 * @throws {InputError} for non-finite values, length mismatch or fewer than p + 1 points (field
 *   `y`, `columns` with the column's index, or `names`)
 * @example
 * ```ts
 * import { buildDesign } from "./ordinary_least_squares.ts";
 * import assert from "node:assert/strict";
 * const d = buildDesign("fit", [Float64Array.of(1, 2, 3)], Float64Array.of(2, 4, 7), true, ["x"]);
 * assert.deepEqual(d.names, ["intercept", "x"]);
 * assert.deepEqual([...d.design[0]], [1, 1, 1]);
 * ```
 */
export function buildDesign(
  fn: string,
  columns: readonly Float64Array[],
  y: Float64Array,
  intercept: boolean,
  names: string[] | undefined,
): { design: Float64Array[]; names: string[] } {
  const n = y.length;
  assertFinite(fn, "y", y);
  columns.forEach((c, j) => {
    if (c.length !== n) {
      throw new InputError(`Cannot ${fn}: column ${j} has length ${c.length}, y has ${n}`, {
        field: "columns",
        reason: "length_mismatch",
        index: j,
      });
    }
    assertFinite(fn, `column ${j}`, c, { field: "columns", index: j });
  });
  if (names && names.length !== columns.length) {
    throw new InputError(
      `Cannot ${fn}: ${names.length} names given for ${columns.length} columns`,
      { field: "names", reason: "length_mismatch", value: names.length },
    );
  }
  const design = intercept ? [new Float64Array(n).fill(1), ...columns] : [...columns];
  const nm = [
    ...(intercept ? ["intercept"] : []),
    ...(names ?? columns.map((_, j) => `x${j + 1}`)),
  ];
  if (design.length === 0) {
    throw new InputError(`Cannot ${fn}: the design has no columns`, {
      field: "columns",
      reason: "empty",
    });
  }
  if (n < design.length + 1) {
    throw new InputError(
      `Cannot ${fn}: needs at least ${
        design.length + 1
      } points for ${design.length} coefficients, got ${n}`,
      { field: "y", reason: "too_few_points", value: n },
    );
  }
  return { design, names: nm };
}

/**
 * Original-scale fit statistics shared by OLS and GLS-type fits: fitted values, residuals,
 * RSS, R² (centred with an intercept, else uncentred, as R), adjusted R², residual RMS,
 * residual lag-1 autocorrelation and the two-sided t quantile for `level`.
 *
 * @param design design columns (intercept included)
 * @param y response
 * @param beta coefficients
 * @param intercept whether the design has an intercept column
 * @param level confidence level in (0, 1)
 * @returns the statistics
 * @throws {InputError} for a level outside (0, 1)
 * @example
 * ```ts
 * import { fitStatistics } from "./ordinary_least_squares.ts";
 * import assert from "node:assert/strict";
 * const one = Float64Array.of(1, 1, 1, 1), x = Float64Array.of(0, 1, 2, 3);
 * const st = fitStatistics([one, x], Float64Array.of(1, 3, 5, 7), [1, 2], true, 0.95);
 * assert.equal(st.rss, 0);
 * assert.equal(st.rSquared, 1);
 * ```
 */
export function fitStatistics(
  design: Float64Array[],
  y: Float64Array,
  beta: number[],
  intercept: boolean,
  level: number,
): {
  fitted: Float64Array;
  residuals: Float64Array;
  rss: number;
  rSquared: number;
  adjRSquared: number;
  residualRms: number;
  residualLag1: number;
  tcrit: number;
} {
  const n = y.length;
  const p = design.length;
  const fitted = new Float64Array(n);
  for (let j = 0; j < p; j++) {
    const c = design[j], b = beta[j];
    for (let i = 0; i < n; i++) fitted[i] += b * c[i];
  }
  const residuals = new Float64Array(n);
  let rss = 0, ybar = 0;
  for (let i = 0; i < n; i++) {
    residuals[i] = y[i] - fitted[i];
    rss += residuals[i] * residuals[i];
    ybar += y[i];
  }
  ybar = intercept ? ybar / n : 0;
  let tss = 0;
  for (let i = 0; i < n; i++) tss += (y[i] - ybar) * (y[i] - ybar);
  const rSquared = tss > 0 ? 1 - rss / tss : 0;
  const adjRSquared = 1 - (1 - rSquared) * (n - (intercept ? 1 : 0)) / (n - p);
  const lag1 = residualLag1(residuals);
  if (!(level > 0 && level < 1)) {
    throw new InputError(
      `Cannot fit regression: level must be in (0, 1), current value is ${level}`,
      { field: "level", reason: "out_of_range", value: level },
    );
  }
  const tcrit = tQuantile(1 - (1 - level) / 2, n - p);
  return {
    fitted,
    residuals,
    rss,
    rSquared,
    adjRSquared,
    residualRms: Math.sqrt(rss / n),
    residualLag1: lag1,
    tcrit,
  };
}

/**
 * Standard errors, t values, two-sided p-values from t(df) and the intervals β ± tcrit·SE
 * from a coefficient covariance matrix.
 *
 * @param beta coefficients
 * @param covariance their covariance (p×p)
 * @param df residual degrees of freedom
 * @param tcrit the two-sided quantile for the intervals
 * @returns per-coefficient arrays
 * @example
 * ```ts
 * import { coefficientInference } from "./ordinary_least_squares.ts";
 * import assert from "node:assert/strict";
 * const r = coefficientInference([2], [[0.25]], 10, 2.228);
 * assert.equal(r.standardErrors[0], 0.5);
 * assert.equal(r.tValues[0], 4);
 * assert.ok(Math.abs(r.lower[0] - (2 - 2.228 * 0.5)) < 1e-12);
 * ```
 */
export function coefficientInference(
  beta: number[],
  covariance: number[][],
  df: number,
  tcrit: number,
): {
  standardErrors: number[];
  tValues: number[];
  pValues: number[];
  lower: number[];
  upper: number[];
} {
  const standardErrors = beta.map((_, j) => Math.sqrt(Math.max(0, covariance[j][j])));
  const tValues = beta.map((b, j) => standardErrors[j] > 0 ? b / standardErrors[j] : 0);
  const pValues = tValues.map((t) => 2 * tCdf(-Math.abs(t), df));
  const lower = beta.map((b, j) => b - tcrit * standardErrors[j]);
  const upper = beta.map((b, j) => b + tcrit * standardErrors[j]);
  return { standardErrors, tValues, pValues, lower, upper };
}

/**
 * Ordinary least squares y = Xβ + ε, solved by Householder QR (as R's `lm`), with the
 * classical inference of the Gauss–Markov model: covariance σ̂²(XᵀX)⁻¹, σ̂² = RSS/(n − p),
 * Student-t intervals and p-values, R², adjusted R², the Gaussian log-likelihood, AIC and BIC
 * in R's `AIC(lm)` convention (the error variance counted as a parameter), the residual lag-1
 * autocorrelation and the design's condition number. Standard references: Draper & Smith
 * (1998, Applied Regression Analysis, 3rd ed., ch. 5); Akaike (1974); Schwarz (1978).
 *
 * Units: coefficients are in units of y per unit of each regressor.
 *
 * @param columns regressors as columns (each of length n), without the intercept unless
 *   `options.intercept` is false
 * @param y response, length n
 * @param options {@link OlsOptions}
 * @returns the {@link RegressionFit}
 * @throws {InputError} on non-finite values, length mismatch, fewer than p + 1 points (as
 *   {@link buildDesign}), or a rank-deficient design (field `columns`, reason `collinear`, index
 *   of the design column, the intercept first when there is one)
 * @example
 * ```ts
 * import { ordinaryLeastSquares } from "./ordinary_least_squares.ts";
 * import assert from "node:assert/strict";
 * const x = new Float64Array([1, 2, 3, 4, 5]);
 * const y = new Float64Array([2.1, 3.9, 6.2, 7.8, 10.1]);
 * const fit = ordinaryLeastSquares([x], y);
 * // R: coef(lm(y ~ x)) = 0.05, 1.99
 * assert.ok(Math.abs(fit.coefficients[0] - 0.05) < 1e-10);
 * assert.ok(Math.abs(fit.coefficients[1] - 1.99) < 1e-10);
 * ```
 */
export function ordinaryLeastSquares(
  columns: readonly Float64Array[],
  y: Float64Array,
  options: OlsOptions = {},
): RegressionFit {
  return ordinaryLeastSquaresMany(columns, [y], options)[0];
}

/**
 * {@link ordinaryLeastSquares} for several responses with one design (multivariate
 * regression with common regressors, fitted equation by equation: with identical regressors
 * the equation-by-equation OLS estimates are the efficient ones, Zellner 1962, J. Am. Stat.
 * Assoc. 57, 348): the design is factorised once ({@link leastSquaresQrMany}) and each
 * response gets the full set of statistics. Each fit equals `ordinaryLeastSquares(columns, y_k)`
 * bit for bit; the design arrays are shared between the fits.
 *
 * @param columns regressors as columns (each of length n)
 * @param ys responses, each of length n (at least one)
 * @param options {@link OlsOptions}
 * @returns one {@link RegressionFit} per response
 * @throws {InputError} as {@link ordinaryLeastSquares} (field `ys` with the index of a
 *   response that is not finite or of the wrong length, `y` when there is only one)
 * @example
 * ```ts
 * import { ordinaryLeastSquaresMany } from "./ordinary_least_squares.ts";
 * import assert from "node:assert/strict";
 * const x = Float64Array.of(1, 2, 3, 4, 5);
 * const [a, b] = ordinaryLeastSquaresMany([x], [
 *   Float64Array.of(2.1, 3.9, 6.2, 7.8, 10.1),
 *   Float64Array.of(1, 1, 2, 2, 3),
 * ]);
 * assert.ok(Math.abs(a.coefficients[1] - 1.99) < 1e-10); // R: coef(lm(y ~ x))
 * assert.ok(Math.abs(b.coefficients[1] - 0.5) < 1e-10);
 * ```
 */
export function ordinaryLeastSquaresMany(
  columns: readonly Float64Array[],
  ys: readonly Float64Array[],
  options: OlsOptions = {},
): RegressionFit[] {
  const intercept = options.intercept ?? true;
  const level = options.level ?? 0.95;
  const fn = "fit ordinary least squares";
  if (ys.length === 0) {
    throw new InputError(`Cannot ${fn}: no response given`, { field: "ys", reason: "empty" });
  }
  const { design, names } = buildDesign(fn, columns, ys[0], intercept, options.names);
  const n = ys[0].length, p = design.length;
  ys.forEach((y, k) => {
    if (k === 0) return;
    if (y.length !== n) {
      throw new InputError(`Cannot ${fn}: response ${k} has length ${y.length}, not ${n}`, {
        field: "ys",
        reason: "length_mismatch",
        index: k,
      });
    }
    assertFinite(fn, `response ${k}`, y, { field: "ys", index: k });
  });
  const qr = leastSquaresQrMany(design, ys);
  const conditionNumber = conditionNumberOfR(qr.r);
  const df = n - p;
  return ys.map((y, k) => {
    const beta = qr.coefficients[k];
    const st = fitStatistics(design, y, beta, intercept, level);
    const s2 = st.rss / df;
    const covariance = qr.xtxInverse.map((row) => row.map((v) => v * s2));
    const inf = coefficientInference(beta, covariance, df, st.tcrit);
    const logLikelihood = 0.5 *
      (-n * (Math.log(2 * Math.PI) + 1 - Math.log(n) + Math.log(st.rss)));
    return {
      method: "ols",
      names,
      n,
      p,
      dfResidual: df,
      intercept,
      coefficients: beta,
      covariance,
      ...inf,
      level,
      sigma: Math.sqrt(s2),
      residualRms: st.residualRms,
      rss: st.rss,
      rSquared: st.rSquared,
      adjRSquared: st.adjRSquared,
      logLikelihood,
      aic: -2 * logLikelihood + 2 * (p + 1),
      bic: -2 * logLikelihood + Math.log(n) * (p + 1),
      residualLag1: st.residualLag1,
      conditionNumber,
      fitted: st.fitted,
      residuals: st.residuals,
      design,
    };
  });
}
