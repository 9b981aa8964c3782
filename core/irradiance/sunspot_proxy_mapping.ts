/**
 * Empirical mappings from sunspot number to a solar proxy (a facular index, or the PSI), for
 * extending a proxy model back to the era with sunspot numbers only. Two forms are fitted
 * by least squares in the overlap era:
 *
 * - linear:     F(R) = c0 + c1·R
 * - saturating: F(R) = c0 + c1·R0·(1 − exp(−R/R0)), initial slope c1, approaching
 *   c0 + c1·R0 at high activity; it tends to the linear form as R0 → ∞.
 *
 * The saturating fit is separable (linear in c0, c1 for fixed R0), so R0 is found by
 * minimising the profiled residual sum of squares over log R0 (variable projection, Golub &
 * Pereyra 1973, SIAM J. Numer. Anal. 10, 413) with a grid and golden-section search: written
 * by hand because it needs no starting values and cannot diverge, unlike a general
 * Levenberg–Marquardt fit of the three parameters. Parameter covariance follows from the
 * Gauss–Newton Jacobian at the optimum, σ̂²(JᵀJ)⁻¹ (Bates & Watts 1988, Nonlinear Regression
 * Analysis, §2.3). Both fits are reported with AIC (Gaussian likelihood, σ counted, as R's
 * `AIC`); the lower AIC is chosen unless a form is requested.
 *
 * @module
 */
import { InputError } from "../errors.ts";
import { leastSquaresQr } from "../stats/least_squares_qr.ts";
import { ordinaryLeastSquares } from "../stats/ordinary_least_squares.ts";
import { residualLag1 } from "../stats/residual_lag1.ts";

/** A fitted sunspot-number → proxy mapping. */
export interface SunspotProxyMapping {
  form: "linear" | "saturating";
  /** Parameter names and values: ["c0", "c1"] or ["c0", "c1", "R0"]. */
  names: string[];
  coefficients: number[];
  covariance: number[][];
  standardErrors: number[];
  n: number;
  /** Residual standard error √(RSS/(n − k)) in proxy units, and residual RMS √(RSS/n). */
  sigma: number;
  residualRms: number;
  rSquared: number;
  aic: number;
  bic: number;
  /** Lag-1 autocorrelation of the mapping residuals (in time order). */
  residualLag1: number;
  /** Range of sunspot numbers in the fit (for extrapolation warnings). */
  sunspotMin: number;
  sunspotMax: number;
}

function gaussianIc(rss: number, n: number, k: number): { aic: number; bic: number } {
  const ll = 0.5 * (-n * (Math.log(2 * Math.PI) + 1 - Math.log(n) + Math.log(rss)));
  return { aic: -2 * ll + 2 * (k + 1), bic: -2 * ll + Math.log(n) * (k + 1) };
}

function check(r: ArrayLike<number>, f: ArrayLike<number>, need: number): void {
  if (r.length !== f.length) {
    throw new InputError(
      `Cannot fit sunspot mapping: ${r.length} sunspot values but ${f.length} proxy values`,
      { field: "f", reason: "length_mismatch", value: f.length },
    );
  }
  if (r.length < need) {
    throw new InputError(
      `Cannot fit sunspot mapping: needs at least ${need} overlapping points, got ${r.length}`,
      { field: "r", reason: "too_few_points", value: r.length },
    );
  }
  for (let i = 0; i < r.length; i++) {
    if (!Number.isFinite(r[i]) || !Number.isFinite(f[i]) || r[i] < 0) {
      throw new InputError(
        `Cannot fit sunspot mapping: point ${i} is not usable (R = ${r[i]}, proxy = ${f[i]})`,
        {
          field: Number.isFinite(r[i]) && r[i] >= 0 ? "f" : "r",
          reason: Number.isFinite(r[i]) && Number.isFinite(f[i]) ? "out_of_range" : "not_finite",
          index: i,
          value: Number.isFinite(r[i]) && r[i] >= 0 ? f[i] : r[i],
        },
      );
    }
  }
}

