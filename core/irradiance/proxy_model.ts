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
 * dimensionless and near 1 when the PSI is right. The regressors are those of
 * core/irradiance/proxy_model_evaluation.ts.
 *
 * @module
 */
import { ordinaryLeastSquares, type RegressionFit } from "../stats/ordinary_least_squares.ts";
import { praisWinsten } from "../stats/prais_winsten.ts";
import { collinearityConditionNumber } from "../stats/condition_number.ts";
import { tQuantile } from "../stats/distributions.ts";
import { quantile } from "d3-array";
import { InputError } from "../errors.ts";
import { type BlockedCrossValidation, blockedCrossValidation } from "./blocked_cross_validation.ts";
import { proxyRegressor, type ProxyRole } from "./proxy_model_evaluation.ts";

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
  /** Fitted values ŷ = TSI − residual, W m-2. */
  fitted: Float64Array;
}

/**
 * Thrown when the proxies are collinear: an {@link InputError} on `terms` with reason
 * `collinear` whose `value` (and `conditionNumber`) is the condition number.
 */
export class CollinearProxiesError extends InputError {
  constructor(readonly conditionNumber: number, limit: number) {
    super(
      `Cannot calibrate proxy model: the proxies are collinear (condition number ${
        Number.isFinite(conditionNumber) ? conditionNumber.toPrecision(4) : "infinite"
      } exceeds ${limit}); drop or combine proxies`,
      { field: "terms", reason: "collinear", value: conditionNumber },
    );
    this.name = "CollinearProxiesError";
  }
}

/**
 * Calibrate TSI(t) = S_Q + Σ a_k (F_k − F_k,Q) − b·S_ref·PSI(t) against measured TSI.
 *
 * @param tsi measured TSI, W m-2, time-ordered, equally spaced (gaps removed beforehand)
 * @param terms proxy terms aligned with `tsi`
 * @param options {@link CalibrationOptions}
 * @returns {@link ProxyModelFit}
 * @throws {CollinearProxiesError} for collinear proxies; {@link InputError} for no terms
 *   (field `terms`), a term not aligned with TSI (`terms`, index of the term) or fewer points
 *   than coefficients + 2 (`tsi`)
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
  const design = proxyDesign(tsi.length, terms, options);
  const fitter = proxyModelFitter(method, design.names);
  const fit = fitter(design.columns, tsi);
  const n = tsi.length;
  const cv = folds > 0 && Math.floor(n / 2) >= folds
    ? blockedCrossValidation(design.columns, tsi, folds, fitter)
    : null;
  return proxyModelFit(design, method, fit, cv, tsi);
}

/** The regressors of a proxy model on its calibration points (result of {@link proxyDesign}). */
export interface ProxyDesign {
  /** One regressor column per term (intercept not included), {@link proxyRegressor} values. */
  columns: Float64Array[];
  terms: ProxyModelFit["terms"];
  /** Term names in column order. */
  names: string[];
  psiReference: number;
  /** Collinearity condition number of the columns (centred, unit length). */
  collinearity: number;
}

/**
 * The regressor columns of TSI(t) = S_Q + Σ a_k (F_k − F_k,Q) − b·S_ref·PSI(t) on n
 * calibration points: F_k − F_k,Q for a facular or other term (F_k,Q given or the 1st
 * percentile, {@link quietLevelOf}), −S_ref·PSI for the darkening term, and their
 * collinearity (Belsley, Kuh & Welsch 1980 condition number of the centred, unit-length
 * columns). Shared by one-record calibration ({@link calibrateProxyModel}) and the calibration
 * of many records on the same proxies (core/irradiance/spectral_band_models.ts).
 *
 * @param n number of calibration points (the response's length)
 * @param terms proxy terms aligned with the response
 * @param options the `psiReference` and `maxConditionNumber` of {@link CalibrationOptions}
 * @returns {@link ProxyDesign}
 * @throws {CollinearProxiesError} for collinear proxies; {@link InputError} for no terms
 *   (field `terms`), a term not of length n (`terms`, index of the term) or fewer points than
 *   coefficients + 2 (`tsi`)
 * @example
 * ```ts
 * import { proxyDesign } from "./proxy_model.ts";
 * import assert from "node:assert/strict";
 * const d = proxyDesign(5, [
 *   { name: "mg", role: "facular", values: Float64Array.of(0.15, 0.16, 0.15, 0.17, 0.16), quietLevel: 0.15 },
 *   { name: "psi", role: "sunspot_darkening", values: Float64Array.of(0, 1e-4, 3e-4, 2e-4, 0) },
 * ]);
 * assert.ok(Math.abs(d.columns[0][1] - 0.01) < 1e-15);
 * assert.ok(Math.abs(d.columns[1][1] + 0.13608) < 1e-12); // −1360.8 × 1e-4
 * ```
 */
