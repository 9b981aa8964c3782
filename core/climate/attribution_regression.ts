/**
 * Multiple-regression attribution of a climate series to named regressors (solar, ENSO,
 * volcanic aerosol, trend or anthropogenic forcing, others), each at its own lag, as in
 * Lean & Rind 2008 (GRL 35, L18701) and Foster & Rahmstorf 2011 (ERL 6, 044022):
 *
 *   y_t = β₀ + Σ_r β_r x_r(t − ℓ_r) + e_t,
 *
 * with errors either AR(1) (Prais–Winsten feasible GLS) or left to OLS with Newey–West HAC
 * standard errors. Lags ℓ_r are chosen by AIC (Akaike 1974) on one common sample (the times
 * where every regressor is available at its largest candidate lag), so AIC values are
 * comparable across lags. With few lag combinations the search is exhaustive; otherwise it is
 * a coordinate search (each regressor's lag in turn, the others held, repeated until no lag
 * changes), which can in principle stop at a local minimum: the reported lag surface (each
 * regressor's AIC profile with the others at their chosen lags) shows whether it did.
 *
 * Regression is not attribution by itself: a coefficient measures association given the
 * chosen regressors and lags.
 *
 * @module
 */
import { ordinaryLeastSquares, type RegressionFit } from "../stats/ordinary_least_squares.ts";
import { praisWinsten } from "../stats/prais_winsten.ts";
import { neweyWest } from "../stats/newey_west.ts";
import { collinearityConditionNumber } from "../stats/condition_number.ts";
import { InputError } from "../errors.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";

/** One regressor of {@link attributionRegression}. */
export interface AttributionRegressor {
  name: string;
  /** Values on the same evenly spaced axis as y. */
  values: Float64Array;
  /** Smallest and largest lag (samples, ≥ 0) to search; equal for a fixed lag. */
  minLag: number;
  maxLag: number;
}

/** Error model. */
export type AttributionErrors = "ar1" | "ols_hac";

/** Options of {@link attributionRegression}. */
export interface AttributionOptions extends StopOptions {
  /** @default "ar1" */
  errors?: AttributionErrors;
  /** Newey–West truncation lag for `ols_hac`. @default Newey & West 1994 rule */
  hacLags?: number;
  /** Interval level. @default 0.95 */
  level?: number;
  /** Largest number of lag combinations searched exhaustively. @default 1000 */
  exhaustiveLimit?: number;
  /**
   * Index in y of the first fitted observation. @default the largest candidate lag (the
   * common sample of every lag combination). A later start keeps the sample of another search
   * whose lag ranges were wider (so AIC and p-values stay comparable with it).
   */
  firstIndex?: number;
}

/** Per-coefficient result. */
export interface AttributionCoefficient {
  name: string;
  /** Chosen lag in samples (null for the intercept). */
  lag: number | null;
  estimate: number;
  standardError: number;
  lower: number;
  upper: number;
  pValue: number;
}

/** Result of {@link attributionRegression}. */
export interface AttributionResult {
  errors: AttributionErrors;
  /** Index in y of the first sample used (the largest candidate lag). */
  firstIndex: number;
  n: number;
  coefficients: AttributionCoefficient[];
  /** Chosen lag per regressor, by name. */
  lags: Record<string, number>;
  aic: number;
  search: "exhaustive" | "coordinate";
  /** Fits made during the search. */
  fitsEvaluated: number;
  /**
   * Per regressor: AIC at each candidate lag, the other lags at their chosen values, and the
   * lag support interval: the smallest and largest lag whose AIC is within 2 of the profile's
   * minimum (models within 2 AIC units keep substantial support; Burnham & Anderson 2002,
   * Model Selection and Multimodel Inference, §2.6).
   */
  lagProfiles: { name: string; lags: number[]; aic: number[]; support: [number, number] }[];
  /**
   * The whole lag surface when the search was exhaustive: every lag combination tried (lags in
   * regressor order) with its AIC; null after a coordinate search.
   */
  lagGrid: { lags: number[][]; aic: number[] } | null;
  /** AR(1) coefficient of the errors (ar1) or lag-1 autocorrelation of OLS residuals. */
  residualRho: number;
  /** Lag-1 autocorrelation of the whitened residuals (ar1) or residuals (ols_hac). */
  residualLag1: number;
  rSquared: number;
  /** Collinearity condition number of the regressors at the chosen lags. */
  collinearity: number;
  /** Largest |correlation| between two regressors at the chosen lags, and which. */
  maxCorrelation: { a: string; b: string; r: number } | null;
  /** β_r (x_r(t − ℓ_r) − mean) per regressor over the sample, by name. */
  contributions: Record<string, Float64Array>;
  fitted: Float64Array;
  residuals: Float64Array;
  warnings: string[];
}