function range(r: Float64Array): [number, number] {
  let lo = Infinity, hi = -Infinity;
  for (const v of r) {
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return [lo, hi];
}

/**
 * Fit the linear mapping F = c0 + c1·R by ordinary least squares.
 *
 * @param r sunspot numbers (≥ 0), time-ordered
 * @param f proxy values at the same times
 * @returns the {@link SunspotProxyMapping}
 * @throws {InputError} (field `r` or `f`, with the index of a bad point) for fewer than 4
 *   points, non-finite values, negative R or constant R
 * @example
 * ```ts
 * import { fitLinearSunspotMapping } from "./sunspot_proxy_mapping.ts";
 * import assert from "node:assert/strict";
 * const m = fitLinearSunspotMapping([0, 50, 100, 150], [0.15, 0.155, 0.16, 0.165]);
 * assert.ok(Math.abs(m.coefficients[1] - 1e-4) < 1e-12);
 * ```
 */
export function fitLinearSunspotMapping(
  r: ArrayLike<number>,
  f: ArrayLike<number>,
): SunspotProxyMapping {
  check(r, f, 4);
  const R = Float64Array.from(r), F = Float64Array.from(f);
  const fit = ordinaryLeastSquares([R], F);
  const [lo, hi] = range(R);
  return {
    form: "linear",
    names: ["c0", "c1"],
    coefficients: fit.coefficients,
    covariance: fit.covariance,
    standardErrors: fit.standardErrors,
    n: fit.n,
    sigma: fit.sigma,
    residualRms: fit.residualRms,
    rSquared: fit.rSquared,
    aic: fit.aic,
    bic: fit.bic,
    residualLag1: fit.residualLag1,
    sunspotMin: lo,
    sunspotMax: hi,
  };
}

function saturatingColumn(R: Float64Array, r0: number, out: Float64Array): Float64Array {
  for (let i = 0; i < R.length; i++) out[i] = r0 * -Math.expm1(-R[i] / r0);
  return out;
}

/**
 * Fit the saturating mapping F = c0 + c1·R0·(1 − exp(−R/R0)) by variable projection: R0 on
 * a log grid over [0.05, 50]·max(R), refined by golden-section search, c0 and c1 by least
 * squares at each R0.
 *
 * @param r sunspot numbers (≥ 0), time-ordered
 * @param f proxy values at the same times
 * @returns the {@link SunspotProxyMapping}
 * @throws {InputError} (field `r` or `f`, with the index of a bad point) for fewer than 5
 *   points, non-finite values, negative or constant R
 * @example
 * ```ts
 * import { fitSaturatingSunspotMapping } from "./sunspot_proxy_mapping.ts";
 * import assert from "node:assert/strict";
 * const r = [0, 20, 40, 60, 80, 100, 140, 180, 220];
 * const f = r.map((x) => 0.15 + 2e-4 * 120 * (1 - Math.exp(-x / 120)));
 * const m = fitSaturatingSunspotMapping(r, f);
 * assert.ok(Math.abs(m.coefficients[2] - 120) < 0.01);
 * ```
 */
export function fitSaturatingSunspotMapping(
  r: ArrayLike<number>,
  f: ArrayLike<number>,
): SunspotProxyMapping {
  check(r, f, 5);
  const R = Float64Array.from(r), F = Float64Array.from(f);
  const n = R.length;
  const [lo, hi] = range(R);
  if (!(hi > lo)) {
    throw new InputError("Cannot fit sunspot mapping: sunspot numbers are constant", {
      field: "r",
      reason: "constant",
      value: hi,
    });
  }
  const one = new Float64Array(n).fill(1);
  const z = new Float64Array(n);
  const rssAt = (logR0: number): number => {
    saturatingColumn(R, Math.exp(logR0), z);
    const b = leastSquaresQr([one, z], F).coefficients;
    let s = 0;
    for (let i = 0; i < n; i++) {
      const e = F[i] - b[0] - b[1] * z[i];
      s += e * e;
    }
    return s;
  };
  const a0 = Math.log(0.05 * hi), a1 = Math.log(50 * hi);
  const grid = 48;
  let best = 0, bestRss = Infinity;
  const vals: number[] = [];
  for (let k = 0; k <= grid; k++) {
    const v = rssAt(a0 + ((a1 - a0) * k) / grid);
    vals.push(v);
    if (v < bestRss) (bestRss = v), (best = k);
  }
  let lo2 = a0 + ((a1 - a0) * Math.max(0, best - 1)) / grid;
  let hi2 = a0 + ((a1 - a0) * Math.min(grid, best + 1)) / grid;
  const g = (Math.sqrt(5) - 1) / 2;
  let x1 = hi2 - g * (hi2 - lo2), x2 = lo2 + g * (hi2 - lo2);
  let f1 = rssAt(x1), f2 = rssAt(x2);
  for (let it = 0; it < 80 && hi2 - lo2 > 1e-10; it++) {
    if (f1 < f2) {
      hi2 = x2, x2 = x1, f2 = f1;
      x1 = hi2 - g * (hi2 - lo2);
      f1 = rssAt(x1);
    } else {
      lo2 = x1, x1 = x2, f1 = f2;
      x2 = lo2 + g * (hi2 - lo2);
      f2 = rssAt(x2);
    }
  }
  const r0 = Math.exp((lo2 + hi2) / 2);
  saturatingColumn(R, r0, z);
  const b = leastSquaresQr([one, z], F).coefficients;
  const resid = new Float64Array(n);
  let rss = 0, mean = 0;
  for (let i = 0; i < n; i++) mean += F[i] / n;
  let tss = 0;
  for (let i = 0; i < n; i++) {
    resid[i] = F[i] - b[0] - b[1] * z[i];
    rss += resid[i] * resid[i];
    tss += (F[i] - mean) ** 2;
  }
  // Gauss–Newton Jacobian: ∂F/∂c0 = 1, ∂F/∂c1 = z, ∂F/∂R0 = c1·[(1 − e^{−R/R0}) − (R/R0)e^{−R/R0}]
  const dR0 = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const x = R[i] / r0, e = Math.exp(-x);
    dR0[i] = b[1] * (-Math.expm1(-x) - x * e);
  }
  const k = 3;
  const s2 = rss / (n - k);
  let covariance: number[][];
  try {
    covariance = leastSquaresQr([one, z, dR0], F).xtxInverse.map((row) => row.map((v) => v * s2));
  } catch {
    // R0 unidentified (the data are linear): report an infinite R0 uncertainty
    covariance = [[Infinity, 0, 0], [0, Infinity, 0], [0, 0, Infinity]];
  }
  const ic = gaussianIc(rss, n, k);
  return {
    form: "saturating",
    names: ["c0", "c1", "R0"],
    coefficients: [b[0], b[1], r0],
    covariance,
    standardErrors: covariance.map((row, j) => Math.sqrt(row[j])),
    n,
    sigma: Math.sqrt(s2),
    residualRms: Math.sqrt(rss / n),
    rSquared: tss > 0 ? 1 - rss / tss : 0,
    aic: ic.aic,
    bic: ic.bic,
    residualLag1: residualLag1(resid),
    sunspotMin: lo,
    sunspotMax: hi,
  };
}