export function proxyDesign(
  n: number,
  terms: ProxyTerm[],
  options: Pick<CalibrationOptions, "psiReference" | "maxConditionNumber"> = {},
): ProxyDesign {
  const psiRef = options.psiReference ?? 1360.8;
  const maxCond = options.maxConditionNumber ?? 1000;
  if (terms.length === 0) {
    throw new InputError("Cannot calibrate proxy model: no proxy terms", {
      field: "terms",
      reason: "empty",
    });
  }
  const p = terms.length + 1;
  if (n < p + 2) {
    throw new InputError(
      `Cannot calibrate proxy model: needs at least ${
        p + 2
      } overlapping points for ${p} coefficients, got ${n}`,
      { field: "tsi", reason: "too_few_points", value: n },
    );
  }
  const columns: Float64Array[] = [];
  const termInfo: ProxyModelFit["terms"] = [];
  for (const [k, t] of terms.entries()) {
    if (t.values.length !== n) {
      throw new InputError(
        `Cannot calibrate proxy model: term ${t.name} is not aligned with TSI`,
        { field: "terms", reason: "length_mismatch", index: k, value: t.values.length },
      );
    }
    const q = t.role === "sunspot_darkening" ? 0 : (t.quietLevel ?? quietLevelOf(t.values));
    const c = new Float64Array(n);
    let lo = Infinity, hi = -Infinity;
    for (let i = 0; i < n; i++) {
      const v = t.values[i];
      if (v < lo) lo = v;
      if (v > hi) hi = v;
      c[i] = proxyRegressor(t.role, q, psiRef, v);
    }
    columns.push(c);
    termInfo.push({ name: t.name, role: t.role, quietLevel: q, min: lo, max: hi });
  }
  const collinearity = collinearityConditionNumber(columns);
  if (!(collinearity <= maxCond)) throw new CollinearProxiesError(collinearity, maxCond);
  return {
    columns,
    terms: termInfo,
    names: terms.map((t) => t.name),
    psiReference: psiRef,
    collinearity,
  };
}

/**
 * The regression a calibration uses: ordinary least squares, or regression with AR(1)
 * errors by iterated Prais–Winsten, with the intercept and the term names.
 *
 * @param method "ols" or "prais_winsten"
 * @param names term names (coefficient names after "intercept")
 * @returns a fitter of (columns, y)
 * @example
 * ```ts
 * import { proxyModelFitter } from "./proxy_model.ts";
 * import assert from "node:assert/strict";
 * const fit = proxyModelFitter("ols", ["x"])([Float64Array.of(0, 1, 2, 3)], Float64Array.of(1, 3, 5, 7));
 * assert.ok(Math.abs(fit.coefficients[1] - 2) < 1e-12);
 * ```
 */
export function proxyModelFitter(
  method: "ols" | "prais_winsten",
  names: string[],
): (columns: Float64Array[], y: Float64Array) => RegressionFit {
  return (c, y) =>
    method === "ols" ? ordinaryLeastSquares(c, y, { names }) : praisWinsten(c, y, { names });
}

/**
 * Assemble a {@link ProxyModelFit} from the design, the regression fitted on it and its
 * cross-validation: the quiet-Sun level (the intercept), the AR(1) coefficient of the errors
 * (Prais–Winsten ρ, or the residual lag-1 for OLS) and the marginal residual SD (σ for OLS,
 * σ_u/√(1 − ρ²) for the AR(1) innovations of Prais–Winsten).
 *
 * @param design the regressors ({@link proxyDesign})
 * @param method the estimator the fit used
 * @param fit the regression fitted on `design.columns` and `y`
 * @param cv its blocked cross-validation, or null
 * @param y the response, for the fitted values
 * @returns {@link ProxyModelFit}
 * @example
 * ```ts
 * import { proxyDesign, proxyModelFit, proxyModelFitter } from "./proxy_model.ts";
 * import assert from "node:assert/strict";
 * const f = Float64Array.of(0.15, 0.16, 0.17, 0.16, 0.15, 0.18);
 * const y = f.map((v, i) => 1360.8 + 135 * (v - 0.15) + (i % 2 ? 0.01 : -0.01));
 * const d = proxyDesign(6, [{ name: "mg", role: "facular", values: f, quietLevel: 0.15 }]);
 * const m = proxyModelFit(d, "ols", proxyModelFitter("ols", d.names)(d.columns, y), null, y);
 * assert.ok(Math.abs(m.quietSun.value - 1360.8) < 0.05);
 * ```
 */