function lagged(x: Float64Array, lag: number, first: number, n: number): Float64Array {
  return x.subarray(first - lag, first - lag + n);
}

interface Fitted {
  aic: number;
  fit: RegressionFit & { rho?: number; innovations?: Float64Array };
}

/** What the AIC lag search found (internal to this module). */
interface LagSearch {
  first: number;
  n: number;
  best: number[];
  chosen: Fitted;
  fitAt: (lags: number[]) => Fitted;
  ranges: number[][];
  search: "exhaustive" | "coordinate";
  lagGrid: AttributionResult["lagGrid"];
  /** Fits made so far. */
  fits: () => number;
}

/**
 * The checks and the AIC lag search of {@link attributionRegression}: every lag combination
 * (or a coordinate search), fitted on one common sample.
 */
function searchLagsByAic(
  y: Float64Array,
  regressors: readonly AttributionRegressor[],
  options: AttributionOptions,
): LagSearch {
  const fn = "fit attribution regression";
  const errors = options.errors ?? "ar1";
  const level = options.level ?? 0.95;
  const limit = options.exhaustiveLimit ?? 1000;
  if (regressors.length === 0) {
    throw new InputError(`Cannot ${fn}: needs at least one regressor`, {
      field: "regressors",
      reason: "empty",
    });
  }
  const names = new Set<string>();
  let maxLag = 0;
  for (const [k, r] of regressors.entries()) {
    if (names.has(r.name)) {
      throw new InputError(`Cannot ${fn}: regressor name ${r.name} repeats`, {
        field: "regressors",
        reason: "invalid",
        index: k,
        value: r.name,
      });
    }
    names.add(r.name);
    if (r.values.length !== y.length) {
      throw new InputError(
        `Cannot ${fn}: regressor ${r.name} has ${r.values.length} values, y has ${y.length}`,
        { field: "regressors", reason: "length_mismatch", index: k, value: r.values.length },
      );
    }
    if (
      !Number.isInteger(r.minLag) || !Number.isInteger(r.maxLag) || r.minLag < 0 ||
      r.maxLag < r.minLag
    ) {
      throw new InputError(
        `Cannot ${fn}: regressor ${r.name} needs integer lags 0 ≤ minLag ≤ maxLag, got ${r.minLag}..${r.maxLag}`,
        { field: "regressors", reason: "out_of_range", index: k, value: [r.minLag, r.maxLag] },
      );
    }
    for (let i = 0; i < r.values.length; i++) {
      if (!Number.isFinite(r.values[i])) {
        throw new InputError(`Cannot ${fn}: regressor ${r.name} value ${i} is not finite`, {
          field: "regressors",
          reason: "not_finite",
          index: k,
          value: r.values[i],
        });
      }
    }
    maxLag = Math.max(maxLag, r.maxLag);
  }
  for (let i = 0; i < y.length; i++) {
    if (!Number.isFinite(y[i])) {
      throw new InputError(`Cannot ${fn}: y value ${i} is not finite`, {
        field: "y",
        reason: "not_finite",
        index: i,
        value: y[i],
      });
    }
  }
  const first = options.firstIndex ?? maxLag;
  if (!Number.isInteger(first) || first < maxLag || first >= y.length) {
    throw new InputError(
      `Cannot ${fn}: firstIndex must be an integer from the largest lag ${maxLag} to ${
        y.length - 1
      }, got ${first}`,
      { field: "firstIndex", reason: "out_of_range", value: first },
    );
  }
  const n = y.length - first;
  const p = regressors.length + 1;
  if (n < 10 * p) {
    throw new InputError(
      `Cannot ${fn}: ${p} coefficients need at least ${
        10 * p
      } observations (10 per coefficient) after the first fitted index ${first}, got ${n}`,
      { field: "y", reason: "too_few_points", value: n },
    );
  }
  const ys = y.subarray(first, first + n);
  const regNames = regressors.map((r) => r.name);
  let fits = 0;
  const cache = new Map<string, Fitted>();
  const fitAt = (lags: number[]): Fitted => {
    const key = lags.join(",");
    const hit = cache.get(key);
    if (hit) return hit;
    throwIfStopped(options, fn);
    const cols = regressors.map((r, j) => lagged(r.values, lags[j], first, n));
    fits++;
    let out: Fitted;
    try {
      const fit = errors === "ar1"
        ? praisWinsten(cols, ys, { names: regNames, level, tolerance: 1e-7 })
        : ordinaryLeastSquares(cols, ys, { names: regNames, level });
      out = { aic: fit.aic, fit };
    } catch (e) {
      if (e instanceof InputError && e.reason === "collinear") {
        out = { aic: Infinity, fit: undefined as unknown as RegressionFit };
      } else throw e;
    }
    cache.set(key, out);
    return out;
  };
  const ranges = regressors.map((r) => {
    const a: number[] = [];
    for (let l = r.minLag; l <= r.maxLag; l++) a.push(l);
    return a;
  });
  const combos = ranges.reduce((s, a) => s * a.length, 1);
  let best = regressors.map((r) => r.minLag);
  let search: "exhaustive" | "coordinate";
  let lagGrid: AttributionResult["lagGrid"] = null;
  if (combos <= limit) {
    search = "exhaustive";
    lagGrid = { lags: [], aic: [] };
    let bestAic = Infinity;
    const idx = new Array(ranges.length).fill(0);
    for (let c = 0; c < combos; c++) {
      const lags = idx.map((k, j) => ranges[j][k]);
      const f = fitAt(lags);
      lagGrid.lags.push(lags);
      lagGrid.aic.push(f.aic);
      if (f.aic < bestAic) {
        bestAic = f.aic;
        best = lags;
      }
      for (let j = 0; j < idx.length; j++) {
        if (++idx[j] < ranges[j].length) break;
        idx[j] = 0;
      }
    }
  } else {
    search = "coordinate";
    let changed = true;
    for (let sweep = 0; sweep < 50 && changed; sweep++) {
      changed = false;
      for (let j = 0; j < ranges.length; j++) {
        let bj = best[j], ba = fitAt(best).aic;
        for (const l of ranges[j]) {
          const trial = best.slice();
          trial[j] = l;
          const a = fitAt(trial).aic;
          if (a < ba - 1e-12) {
            ba = a;
            bj = l;
          }
        }
        if (bj !== best[j]) {
          best = best.slice();
          best[j] = bj;
          changed = true;
        }
      }
    }
  }
  const chosen = fitAt(best);
  if (!Number.isFinite(chosen.aic)) {
    throw new InputError(`Cannot ${fn}: the regressors are collinear at every lag tried`, {
      field: "regressors",
      reason: "collinear",
    });
  }
  return {
    first,
    n,
    best,
    chosen,
    fitAt,
    ranges,
    search,
    lagGrid,
    fits: () => fits,
  };
}