/** Both mapping fits and the chosen one. */
export interface SunspotMappingChoice {
  chosen: SunspotProxyMapping;
  linear: SunspotProxyMapping;
  saturating: SunspotProxyMapping | null;
  /** Why the chosen form was chosen. */
  reason: string;
}

/**
 * Fit both forms and choose one: the requested form, or else the lower AIC.
 *
 * @param r sunspot numbers, time-ordered
 * @param f proxy values at the same times
 * @param form "linear", "saturating" or "auto" @default "auto"
 * @returns {@link SunspotMappingChoice}
 * @throws {InputError} as the fits; (field `form`) when the saturating form is requested but
 *   R0 is not identified
 * @example
 * ```ts
 * import { fitSunspotMapping } from "./sunspot_proxy_mapping.ts";
 * import assert from "node:assert/strict";
 * const r = [0, 30, 60, 90, 120, 150, 180];
 * const c = fitSunspotMapping(r, r.map((x, i) => 0.15 + 1e-4 * x + (i % 2 ? 1e-5 : -1e-5)));
 * assert.equal(c.linear.form, "linear");
 * assert.ok(c.reason.includes("AIC"));
 * ```
 */
export function fitSunspotMapping(
  r: ArrayLike<number>,
  f: ArrayLike<number>,
  form: "linear" | "saturating" | "auto" = "auto",
): SunspotMappingChoice {
  const linear = fitLinearSunspotMapping(r, f);
  let saturating: SunspotProxyMapping | null = null;
  try {
    saturating = fitSaturatingSunspotMapping(r, f);
  } catch (e) {
    if (form === "saturating") throw e;
  }
  if (form === "linear") return { chosen: linear, linear, saturating, reason: "requested" };
  if (form === "saturating") {
    if (!Number.isFinite(saturating!.standardErrors[2])) {
      throw new InputError(
        "Cannot fit the saturating sunspot mapping: R0 is not identified by these data (they are linear); use the linear form",
        { field: "form", reason: "unsupported", value: "saturating" },
      );
    }
    return { chosen: saturating!, linear, saturating, reason: "requested" };
  }
  if (saturating && Number.isFinite(saturating.standardErrors[2]) && saturating.aic < linear.aic) {
    return {
      chosen: saturating,
      linear,
      saturating,
      reason: `lower AIC (${saturating.aic.toFixed(2)} vs linear ${linear.aic.toFixed(2)})`,
    };
  }
  return {
    chosen: linear,
    linear,
    saturating,
    reason: `lower or equal AIC (${linear.aic.toFixed(2)} vs saturating ${
      saturating ? saturating.aic.toFixed(2) : "not fitted"
    })`,
  };
}

