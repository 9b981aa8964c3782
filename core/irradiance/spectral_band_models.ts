/**
 * Proxy models of spectral solar irradiance, one per wavelength band, and their integration
 * over wavelength ranges.
 *
 * Each band's record is calibrated with the model sunlag fits to TSI
 * (core/irradiance/proxy_model.ts; Foukal & Lean 1988, ApJ 328, 347; Lean 2000, GRL 27,
 * 2425), on the same proxies with the same quiet-Sun proxy levels:
 *
 *   S_i(t) = S_Q,i + Σ_k a_ik·(F_k(t) − F_k,Q) − b_i·S_ref·PSI(t) + e_i(t)
 *
 * so the intercept S_Q,i is the band's quiet-Sun level and the band sums of the coefficients
 * are comparable with the TSI model's. The errors of different bands are correlated (solar
 * variability the proxies miss, and a shared instrument): their lag-0 and lag-1
 * cross-correlation over the common calibration cells enters every integral over bands.
 *
 * Integration over a range with weights w_i ({@link integrateBandModels}): coefficients
 * Σ_i w_i β_i, and the covariance of that sum Σ_ij w_i w_j r_ij S_i^½ S_j^½ with S_i the
 * band's coefficient covariance and r_ij the residual correlation: exact for least squares
 * with a common design, where Cov(β_i, β_j) = σ_ij (XᵀX)⁻¹ (seemingly unrelated regressions
 * with identical regressors, Zellner 1962, J. Am. Stat. Assoc. 57, 348), and the natural
 * approximation for Prais–Winsten fits whose designs differ only through each band's ρ. The
 * residual process of the sum has variance Σ_ij w_i w_j σ_i σ_j r_ij and lag-1
 * autocorrelation from the lag-1 cross-correlation. The result is a
 * {@link ReconstructionModel}, so a range is reconstructed like TSI.
 *
 * @module
 */
import { EigenvalueDecomposition, Matrix } from "ml-matrix";
import { InputError } from "../errors.ts";
import { ordinaryLeastSquaresMany } from "../stats/ordinary_least_squares.ts";
import { leastSquaresQrMany } from "../stats/least_squares_qr.ts";
import {
  type ResidualCrossCorrelation,
  residualCrossCorrelation,
} from "../stats/residual_cross_correlation.ts";
import { blockedCrossValidation, blockedCrossValidationMany } from "./blocked_cross_validation.ts";
import {
  type CalibrationOptions,
  type ProxyDesign,
  proxyDesign,
  type ProxyModelFit,
  proxyModelFit,
  proxyModelFitter,
  type ProxyTerm,
} from "./proxy_model.ts";
import {
  type BackExtensionResiduals,
  backExtensionResiduals,
  MAX_RESIDUAL_RHO,
} from "./back_extension.ts";
import { evaluateProxyModel, type ProxyModelTerms } from "./proxy_model_evaluation.ts";
import type { ReconstructionModel } from "./proxy_reconstruction.ts";

/** Options of {@link calibrateBandModels}. */
export interface BandCalibrationOptions extends CalibrationOptions {
  /** Fewest cells common to every band for the residual cross-correlation. @default 10 */
  minCommonCells?: number;
  /** Estimate the residual cross-correlation (false for a chunk of bands). @default true */
  crossCorrelation?: boolean;
}

/** Band models on one cell axis (result of {@link calibrateBandModels}). */
export interface BandModels {
  /** One calibrated model per band. */
  fits: ProxyModelFit[];
  /** Per band: the cells (indices on the axis) it was calibrated on. */
  cells: Int32Array[];
  /** Per band: its residuals on the whole axis, NaN where it has no value. */
  residuals: Float64Array[];
  /** Residual cross-correlation over the cells every band has; null with too few. */
  correlation: ResidualCrossCorrelation | null;
  /** The quiet-Sun proxy levels F_k,Q every band uses. */
  quietLevels: number[];
}