/**
 * Fit the attribution regression with lags chosen by AIC.
 *
 * @param y climate series (evenly spaced, finite)
 * @param regressors named regressors on the same axis with their lag ranges
 * @param options error model, HAC lags, level, exhaustive-search limit, and `shouldStop`
 *   (polled before each fit of the lag search)
 * @returns coefficients with intervals, lags, lag surface, contributions and diagnostics
 * @throws {InputError} on length mismatch, non-finite values, bad lag ranges or duplicate names
 *   (field `regressors` with the regressor's index, or `y`), fewer than 10 observations per
 *   coefficient (`y`), or regressors collinear at every lag (`regressors`, reason `collinear`)
 * @throws {StoppedError} when `options.shouldStop` answers true
 * @example
 * ```ts
 * import { attributionRegression } from "./attribution_regression.ts";
 * import assert from "node:assert/strict";
 * const n = 300;
 * const solar = Float64Array.from({ length: n }, (_, i) => Math.sin((2 * Math.PI * i) / 132));
 * const trend = Float64Array.from({ length: n }, (_, i) => i / n);
 * const y = Float64Array.from({ length: n }, (_, i) =>
 *   0.1 * (i >= 12 ? solar[i - 12] : 0) + 0.5 * trend[i] + 0.02 * Math.sin(i * 2.3));
 * const r = attributionRegression(y, [
 *   { name: "solar", values: solar, minLag: 0, maxLag: 24 },
 *   { name: "trend", values: trend, minLag: 0, maxLag: 0 },
 * ], { errors: "ols_hac" });
 * assert.equal(r.lags.solar, 12);
 * assert.ok(Math.abs(r.coefficients[1].estimate - 0.1) < 0.005);
 * ```
 */