/**
 * Evaluate a mapping at sunspot numbers, with the variance from the parameter covariance
 * (delta method, gᵀΣg with g the gradient in the parameters).
 *
 * @param m a fitted mapping
 * @param r sunspot numbers
 * @param value output: mapped proxy values
 * @param paramVariance output: parameter-uncertainty variance of each value
 * @example
 * ```ts
 * import { evaluateSunspotMapping, fitLinearSunspotMapping } from "./sunspot_proxy_mapping.ts";
 * import assert from "node:assert/strict";
 * const m = fitLinearSunspotMapping([0, 50, 100, 150], [0.15, 0.1551, 0.1599, 0.165]);
 * const v = new Float64Array(1), pv = new Float64Array(1);
 * evaluateSunspotMapping(m, [75], v, pv);
 * assert.ok(Math.abs(v[0] - 0.1575) < 1e-4);
 * assert.ok(pv[0] > 0);
 * ```
 */
export function evaluateSunspotMapping(
  m: SunspotProxyMapping,
  r: ArrayLike<number>,
  value: Float64Array,
  paramVariance: Float64Array,
): void {
  const c = m.coefficients, S = m.covariance;
  sunspotMappingValues(m.form, c, r, value);
  if (m.form === "linear") {
    const s00 = S[0][0], s01 = S[0][1], s11 = S[1][1];
    for (let i = 0; i < r.length; i++) {
      const x = r[i];
      paramVariance[i] = s00 + 2 * x * s01 + x * x * s11;
    }
    return;
  }
  const g = [1, 0, 0];
  for (let i = 0; i < r.length; i++) {
    saturatingGradient(c, r[i], g);
    let v = 0;
    for (let a = 0; a < 3; a++) for (let b = 0; b < 3; b++) v += g[a] * S[a][b] * g[b];
    paramVariance[i] = v;
  }
}