/**
 * Calibrate one proxy model per band on a common cell axis: band b's model uses the cells
 * where its value is finite (the proxies are finite at every cell). Every band uses the same
 * quiet-Sun proxy levels (given in the terms, else the 1st percentile over the whole axis),
 * estimator and cross-validation folds. With OLS and no missing band value the design is
 * factorised once for all bands (`ordinaryLeastSquaresMany`), which gives the same numbers
 * as one fit per band.
 *
 * @param bands per band, its value at each cell (NaN where missing)
 * @param terms proxy terms, finite at every cell
 * @param options {@link BandCalibrationOptions}
 * @returns {@link BandModels}
 * @throws {InputError} field `bands` with the band index: `length_mismatch`, `too_few_points`
 *   (fewer than coefficients + 2 cells), `constant` (the same value at every cell); as
 *   {@link proxyDesign} for the terms
 * @example
 * ```ts
 * import { calibrateBandModels } from "./spectral_band_models.ts";
 * import assert from "node:assert/strict";
 * const n = 120, f = new Float64Array(n), b1 = new Float64Array(n), b2 = new Float64Array(n);
 * for (let t = 0; t < n; t++) {
 *   f[t] = 0.15 + 0.01 * Math.sin(t / 9);
 *   b1[t] = 2.0 + 30 * (f[t] - 0.15) + 0.01 * Math.sin(t * 7.1);
 *   b2[t] = 1.5 + 2 * (f[t] - 0.15) + 0.01 * Math.cos(t * 5.3);
 * }
 * const m = calibrateBandModels([b1, b2], [{ name: "mg", role: "facular", values: f, quietLevel: 0.15 }], { method: "ols" });
 * assert.ok(Math.abs(m.fits[0].coefficients[1] - 30) < 0.5);
 * assert.ok(Math.abs(m.fits[1].quietSun.value - 1.5) < 0.01);
 * assert.equal(m.correlation!.lag0[0][0], 1);
 * ```
 */
export function calibrateBandModels(
  bands: readonly ArrayLike<number>[],
  terms: ProxyTerm[],
  options: BandCalibrationOptions = {},
): BandModels {
  const method = options.method ?? "prais_winsten";
  const folds = options.folds ?? 5;
  if (bands.length === 0) {
    throw new InputError("Cannot calibrate band models: no band", {
      field: "bands",
      reason: "empty",
    });
  }
  const n = terms[0]?.values.length ?? 0;
  const full = bandError(-1, () => proxyDesign(n, terms, options));
  const quietLevels = full.terms.map((t) => t.quietLevel);
  const fixed = terms.map((t, k) => ({ ...t, quietLevel: quietLevels[k] }));
  const p = terms.length + 1;
  const cells = bands.map((y, b) => usableCells(y, n, p, b));
  const complete = cells.every((c) => c.length === n);
  const fits = complete && method === "ols"
    ? sharedOlsFits(full, bands.map((y) => Float64Array.from(y)), folds)
    : bands.map((y, b) =>
      bandError(b, () => {
        const c = cells[b];
        const yb = Float64Array.from(c, (i) => y[i]);
        const design = c.length === n ? full : proxyDesign(
          c.length,
          fixed.map((t) => ({
            ...t,
            values: Float64Array.from(c, (i) => t.values[i]),
          })),
          options,
        );
        const fitter = proxyModelFitter(method, design.names);
        const cv = folds > 0 && Math.floor(c.length / 2) >= folds
          ? blockedCrossValidation(design.columns, yb, folds, fitter)
          : null;
        return proxyModelFit(design, method, fitter(design.columns, yb), cv, yb);
      })
    );
  const residuals = fits.map((f, b) => {
    const r = new Float64Array(n), c = cells[b], e = f.residuals;
    if (c.length === n) r.set(e);
    else {
      r.fill(NaN);
      for (let j = 0; j < c.length; j++) r[c[j]] = e[j];
    }
    return r;
  });
  const correlation = options.crossCorrelation === false
    ? null
    : residualCrossCorrelation(residuals, options.minCommonCells ?? 10);
  return { fits, cells, residuals, correlation, quietLevels };
}

/** OLS fits of every band on the one design, and their cross-validation, factorised once. */
function sharedOlsFits(design: ProxyDesign, ys: Float64Array[], folds: number): ProxyModelFit[] {
  // the folds need only coefficients: one factorisation per fold, no fit statistics; it
  // works in place on the fold's training copies (work arrays the folds refill and never
  // read back), which saves copying every band per fold
  const coefficientsOnly = (c: Float64Array[], y: Float64Array[]) =>
    leastSquaresQrMany([new Float64Array(y[0].length).fill(1), ...c], y, true).coefficients.map(
      (coefficients) => ({ coefficients, intercept: true }),
    );
  const n = ys[0].length;
  const cv = folds > 0 && Math.floor(n / 2) >= folds
    ? blockedCrossValidationMany(design.columns, ys, folds, coefficientsOnly)
    : null;
  return ordinaryLeastSquaresMany(design.columns, ys, { names: design.names }).map((fit, b) =>
    proxyModelFit(design, "ols", fit, cv ? cv[b] : null, ys[b])
  );
}