export function attributionRegression(
  y: Float64Array,
  regressors: readonly AttributionRegressor[],
  options: AttributionOptions = {},
): AttributionResult {
  const errors = options.errors ?? "ar1";
  const searched = searchLagsByAic(y, regressors, options);
  const { first, n, best, chosen, fitAt, ranges, search, lagGrid } = searched;
  const regNames = regressors.map((r) => r.name);
  const lagProfiles = ranges.map((rg, j) => {
    const aic = rg.map((l) => {
      const trial = best.slice();
      trial[j] = l;
      return fitAt(trial).aic;
    });
    const minA = Math.min(...aic);
    const ok = rg.filter((_, k) => aic[k] - minA <= 2);
    return {
      name: regNames[j],
      lags: rg,
      aic,
      support: [ok[0], ok[ok.length - 1]] as [number, number],
    };
  });
  const fit = chosen.fit;
  let se = fit.standardErrors, lower = fit.lower, upper = fit.upper, pv = fit.pValues;
  if (errors === "ols_hac") {
    const nw = neweyWest(fit, options.hacLags === undefined ? {} : { maxLags: options.hacLags });
    se = nw.standardErrors;
    lower = nw.lower;
    upper = nw.upper;
    pv = nw.pValues;
  }
  const coefficients: AttributionCoefficient[] = fit.names.map((name, j) => ({
    name,
    lag: j === 0 ? null : best[j - 1],
    estimate: fit.coefficients[j],
    standardError: se[j],
    lower: lower[j],
    upper: upper[j],
    pValue: pv[j],
  }));
  const cols = regressors.map((r, j) => lagged(r.values, best[j], first, n));
  const contributions: Record<string, Float64Array> = {};
  cols.forEach((c, j) => {
    let m = 0;
    for (let i = 0; i < n; i++) m += c[i];
    m /= n;
    const b = fit.coefficients[j + 1];
    contributions[regNames[j]] = Float64Array.from(c, (v) => b * (v - m));
  });
  const collinearity = collinearityConditionNumber(cols);
  let maxCorrelation: AttributionResult["maxCorrelation"] = null;
  for (let a = 0; a < cols.length; a++) {
    for (let b = a + 1; b < cols.length; b++) {
      const r = pearson(cols[a], cols[b]);
      if (maxCorrelation === null || Math.abs(r) > Math.abs(maxCorrelation.r)) {
        maxCorrelation = { a: regNames[a], b: regNames[b], r };
      }
    }
  }
  const warnings: string[] = [];
  if (collinearity > 30 || (maxCorrelation && Math.abs(maxCorrelation.r) > 0.8)) {
    warnings.push(
      `regressors are collinear (condition number ${collinearity.toFixed(1)}${
        maxCorrelation
          ? `; ${maxCorrelation.a} and ${maxCorrelation.b} correlate at r = ${
            maxCorrelation.r.toFixed(2)
          }`
          : ""
      }): their separate coefficients are poorly determined (Belsley, Kuh & Welsch 1980 read condition numbers above 30 as strong collinearity)`,
    );
  }
  const rho = errors === "ar1" ? (fit as { rho: number }).rho : fit.residualLag1;
  let whiteLag1 = fit.residualLag1;
  if (errors === "ar1") {
    const u = (fit as { innovations: Float64Array }).innovations;
    let num = 0, den = 0;
    for (let i = 0; i < u.length; i++) {
      den += u[i] * u[i];
      if (i > 0) num += u[i] * u[i - 1];
    }
    whiteLag1 = den > 0 ? num / den : 0;
    if (Math.abs(whiteLag1) > 0.2) {
      warnings.push(
        `whitened residuals remain autocorrelated (lag-1 r = ${
          whiteLag1.toFixed(2)
        }): an AR(1) error model does not describe the noise; intervals are too narrow`,
      );
    }
    if (rho > 0.95) {
      warnings.push(
        `error autocorrelation ρ = ${
          rho.toFixed(3)
        } is close to 1: a trend or slow regressor may be missing`,
      );
    }
  } else if (Math.abs(fit.residualLag1) > 0.5) {
    warnings.push(
      `residuals are strongly autocorrelated (lag-1 r = ${
        fit.residualLag1.toFixed(2)
      }): Newey–West intervals may still be too narrow; consider errors = "ar1"`,
    );
  }
  for (const pr of lagProfiles) {
    const l = pr.lags.indexOf(best[regNames.indexOf(pr.name)]);
    if (pr.lags.length > 1 && (l === 0 || l === pr.lags.length - 1) && pr.lags[l] !== 0) {
      warnings.push(
        `the chosen lag of ${pr.name} (${pr.lags[l]}) is at the edge of its search range`,
      );
    }
  }
  return {
    errors,
    firstIndex: first,
    n,
    coefficients,
    lags: Object.fromEntries(regNames.map((nm, j) => [nm, best[j]])),
    aic: chosen.aic,
    search,
    fitsEvaluated: searched.fits(),
    lagProfiles,
    lagGrid,
    residualRho: rho,
    residualLag1: whiteLag1,
    rSquared: fit.rSquared,
    collinearity,
    maxCorrelation,
    contributions,
    fitted: fit.fitted,
    residuals: fit.residuals,
    warnings,
  };
}

