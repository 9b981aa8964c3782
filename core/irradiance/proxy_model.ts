/**
 * Calibration of a proxy-regression TSI model against a measured TSI record.
 *
 * Model (Foukal & Lean 1988, ApJ 328, 347; Lean 2000, GRL 27, 2425; Fröhlich & Lean 2004,
 * Astron. Astrophys. Rev. 12, 273), in its general form with named proxy terms:
 *
 *   TSI(t) = S_Q + Σ_k a_k·(F_k(t) − F_k,Q) − b·S_ref·PSI(t) + e(t)
 *
 * fitted by multiple linear regression (OLS, or Prais–Winsten for AR(1) errors). Each facular
 * (or other) term enters relative to its quiet-Sun level F_k,Q, so the intercept is the
 * quiet-Sun irradiance S_Q itself, with its standard error. The darkening term enters as
 * −S_ref·PSI with S_ref a fixed reference level (1360.8 W m-2 by default), so b is
 * dimensionless and near 1 when the PSI is right.
 *
 * @module
 */
import { ordinaryLeastSquares, type RegressionFit } from "../stats/ordinary_least_squares.ts";
import { praisWinsten } from "../stats/prais_winsten.ts";
import { collinearityConditionNumber } from "../stats/condition_number.ts";
import { type BlockedCrossValidation, blockedCrossValidation } from "./blocked_cross_validation.ts";

/** Role of a model term. */
export type ProxyRole = "facular" | "sunspot_darkening" | "other";

/** A proxy term of the model, aligned with the TSI values. */
export interface ProxyTerm {
  name: string;
  role: ProxyRole;
  values: Float64Array;
  /** Quiet-Sun level F_Q (ignored for darkening, whose quiet level is 0). @default 1st percentile */
  quietLevel?: number;
}

/** Options for {@link calibrateProxyModel}. */
export interface CalibrationOptions {
  /** @default "prais_winsten" */
  method?: "ols" | "prais_winsten";
  /** Folds of the blocked cross-validation (0 = none). @default 5 */
  folds?: number;
  /** S_ref of the darkening regressor, W m-2. @default 1360.8 */
  psiReference?: number;
  /** Refuse designs whose collinearity condition number exceeds this. @default 1000 */
  maxConditionNumber?: number;
}

/** A calibrated proxy model (plain JSON apart from `residuals`). */
export interface ProxyModelFit {
  method: "ols" | "prais_winsten";
  names: string[];
  terms: { name: string; role: ProxyRole; quietLevel: number; min: number; max: number }[];
  psiReference: number;
  coefficients: number[];
  covariance: number[][];
  standardErrors: number[];
  lower: number[];
  upper: number[];
  /** Quiet-Sun TSI S_Q (= the intercept), W m-2, with SE and 95 % interval. */
  quietSun: { value: number; se: number; lower: number; upper: number };
  n: number;
  dfResidual: number;
  rSquared: number;
  adjRSquared: number;
  residualRms: number;
  aic: number;
  bic: number;
  /** Lag-1 autocorrelation of the original-scale residuals. */
  residualLag1: number;
  /** AR(1) coefficient of the errors (Prais–Winsten ρ, or the residual lag-1 for OLS). */
  rho: number;
  /** Marginal (not innovation) SD of the residual process, W m-2. */
  residualSd: number;
  converged: boolean;
  iterations: number;
  /** Collinearity condition number of the proxy columns (centred, unit length). */
  collinearity: number;
  crossValidation: BlockedCrossValidation | null;
  residuals: Float64Array;
}

/** Thrown when the proxies are collinear; carries the condition number. */
export class CollinearProxiesError extends RangeError {
  constructor(readonly conditionNumber: number, limit: number) {
    super(
      `Cannot calibrate proxy model: the proxies are collinear (condition number ${
        Number.isFinite(conditionNumber) ? conditionNumber.toPrecision(4) : "infinite"
      } exceeds ${limit}); drop or combine proxies`,
    );
    this.name = "CollinearProxiesError";
  }
}

function percentile1(x: Float64Array): number {
  const s = Float64Array.from(x).sort();
  const pos = 0.01 * (s.length - 1);
  const i = Math.floor(pos), f = pos - i;
  return i + 1 < s.length ? s[i] * (1 - f) + s[i + 1] * f : s[i];
}