/** The cells where band b has a value, checked for count and variation. */
function usableCells(y: ArrayLike<number>, n: number, p: number, b: number): Int32Array {
  if (y.length !== n) {
    throw new InputError(
      `Cannot calibrate band models: band ${b} has ${y.length} cells, the proxies ${n}`,
      { field: "bands", reason: "length_mismatch", index: b, value: y.length },
    );
  }
  const all = new Int32Array(n);
  let count = 0, lo = Infinity, hi = -Infinity;
  for (let i = 0; i < n; i++) {
    const v = y[i];
    if (!Number.isFinite(v)) continue;
    all[count++] = i;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  const idx = count === n ? all : all.slice(0, count);
  if (idx.length < p + 2) {
    throw new InputError(
      `Cannot calibrate band models: band ${b} has ${idx.length} cells with a value and every proxy; the model has ${p} coefficients and needs at least ${
        p + 2
      }`,
      {
        field: "bands",
        reason: idx.length === 0 ? "no_overlap" : "too_few_points",
        index: b,
        value: idx.length,
      },
    );
  }
  if (lo === hi) {
    throw new InputError(
      `Cannot calibrate band models: band ${b} has the same value (${lo}) at all ${idx.length} calibration cells; a constant record carries no solar variability`,
      { field: "bands", reason: "constant", index: b, value: lo },
    );
  }
  return idx;
}

/** Run f; an InputError about the response ("tsi") is re-addressed to band b. */
function bandError<T>(b: number, f: () => T): T {
  try {
    return f();
  } catch (e) {
    if (e instanceof InputError && (e.field === "tsi" || e.field === "y")) {
      throw new InputError(e.message.replace(/TSI/g, `band ${b}`), {
        field: "bands",
        reason: e.reason,
        ...(b >= 0 ? { index: b } : {}),
        value: e.value,
      });
    }
    throw e;
  }
}

/** The bands' back-extension residual processes (result of {@link bandBackExtension}). */
export interface BandBackExtension {
  /** Per band, as {@link backExtensionResiduals} estimates it. */
  perBand: BackExtensionResiduals[];
  /** Their cross-correlation over the cells every band has; null with too few. */
  correlation: ResidualCrossCorrelation | null;
}

/**
 * The residual process of each band's model fed with proxies mapped from sunspot number
 * ({@link backExtensionResiduals}, the TSI back-extension applied per band), and the
 * cross-correlation of those residuals between bands over the cells every band has.
 *
 * @param bands per band, its value at each sunspot cell of the overlap (NaN where missing)
 * @param mapped per model term, the proxy mapped from each cell's sunspot number
 * @param models per band, its coefficients and terms
 * @param minCommonCells fewest common cells for the cross-correlation @default 10
 * @returns {@link BandBackExtension}
 * @throws {InputError} field `bands` with the band index when a band has fewer than 4 usable
 *   cells (reason `too_few_points`); as {@link backExtensionResiduals}
 * @example
 * ```ts
 * import { bandBackExtension } from "./spectral_band_models.ts";
 * import assert from "node:assert/strict";
 * const model = (a: number) => ({ coefficients: [1, a], terms: [{ role: "facular" as const, quietLevel: 0 }], psiReference: 1360.8 });
 * const f = Float64Array.from({ length: 12 }, (_, i) => i / 100);
 * const noise = f.map((_, i) => (i % 2 ? 0.01 : -0.01));
 * const b = bandBackExtension([f.map((v, i) => 1 + 10 * v + noise[i]), f.map((v, i) => 1 + 5 * v + 2 * noise[i])], [f], [model(10), model(5)], 5);
 * assert.ok(Math.abs(b.perBand[0].residualSd - 0.01) < 1e-12);
 * assert.ok(Math.abs(b.correlation!.lag0[0][1] - 1) < 1e-12);
 * ```
 */
export function bandBackExtension(
  bands: readonly ArrayLike<number>[],
  mapped: readonly ArrayLike<number>[],
  models: readonly ProxyModelTerms[],
  minCommonCells = 10,
): BandBackExtension {
  const residuals: Float64Array[] = [];
  const perBand = bands.map((y, b) => {
    const yhat = evaluateProxyModel(models[b], mapped);
    const r = new Float64Array(y.length);
    for (let i = 0; i < y.length; i++) r[i] = y[i] - yhat[i];
    residuals.push(r);
    try {
      return backExtensionResiduals(y, mapped, models[b]);
    } catch (e) {
      if (e instanceof InputError && e.field === "tsi") {
        throw new InputError(e.message.replace(/TSI/g, `band ${b}`), {
          field: "bands",
          reason: e.reason,
          index: b,
          value: e.value,
        });
      }
      throw e;
    }
  });
  return { perBand, correlation: residualCrossCorrelation(residuals, minCommonCells) };
}

/** A band's model as integration reads it (a {@link ReconstructionModel}). */
export type BandModel = ReconstructionModel;

/** Correlations of the band residual processes (direct and back-extension). */
export interface BandCorrelations {
  /** Lag-0 and lag-1 correlation of the calibration residuals. */
  residual: { lag0: number[][]; lag1: number[][] };
  /** The same for the back-extension residual processes; null without them. */
  backExtension: { lag0: number[][]; lag1: number[][] } | null;
}

/**
 * The model of a weighted sum of bands Σ w_i S_i (an integral over wavelength with the
 * weights of core/irradiance/wavelength_bands.ts): coefficients Σ w_i β_i, covariance
 * Σ_ij w_i w_j r_ij S_i^½ S_j^½ (S^½ the symmetric square root of a band's coefficient
 * covariance, by eigen-decomposition), residual SD √(Σ_ij w_i w_j σ_i σ_j r_ij) and lag-1
 * autocorrelation Σ_ij w_i w_j σ_i σ_j r¹_ij / σ², likewise for the back-extension residual
 * process. Bands with zero weight are skipped.
 *
 * @param models per band, its model (same terms, S_ref and step)
 * @param weights per band, W m-2 per unit band value
 * @param correlations residual correlations of the bands
 * @returns the sum's {@link ReconstructionModel}
 * @throws {InputError} field `weights` when no weight is non-zero or the lengths differ;
 *   field `models` when the bands' terms differ
 * @example
 * ```ts
 * import { integrateBandModels } from "./spectral_band_models.ts";
 * import assert from "node:assert/strict";
 * const band = (a: number) => ({
 *   coefficients: [1, a], covariance: [[0.01, 0], [0, 0.04]],
 *   terms: [{ role: "facular" as const, quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.1, rho: 0.5, stepDays: 1, backExtension: null,
 * });
 * const I = [[1, 0], [0, 1]];
 * const sum = integrateBandModels([band(2), band(3)], [10, 10], { residual: { lag0: I, lag1: [[0.5, 0], [0, 0.5]] }, backExtension: null });
 * assert.deepEqual(sum.coefficients, [20, 50]);
 * assert.ok(Math.abs(sum.covariance[1][1] - 2 * 100 * 0.04) < 1e-12); // independent bands
 * assert.ok(Math.abs(sum.residualSd - Math.sqrt(2) * 1) < 1e-12);
 * assert.ok(Math.abs(sum.rho - 0.5) < 1e-12);
 * ```
 */
export function integrateBandModels(
  models: readonly BandModel[],
  weights: ArrayLike<number>,
  correlations: BandCorrelations,
): ReconstructionModel {
  if (weights.length !== models.length) {
    throw new InputError(
      `Cannot integrate band models: ${weights.length} weights for ${models.length} bands`,
      { field: "weights", reason: "length_mismatch", value: weights.length },
    );
  }
  const used: number[] = [];
  for (let i = 0; i < models.length; i++) if (weights[i] !== 0) used.push(i);
  if (used.length === 0) {
    throw new InputError("Cannot integrate band models: every weight is zero", {
      field: "weights",
      reason: "empty",
    });
  }
  const first = models[used[0]];
  const p = first.coefficients.length;
  for (const i of used) {
    const m = models[i];
    const same = m.coefficients.length === p && m.psiReference === first.psiReference &&
      m.terms.every((t, k) =>
        t.role === first.terms[k].role && t.quietLevel === first.terms[k].quietLevel
      );
    if (!same) {
      throw new InputError(
        `Cannot integrate band models: band ${i} has other terms or quiet levels than band ${
          used[0]
        }`,
        { field: "models", reason: "invalid", index: i },
      );
    }
  }
  const coefficients = new Array<number>(p).fill(0);
  for (const i of used) {
    for (let a = 0; a < p; a++) coefficients[a] += weights[i] * models[i].coefficients[a];
  }
  const roots = used.map((i) => symmetricSquareRoot(models[i].covariance));
  const r = correlations.residual.lag0;
  const covariance: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  used.forEach((i, u) => {
    used.forEach((j, v) => {
      const f = weights[i] * weights[j] * r[i][j];
      if (f === 0) return;
      const A = roots[u], B = roots[v];
      for (let a = 0; a < p; a++) {
        for (let c = 0; c < p; c++) {
          let s = 0;
          for (let k = 0; k < p; k++) s += A[a][k] * B[k][c];
          covariance[a][c] += f * s;
        }
      }
    });
  });
  for (let a = 0; a < p; a++) {
    for (let c = a + 1; c < p; c++) {
      covariance[a][c] = covariance[c][a] = (covariance[a][c] + covariance[c][a]) / 2;
    }
  }
  const process = (
    sd: (m: BandModel) => number,
    rho: (m: BandModel) => number,
    c: { lag0: number[][]; lag1: number[][] },
  ) => {
    let v0 = 0, v1 = 0;
    for (const i of used) {
      for (const j of used) {
        const f = weights[i] * weights[j] * sd(models[i]) * sd(models[j]);
        v0 += f * c.lag0[i][j];
        v1 += f * (i === j ? rho(models[i]) : c.lag1[i][j]);
      }
    }
    const s = Math.sqrt(Math.max(0, v0));
    const rr = v0 > 0 ? v1 / v0 : 0;
    return { residualSd: s, rho: Math.max(-MAX_RESIDUAL_RHO, Math.min(MAX_RESIDUAL_RHO, rr)) };
  };
  const direct = process((m) => m.residualSd, (m) => m.rho, correlations.residual);
  const beCorr = correlations.backExtension;
  const backExtension = beCorr && used.every((i) => models[i].backExtension)
    ? {
      ...process(
        (m) => m.backExtension!.residualSd,
        (m) => m.backExtension!.rho,
        beCorr,
      ),
      stepDays: first.backExtension!.stepDays,
    }
    : null;
  return {
    coefficients,
    covariance,
    terms: first.terms.map((t) => ({ ...t })),
    psiReference: first.psiReference,
    residualSd: direct.residualSd,
    rho: direct.rho,
    stepDays: first.stepDays,
    backExtension,
  };
}

/**
 * The symmetric positive semi-definite square root S^½ of a covariance matrix (S^½S^½ = S),
 * by eigen-decomposition S = VΛVᵀ, S^½ = VΛ^½Vᵀ with negative rounding eigenvalues taken as
 * 0 (e.g. Higham 2008, Functions of Matrices, §6.1); S is symmetrised first.
 *
 * @param s p × p covariance matrix
 * @returns S^½ as p rows of p numbers
 * @example
 * ```ts
 * import { symmetricSquareRoot } from "./spectral_band_models.ts";
 * import assert from "node:assert/strict";
 * const r = symmetricSquareRoot([[5, 4], [4, 5]]); // [[2, 1], [1, 2]]² = [[5, 4], [4, 5]]
 * assert.ok(Math.abs(r[0][0] - 2) < 1e-12 && Math.abs(r[0][1] - 1) < 1e-12);
 * ```
 */
export function symmetricSquareRoot(s: readonly (readonly number[])[]): number[][] {
  const p = s.length;
  const sym = new Matrix(s.map((row, a) => row.map((v, b) => (v + s[b][a]) / 2)));
  const e = new EigenvalueDecomposition(sym, { assumeSymmetric: true });
  const vals = e.realEigenvalues.map((v) => Math.sqrt(Math.max(0, v)));
  const V = e.eigenvectorMatrix.to2DArray();
  const out: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let a = 0; a < p; a++) {
    for (let b = 0; b < p; b++) {
      let x = 0;
      for (let k = 0; k < p; k++) x += V[a][k] * vals[k] * V[b][k];
      out[a][b] = x;
    }
  }
  return out;
}