/**
 * The two-sided p-value of one regressor's coefficient in the attribution regression, at the
 * lags the AIC search of {@link attributionRegression} chooses (the same search, the same error
 * model: Prais–Winsten t test for `ar1`, Newey–West for `ols_hac`), without the diagnostics.
 * The statistic of the surrogate test that pays for the lag search
 * (lag_search_surrogate_test.ts).
 *
 * @param y climate series
 * @param regressors regressors with their lag ranges
 * @param index which regressor's coefficient (0-based, in `regressors`)
 * @param options as {@link attributionRegression}
 * @returns the p-value and the chosen lag of that regressor
 * @throws {InputError} as {@link attributionRegression}; `index` out of range (`index`)
 * @example
 * ```ts
 * import { attributionRegression, pValueAfterLagSearch } from "./attribution_regression.ts";
 * import assert from "node:assert/strict";
 * const n = 200;
 * const x = Float64Array.from({ length: n }, (_, i) => Math.sin(i / 7));
 * const y = Float64Array.from({ length: n }, (_, i) => (i >= 3 ? x[i - 3] : 0) + Math.cos(i * 1.3));
 * const regs = [{ name: "x", values: x, minLag: 0, maxLag: 6 }];
 * const full = attributionRegression(y, regs, { errors: "ols_hac" });
 * const p = pValueAfterLagSearch(y, regs, 0, { errors: "ols_hac" });
 * assert.equal(p.lag, full.lags.x);
 * assert.equal(p.pValue, full.coefficients[1].pValue);
 * ```
 */
export function pValueAfterLagSearch(
  y: Float64Array,
  regressors: readonly AttributionRegressor[],
  index: number,
  options: AttributionOptions = {},
): { pValue: number; lag: number } {
  if (!Number.isInteger(index) || index < 0 || index >= regressors.length) {
    throw new InputError(
      `Cannot test attribution coefficient: index must be in 0..${
        regressors.length - 1
      }, got ${index}`,
      { field: "index", reason: "out_of_range", value: index },
    );
  }
  const { best, chosen } = searchLagsByAic(y, regressors, options);
  const fit = chosen.fit;
  const pValues = (options.errors ?? "ar1") === "ols_hac"
    ? neweyWest(fit, options.hacLags === undefined ? {} : { maxLags: options.hacLags }).pValues
    : fit.pValues;
  return { pValue: pValues[index + 1], lag: best[index] };
}

function pearson(a: Float64Array, b: Float64Array): number {
  const n = a.length;
  let ma = 0, mb = 0;
  for (let i = 0; i < n; i++) {
    ma += a[i];
    mb += b[i];
  }
  ma /= n;
  mb /= n;
  let sab = 0, saa = 0, sbb = 0;
  for (let i = 0; i < n; i++) {
    const da = a[i] - ma, db = b[i] - mb;
    sab += da * db;
    saa += da * da;
    sbb += db * db;
  }
  return saa > 0 && sbb > 0 ? sab / Math.sqrt(saa * sbb) : 0;
}

/**
 * Peak-to-trough amplitude of a solar regressor, approximated as 2√2 times its standard
 * deviation about a least-squares line (the peak-to-trough of a sinusoid with that variance;
 * common practice for a quasi-periodic cycle). Multiply a sensitivity by it for the implied
 * solar-maximum-minus-minimum response.
 *
 * @param x the regressor over the fitted sample, finite, length ≥ 3
 * @returns peak-to-trough amplitude in the regressor's units
 * @example
 * ```ts
 * import { cycleAmplitudeEstimate } from "./attribution_regression.ts";
 * import assert from "node:assert/strict";
 * const x = Float64Array.from({ length: 1320 }, (_, i) => 0.5 * Math.sin((2 * Math.PI * i) / 132));
 * assert.ok(Math.abs(cycleAmplitudeEstimate(x) - 1) < 5e-3);
 * ```
 */
export function cycleAmplitudeEstimate(x: Float64Array): number {
  const n = x.length;
  if (n < 3) {
    throw new InputError(`Cannot estimate cycle amplitude: needs 3 values, got ${n}`, {
      field: "x",
      reason: "too_few_points",
      value: n,
    });
  }
  const t = Float64Array.from({ length: n }, (_, i) => i);
  const fit = ordinaryLeastSquares([t], x);
  let ss = 0;
  for (let i = 0; i < n; i++) ss += fit.residuals[i] * fit.residuals[i];
  return 2 * Math.SQRT2 * Math.sqrt(ss / n);
}