/**
 * Calibrate TSI(t) = S_Q + Σ a_k (F_k − F_k,Q) − b·S_ref·PSI(t) against measured TSI.
 *
 * @param tsi measured TSI, W m-2, time-ordered, equally spaced (gaps removed beforehand)
 * @param terms proxy terms aligned with `tsi`
 * @param options {@link CalibrationOptions}
 * @returns {@link ProxyModelFit}
 * @throws {CollinearProxiesError} for collinear proxies; {@link RangeError} for fewer points
 *   than coefficients + 2, non-finite values, or no terms
 * @example
 * ```ts
 * import { calibrateProxyModel } from "./proxy_model.ts";
 * import assert from "node:assert/strict";
 * const n = 300, f = new Float64Array(n), psi = new Float64Array(n), tsi = new Float64Array(n);
 * for (let t = 0; t < n; t++) {
 *   f[t] = 0.15 + 0.005 * Math.sin(t / 40);
 *   psi[t] = 3e-4 * (1 + Math.sin(t / 4));
 *   tsi[t] = 1360.8 + 135 * (f[t] - 0.15) - 0.96 * 1360.8 * psi[t] + 0.05 * Math.sin(t * 7.3);
 * }
 * const m = calibrateProxyModel(tsi, [
 *   { name: "mg", role: "facular", values: f, quietLevel: 0.15 },
 *   { name: "psi", role: "sunspot_darkening", values: psi },
 * ], { method: "ols" });
 * assert.ok(Math.abs(m.quietSun.value - 1360.8) < 0.05);
 * assert.ok(Math.abs(m.coefficients[2] - 0.96) < 0.05);
 * ```
 */
export function calibrateProxyModel(
  tsi: Float64Array,
  terms: ProxyTerm[],
  options: CalibrationOptions = {},
): ProxyModelFit {
  const method = options.method ?? "prais_winsten";
  const folds = options.folds ?? 5;
  const psiRef = options.psiReference ?? 1360.8;
  const maxCond = options.maxConditionNumber ?? 1000;
  if (terms.length === 0) throw new RangeError("Cannot calibrate proxy model: no proxy terms");
  const n = tsi.length;
  const p = terms.length + 1;
  if (n < p + 2) {
    throw new RangeError(
      `Cannot calibrate proxy model: needs at least ${
        p + 2
      } overlapping points for ${p} coefficients, got ${n}`,
    );
  }
  const cols: Float64Array[] = [];
  const termInfo: ProxyModelFit["terms"] = [];
  for (const t of terms) {
    if (t.values.length !== n) {
      throw new RangeError(`Cannot calibrate proxy model: term ${t.name} is not aligned with TSI`);
    }
    const q = t.role === "sunspot_darkening" ? 0 : (t.quietLevel ?? percentile1(t.values));
    const c = new Float64Array(n);
    let lo = Infinity, hi = -Infinity;
    for (let i = 0; i < n; i++) {
      const v = t.values[i];
      if (v < lo) lo = v;
      if (v > hi) hi = v;
      c[i] = t.role === "sunspot_darkening" ? -psiRef * v : v - q;
    }
    cols.push(c);
    termInfo.push({ name: t.name, role: t.role, quietLevel: q, min: lo, max: hi });
  }
  const collinearity = collinearityConditionNumber(cols);
  if (!(collinearity <= maxCond)) throw new CollinearProxiesError(collinearity, maxCond);
  const names = terms.map((t) => t.name);
  const fitter = (c: Float64Array[], y: Float64Array): RegressionFit =>
    method === "ols" ? ordinaryLeastSquares(c, y, { names }) : praisWinsten(c, y, { names });
  const fit = fitter(cols, tsi);
  const rho = "rho" in fit ? (fit as { rho: number }).rho : fit.residualLag1;
  const residualSd = method === "ols" ? fit.sigma : fit.sigma / Math.sqrt(1 - rho * rho);
  const cv = folds > 0 && Math.floor(n / 2) >= folds
    ? blockedCrossValidation(cols, tsi, folds, fitter)
    : null;
  return {
    method,
    names: fit.names,
    terms: termInfo,
    psiReference: psiRef,
    coefficients: fit.coefficients,
    covariance: fit.covariance,
    standardErrors: fit.standardErrors,
    lower: fit.lower,
    upper: fit.upper,
    quietSun: {
      value: fit.coefficients[0],
      se: fit.standardErrors[0],
      lower: fit.lower[0],
      upper: fit.upper[0],
    },
    n,
    dfResidual: fit.dfResidual,
    rSquared: fit.rSquared,
    adjRSquared: fit.adjRSquared,
    residualRms: fit.residualRms,
    aic: fit.aic,
    bic: fit.bic,
    residualLag1: fit.residualLag1,
    rho,
    residualSd,
    converged: "converged" in fit ? (fit as { converged: boolean }).converged : true,
    iterations: "iterations" in fit ? (fit as { iterations: number }).iterations : 0,
    collinearity,
    crossValidation: cv,
    residuals: fit.residuals,
  };
}