export function proxyModelFit(
  design: ProxyDesign,
  method: "ols" | "prais_winsten",
  fit: RegressionFit,
  cv: BlockedCrossValidation | null,
  y: Float64Array,
): ProxyModelFit {
  const rho = "rho" in fit ? (fit as { rho: number }).rho : fit.residualLag1;
  const residualSd = method === "ols" ? fit.sigma : fit.sigma / Math.sqrt(1 - rho * rho);
  const fitted = new Float64Array(y.length), e = fit.residuals;
  for (let i = 0; i < y.length; i++) fitted[i] = y[i] - e[i];
  return {
    method,
    names: fit.names,
    terms: design.terms,
    psiReference: design.psiReference,
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
    n: y.length,
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
    collinearity: design.collinearity,
    crossValidation: cv,
    residuals: fit.residuals,
    fitted,
  };
}

/**
 * The default quiet-Sun level F_Q of a facular term: its 1st percentile over the calibration
 * points (R's quantile type 7, linear interpolation between order statistics; d3-array
 * `quantile`), a level the quiet Sun reaches but noise rarely undercuts.
 *
 * @param values the term's values at the calibration points (finite, at least one)
 * @returns the 1st percentile
 * @throws {InputError} (field `values`) when there is no finite value
 * @example
 * ```ts
 * import { quietLevelOf } from "./proxy_model.ts";
 * import assert from "node:assert/strict";
 * // 101 values 0..100: the 1st percentile is 1 (R: quantile(0:100, 0.01) = 1)
 * assert.equal(quietLevelOf(Float64Array.from({ length: 101 }, (_, i) => i)), 1);
 * ```
 */
export function quietLevelOf(values: Iterable<number>): number {
  const q = quantile(values, 0.01);
  if (q === undefined) {
    throw new InputError("Cannot choose a quiet level: the term has no finite value", {
      field: "values",
      reason: "empty",
    });
  }
  return q;
}

/**
 * The multiplier of a two-sided prediction interval at `level` for a regression with `df`
 * residual degrees of freedom: the Student-t quantile t(1 − (1 − level)/2, df) (e.g. Draper &
 * Smith 1998, Applied Regression Analysis, 3rd ed., §3.2).
 *
 * @param level coverage in (0, 1)
 * @param df residual degrees of freedom (> 0)
 * @returns the quantile (1.96 for level 0.95 and large df)
 * @throws {InputError} (field `level`) when level is not in (0, 1)
 * @example
 * ```ts
 * import { predictionQuantile } from "./proxy_model.ts";
 * import assert from "node:assert/strict";
 * // R: qt(0.975, 10) = 2.228139
 * assert.ok(Math.abs(predictionQuantile(0.95, 10) - 2.228139) < 1e-6);
 * ```
 */
export function predictionQuantile(level: number, df: number): number {
  if (!(level > 0 && level < 1)) {
    throw new InputError(
      `Cannot compute a prediction quantile: level must be in (0, 1), got ${level}`,
      {
        field: "level",
        reason: "out_of_range",
        value: level,
      },
    );
  }
  return tQuantile(1 - (1 - level) / 2, df);
}

/** A band around fitted values (result of {@link fittedValueBand}). */
export interface FittedValueBand {
  lower: Float64Array;
  upper: Float64Array;
  /** The quantile used: t(1 − (1 − level)/2, df). */
  quantile: number;
}

/**
 * The band a new measurement at a calibration point falls in with probability `level`, from
 * the residual spread only: ŷ ± t(1 − (1 − level)/2, df)·σ_e, with σ_e the marginal residual
 * SD (Student's t with the residual degrees of freedom; coefficient uncertainty, small against
 * σ_e inside the calibration span, is left out; the reconstruction's intervals include it).
 *
 * @param fitted fitted values ŷ, W m-2
 * @param residualSd σ_e, W m-2 (≥ 0)
 * @param dfResidual residual degrees of freedom (> 0)
 * @param level coverage in (0, 1) @default 0.95
 * @returns {@link FittedValueBand}
 * @throws {InputError} (field `level` or `residualSd`) when out of range
 * @example
 * ```ts
 * import { fittedValueBand } from "./proxy_model.ts";
 * import assert from "node:assert/strict";
 * const b = fittedValueBand([1361], 0.1, 1e6);
 * assert.ok(Math.abs(b.quantile - 1.95996) < 1e-4); // t(0.975, ∞) → 1.96
 * assert.ok(Math.abs(b.upper[0] - 1361 - 0.196) < 1e-4);
 * ```
 */
export function fittedValueBand(
  fitted: ArrayLike<number>,
  residualSd: number,
  dfResidual: number,
  level = 0.95,
): FittedValueBand {
  if (!(residualSd >= 0)) {
    throw new InputError(`Cannot build a band: residualSd must be ≥ 0, got ${residualSd}`, {
      field: "residualSd",
      reason: "out_of_range",
      value: residualSd,
    });
  }
  const t = predictionQuantile(level, dfResidual);
  const n = fitted.length, lower = new Float64Array(n), upper = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    lower[i] = fitted[i] - t * residualSd;
    upper[i] = fitted[i] + t * residualSd;
  }
  return { lower, upper, quantile: t };
}