/** ∂F/∂(c0, c1, R0) of the saturating form at R, into `g`. */
function saturatingGradient(c: readonly number[], r: number, g: number[]): void {
  const r0 = c[2], x = r / r0, e = Math.exp(-x);
  g[0] = 1;
  g[1] = r0 * -Math.expm1(-x);
  g[2] = c[1] * (-Math.expm1(-x) - x * e);
}

/**
 * The proxy values of a mapping form with the given coefficients: F = c0 + c1·R (linear) or
 * F = c0 + c1·R0·(1 − exp(−R/R0)) (saturating), as {@link evaluateSunspotMapping} computes them
 * for the fitted coefficients. Ensembles call it with drawn coefficients.
 *
 * @param form "linear" or "saturating"
 * @param coefficients [c0, c1] or [c0, c1, R0]
 * @param r sunspot numbers (NaN gives NaN)
 * @param out output array (same length as `r`)
 * @returns `out`
 * @example
 * ```ts
 * import { sunspotMappingValues } from "./sunspot_proxy_mapping.ts";
 * import assert from "node:assert/strict";
 * const v = sunspotMappingValues("linear", [0.15, 1e-4], [0, 100], new Float64Array(2));
 * assert.deepEqual([...v], [0.15, 0.15 + 1e-2]);
 * ```
 */
export function sunspotMappingValues(
  form: SunspotProxyMapping["form"],
  coefficients: readonly number[],
  r: ArrayLike<number>,
  out: Float64Array,
): Float64Array {
  const c0 = coefficients[0], c1 = coefficients[1];
  if (form === "linear") {
    for (let i = 0; i < r.length; i++) out[i] = c0 + c1 * r[i];
    return out;
  }
  const r0 = coefficients[2];
  for (let i = 0; i < r.length; i++) out[i] = c0 + c1 * (r0 * -Math.expm1(-(r[i] / r0)));
  return out;
}

/** Derivatives of a mapping (result of {@link sunspotMappingDerivatives}). */
export interface SunspotMappingDerivatives {
  /** dF/dR at each sunspot number (proxy units per unit of sunspot number). */
  slope: Float64Array;
  /** ∂F/∂c per parameter (in the order of `names`), each per sunspot number. */
  gradient: Float64Array[];
}

/**
 * The derivatives of a fitted mapping at sunspot numbers, for first-order (delta-method) error
 * propagation: dF/dR (c1, or c1·exp(−R/R0)) carries an error of the sunspot number into the
 * proxy, and ∂F/∂c an error of the parameters (gᵀΣg is the variance
 * {@link evaluateSunspotMapping} reports).
 *
 * @param m a fitted mapping
 * @param r sunspot numbers
 * @returns {@link SunspotMappingDerivatives}
 * @example
 * ```ts
 * import { fitLinearSunspotMapping, sunspotMappingDerivatives } from "./sunspot_proxy_mapping.ts";
 * import assert from "node:assert/strict";
 * const m = fitLinearSunspotMapping([0, 50, 100, 150], [0.15, 0.155, 0.16, 0.165]);
 * const d = sunspotMappingDerivatives(m, [80]);
 * assert.ok(Math.abs(d.slope[0] - 1e-4) < 1e-12);
 * assert.deepEqual([...d.gradient[1]], [80]); // ∂F/∂c1 = R
 * ```
 */
export function sunspotMappingDerivatives(
  m: SunspotProxyMapping,
  r: ArrayLike<number>,
): SunspotMappingDerivatives {
  const n = r.length, c = m.coefficients;
  const slope = new Float64Array(n);
  const gradient = c.map(() => new Float64Array(n));
  if (m.form === "linear") {
    for (let i = 0; i < n; i++) {
      slope[i] = c[1];
      gradient[0][i] = 1;
      gradient[1][i] = r[i];
    }
    return { slope, gradient };
  }
  const g = [1, 0, 0];
  for (let i = 0; i < n; i++) {
    slope[i] = c[1] * Math.exp(-r[i] / c[2]);
    saturatingGradient(c, r[i], g);
    for (let a = 0; a < 3; a++) gradient[a][i] = g[a];
  }
  return { slope, gradient };
}
