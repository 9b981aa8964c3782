/**
 * Linear regression with AR(1) errors by iterated Prais–Winsten feasible GLS.
 *
 * @module
 */
import { leastSquaresQr } from "./least_squares_qr.ts";
import { conditionNumberOfR } from "./condition_number.ts";
import { InputError } from "../errors.ts";
import {
  buildDesign,
  coefficientInference,
  fitStatistics,
  type RegressionFit,
} from "./ordinary_least_squares.ts";
import { workArrays } from "./work_arrays.ts";

/** Options for {@link praisWinsten}. */
export interface PraisWinstenOptions {
  /** Prepend a column of ones (the intercept). @default true */
  intercept?: boolean;
  /** Coefficient names, one per given column. */
  names?: string[];
  /** Confidence level of the coefficient intervals. @default 0.95 */
  level?: number;
  /** Stop when |ρ_k − ρ_{k−1}| is below this. @default 1e-8 */
  tolerance?: number;
  /** Maximum number of ρ updates. @default 100 */
  maxIterations?: number;
}

/** A Prais–Winsten fit: a {@link RegressionFit} plus the AR(1) parameter and its iteration. */
export interface PraisWinstenFit extends RegressionFit {
  /** Estimated lag-1 autoregressive coefficient of the errors, in (−1, 1). */
  rho: number;
  /** Number of ρ updates made, whether |Δρ| fell below the tolerance, and the last |Δρ|. */
  iterations: number;
  converged: boolean;
  rhoChange: number;
  /** Innovations u_t = e_t − ρ e_{t−1} (u_1 = √(1 − ρ²) e_1): the whitened residuals. */
  innovations: Float64Array;
  /** Innovation standard deviation σ_u = √(RSS* / (n − p)) (equals `sigma`). */
  innovationSd: number;
}

/** Clamp ρ into the stationary range. */
const RHO_MAX = 0.9999;

function rhoFromResiduals(e: Float64Array): number {
  let num = 0, den = 0;
  for (let t = 1; t < e.length; t++) {
    num += e[t] * e[t - 1];
    den += e[t - 1] * e[t - 1];
  }
  const r = den > 0 ? num / den : 0;
  return Math.max(-RHO_MAX, Math.min(RHO_MAX, r));
}

/** Work array `i` of length n (a view of a pooled buffer that grows as needed). */
const work = workArrays();

function transform(x: Float64Array, rho: number, out: Float64Array): Float64Array {
  out[0] = Math.sqrt(1 - rho * rho) * x[0];
  for (let t = 1; t < x.length; t++) out[t] = x[t] - rho * x[t - 1];
  return out;
}

/**
 * Regression y = Xβ + e with AR(1) errors e_t = ρ e_{t−1} + u_t, by the iterated
 * Prais–Winsten (1954) transformation (the Cochrane–Orcutt 1949 iteration, keeping the first
 * observation scaled by √(1 − ρ²)): start from OLS, estimate ρ̂ = Σ e_t e_{t−1} / Σ e_{t−1}²
 * from the residuals, regress y*_t = y_t − ρ̂ y_{t−1} on X*_t = X_t − ρ̂ X_{t−1}
 * (y*_1 = √(1 − ρ̂²) y_1, likewise X*_1), recompute e = y − Xβ, and repeat until ρ̂ settles.
 * At the fixed point β is the GLS estimate for the AR(1) covariance with that ρ̂; the
 * covariance is σ̂²(X*ᵀX*)⁻¹ with σ̂² = RSS* / (n − p) (as statsmodels' `GLS` with that
 * covariance), not inflated for the estimation of ρ.
 *
 * Reported statistics: R², adjusted R², residual RMS and lag-1 autocorrelation are of the
 * original-scale residuals e = y − Xβ (comparable with OLS); `sigma` is the innovation SD;
 * the log-likelihood is the exact Gaussian AR(1) likelihood at σ²_u = RSS* / n,
 * −n/2·(ln 2π + ln σ²_u + 1) + ½ ln(1 − ρ²), with AIC/BIC counting p + 2 parameters (β, σ, ρ).
 * ρ is kept inside ±0.9999.
 *
 * @param columns regressors as columns (each of length n), time-ordered and equally spaced
 * @param y response, length n
 * @param options {@link PraisWinstenOptions}
 * @returns the {@link PraisWinstenFit}
 * @throws {InputError} as {@link ordinaryLeastSquares}, and when n < p + 2
 * @example
 * ```ts
 * import { praisWinsten } from "./prais_winsten.ts";
 * import assert from "node:assert/strict";
 * const n = 200, x = new Float64Array(n), y = new Float64Array(n);
 * let e = 0, s = 1;
 * for (let t = 0; t < n; t++) {
 *   s = (s * 16807) % 2147483647; // a small deterministic noise source
 *   e = 0.6 * e + (s / 2147483647 - 0.5);
 *   x[t] = Math.sin(t / 5);
 *   y[t] = 1 + 2 * x[t] + e;
 * }
 * const fit = praisWinsten([x], y);
 * assert.ok(fit.converged);
 * assert.ok(Math.abs(fit.coefficients[1] - 2) < 0.3);
 * assert.ok(fit.rho > 0.3 && fit.rho < 0.9);
 * ```
 */
export function praisWinsten(
  columns: readonly Float64Array[],
  y: Float64Array,
  options: PraisWinstenOptions = {},
): PraisWinstenFit {
  const intercept = options.intercept ?? true;
  const level = options.level ?? 0.95;
  const tol = options.tolerance ?? 1e-8;
  const maxIt = options.maxIterations ?? 100;
  const fn = "fit Prais–Winsten regression";
  const { design, names } = buildDesign(fn, columns, y, intercept, options.names);
  const n = y.length, p = design.length;
  if (n < p + 2) {
    throw new InputError(`Cannot ${fn}: needs at least ${p + 2} points, got ${n}`, {
      field: "y",
      reason: "too_few_points",
      value: n,
    });
  }
  // work arrays from a pool kept between calls (fresh arrays of this size cost page faults
  // that were a sixth of a 17,000-day calibration); nothing returned refers to them
  const ys = work(0, n), e = work(1, n);
  const xs = design.map((_, j) => work(2 + j, n));
  // the first, ordinary least-squares fit, on copies (the QR overwrites its input)
  design.forEach((c, j) => xs[j].set(c));
  ys.set(y);
  let qr = leastSquaresQr(xs, ys, true);
  const kappa = conditionNumberOfR(qr.r);
  let beta = qr.coefficients;
  const resid = (b: number[]) => {
    for (let i = 0; i < n; i++) e[i] = y[i];
    for (let j = 0; j < p; j++) {
      const c = design[j], bj = b[j];
      for (let i = 0; i < n; i++) e[i] -= bj * c[i];
    }
    return e;
  };
  let rho = rhoFromResiduals(resid(beta));
  let iterations = 0, change = Infinity, converged = false;
  while (iterations < maxIt) {
    transform(y, rho, ys);
    design.forEach((c, j) => transform(c, rho, xs[j]));
    qr = leastSquaresQr(xs, ys, true);
    beta = qr.coefficients;
    iterations++;
    const next = rhoFromResiduals(resid(beta));
    change = Math.abs(next - rho);
    rho = next;
    if (change < tol) {
      converged = true;
      break;
    }
  }
  // final fit at the final ρ (so β, covariance and ρ belong together)
  transform(y, rho, ys);
  design.forEach((c, j) => transform(c, rho, xs[j]));
  qr = leastSquaresQr(xs, ys, true);
  beta = qr.coefficients;
  const st = fitStatistics(design, y, beta, intercept, level);
  const innovations = transform(st.residuals, rho, new Float64Array(n));
  let rssStar = 0;
  for (let i = 0; i < n; i++) rssStar += innovations[i] * innovations[i];
  const df = n - p;
  const s2 = rssStar / df;
  const covariance = qr.xtxInverse.map((row) => row.map((v) => v * s2));
  const inf = coefficientInference(beta, covariance, df, st.tcrit);
  const s2ml = rssStar / n;
  const logLikelihood = -0.5 * n * (Math.log(2 * Math.PI) + Math.log(s2ml) + 1) +
    0.5 * Math.log(1 - rho * rho);
  return {
    method: "prais-winsten",
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
    aic: -2 * logLikelihood + 2 * (p + 2),
    bic: -2 * logLikelihood + Math.log(n) * (p + 2),
    residualLag1: st.residualLag1,
    conditionNumber: kappa,
    fitted: st.fitted,
    residuals: st.residuals,
    design,
    rho,
    iterations,
    converged,
    rhoChange: change,
    innovations,
    innovationSd: Math.sqrt(s2),
  };
}
