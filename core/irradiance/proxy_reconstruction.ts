/**
 * TSI reconstruction from a calibrated proxy model, with prediction intervals from its
 * linearised error model (core/irradiance/reconstruction_error_model.ts).
 *
 * @module
 */
import { InputError } from "../errors.ts";
import { proxyRegressorColumn, type ProxyRole } from "./proxy_model_evaluation.ts";
import { workArrays } from "../stats/work_arrays.ts";
import type { SunspotProxyMapping } from "./sunspot_proxy_mapping.ts";
import { sunspotMappingValues } from "./sunspot_proxy_mapping.ts";
import type { SunspotCellUncertainty } from "./sunspot_number_uncertainty.ts";
import {
  ERROR_SOURCES,
  errorModelVariance,
  type ErrorSource,
  type ReconstructionErrorModel,
} from "./reconstruction_error_model.ts";
import {
  designRegressors,
  proxyReconstructionErrorModel,
  proxyReconstructionOnKernel,
  proxyReconstructionVariance,
} from "./proxy_reconstruction_errors.ts";
import { predictionIntervalKernel } from "./prediction_interval_kernel.ts";

/** The parts of a calibrated model a reconstruction needs. */
export interface ReconstructionModel {
  coefficients: number[];
  covariance: number[][];
  terms: { role: ProxyRole; quietLevel: number }[];
  psiReference: number;
  /** Marginal SD and lag-1 autocorrelation of the model residuals, and their spacing (days). */
  residualSd: number;
  rho: number;
  stepDays: number;
  /**
   * Residual process of the sunspot-number-only model (TSI minus the model fed with mapped
   * proxies), estimated in the overlap era at the sunspot series' spacing; null when no
   * mapping was fitted.
   */
  backExtension: { residualSd: number; rho: number; stepDays: number } | null;
}

/** Proxy values per target cell, and what back-extension needs. */
export interface ReconstructionCells {
  /** Length of each cell in days. */
  days: Float64Array;
  /** Direct proxy values per term (cell means), NaN where the proxy has no value. */
  direct: Float64Array[];
  /** Per term, its sunspot-number → proxy mapping; null = the term is not back-extended. */
  mappings: (SunspotProxyMapping | null)[];
  /** Sunspot number per cell on the mappings' version (NaN where missing); null without one. */
  sunspot: Float64Array | null;
  /** The uncertainty of the cells' sunspot numbers; null or absent = taken as exact. */
  sunspotUncertainty?: SunspotCellUncertainty | null;
}

/**
 * Scratch arrays of reconstructions: per term, its values mapped from sunspot number (index k)
 * and its regressors (index K + k); temporaries only, never part of a result.
 */
const work = workArrays();

/** Source of a reconstructed value. */
export const SOURCE_NONE = 0, SOURCE_DIRECT = 1, SOURCE_BACK_EXTENDED = 2;

/** The proxy values a reconstruction uses (result of {@link reconstructionDesign}). */
export interface ReconstructionDesign {
  /** 0 = no value, 1 = every proxy direct, 2 = some proxy mapped from sunspot number. */
  source: Uint8Array;
  /** Per term, the proxy value used in each cell (NaN where the cell has no value). */
  values: Float64Array[];
  /** Per term, 1 where its value was mapped from sunspot number. */
  mapped: Uint8Array[];
}

function checkCells(model: ReconstructionModel, cells: ReconstructionCells): void {
  const K = model.terms.length, n = cells.days.length;
  if (cells.direct.length !== K || cells.mappings.length !== K) {
    throw new InputError(
      `Cannot reconstruct: model has ${K} terms, cells have ${cells.direct.length}`,
      { field: "cells", reason: "length_mismatch", value: cells.direct.length },
    );
  }
  const arrays = [...cells.direct, ...(cells.sunspot ? [cells.sunspot] : [])];
  const u = cells.sunspotUncertainty;
  if (u) arrays.push(u.correlated, u.independent);
  if (arrays.some((a) => a.length !== n)) {
    throw new InputError(`Cannot reconstruct: every per-cell array must have ${n} cells`, {
      field: "cells",
      reason: "length_mismatch",
    });
  }
  if (model.coefficients.length !== K + 1) {
    throw new InputError("Cannot reconstruct: coefficients do not match the terms", {
      field: "model",
      reason: "length_mismatch",
      value: model.coefficients.length,
    });
  }
}

/**
 * Which proxy value each cell uses: a term's direct value where it has one, else its value
 * mapped from the cell's sunspot number; a cell with a term that has neither, or with a mapped
 * term but no back-extension residual process in the model, has no value.
 *
 * @param model {@link ReconstructionModel}
 * @param cells {@link ReconstructionCells}
 * @returns {@link ReconstructionDesign}
 * @throws {InputError} (field `cells`) when the cells do not match the model's terms, (field
 *   `model`) when the coefficients do not
 * @example
 * ```ts
 * import { reconstructionDesign } from "./proxy_reconstruction.ts";
 * import { fitLinearSunspotMapping } from "./sunspot_proxy_mapping.ts";
 * import assert from "node:assert/strict";
 * const m = fitLinearSunspotMapping([0, 50, 100, 150], [0.15, 0.155, 0.16, 0.165]);
 * const d = reconstructionDesign({
 *   coefficients: [1360.8, 135], covariance: [[1e-4, 0], [0, 1]],
 *   terms: [{ role: "facular", quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.15, rho: 0.7, stepDays: 1,
 *   backExtension: { residualSd: 0.1, rho: 0.5, stepDays: 30 },
 * }, {
 *   days: Float64Array.of(31, 31), direct: [Float64Array.of(NaN, 0.16)], mappings: [m],
 *   sunspot: Float64Array.of(100, 100),
 * });
 * assert.deepEqual([...d.source], [2, 1]);
 * assert.ok(Math.abs(d.values[0][0] - 0.16) < 1e-12);
 * ```
 */
export function reconstructionDesign(
  model: ReconstructionModel,
  cells: ReconstructionCells,
): ReconstructionDesign {
  checkCells(model, cells);
  const K = model.terms.length, n = cells.days.length;
  const source = new Uint8Array(n).fill(SOURCE_DIRECT);
  const values = cells.direct.map((d) => new Float64Array(d));
  const mapped = cells.direct.map(() => new Uint8Array(n));
  for (let k = 0; k < K; k++) {
    const m = cells.mappings[k];
    const viaMap = m && cells.sunspot
      ? sunspotMappingValues(m.form, m.coefficients, cells.sunspot, work(k, n))
      : null;
    for (let i = 0; i < n; i++) {
      if (Number.isFinite(values[k][i])) continue;
      if (viaMap && Number.isFinite(viaMap[i])) {
        values[k][i] = viaMap[i];
        mapped[k][i] = 1;
        if (source[i] === SOURCE_DIRECT) source[i] = SOURCE_BACK_EXTENDED;
      } else source[i] = SOURCE_NONE;
    }
  }
  for (let i = 0; i < n; i++) {
    if (source[i] === SOURCE_BACK_EXTENDED && !model.backExtension) source[i] = SOURCE_NONE;
    if (source[i] !== SOURCE_NONE) continue;
    for (let k = 0; k < K; k++) {
      values[k][i] = NaN;
      mapped[k][i] = 0;
    }
  }
  return { source, values, mapped };
}

/** Result of {@link reconstructFromProxies}. */
export interface Reconstruction {
  value: Float64Array;
  /** One-sigma predictive SD, W m-2. */
  sd: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
  /** 0 = no value, 1 = all proxies direct, 2 = some proxy mapped from sunspot number. */
  source: Uint8Array;
  /** The predictive variance of each cell by source, W² m-4 (NaN where no value). */
  components: Record<ErrorSource, Float64Array>;
  /** The linearised error model the variances come from. */
  errorModel: ReconstructionErrorModel;
  /** The proxy values used. */
  design: ReconstructionDesign;
}

/**
 * A {@link Reconstruction} without its error model and per-source variances: what
 * `reconstructFromProxiesMany(models, cells, z, { errorModel: false })` returns.
 */
export type LeanReconstruction = Omit<Reconstruction, "components" | "errorModel">;

/** Options of {@link reconstructFromProxiesMany}. */
export interface ReconstructionOptions {
  /**
   * Keep each result's linearised error model and its variances by source; false computes
   * the total variance block by block without keeping either (values, SDs and intervals
   * unchanged, bit for bit; a fraction of the memory).
   * @default true
   */
  errorModel?: boolean;
}

/**
 * Reconstruct TSI per cell: ŷ = xᵀβ with x the cell's regressors (intercept, F_k − F_k,Q,
 * −S_ref·PSI; core/irradiance/proxy_model_evaluation.ts) from the values of
 * {@link reconstructionDesign}, and the predictive variance of the linearised error model
 * (core/irradiance/proxy_reconstruction_errors.ts), by source:
 *
 *   Var = xᵀΣ_β x                        (calibration coefficients)
 *       + σ_e²·f(m, ρ)/m                 (residual process of the direct or back-extended model)
 *       + Σ_k β_k²·s_k²·g_kᵀΣ_k g_k        (mapping parameters, mapped terms)
 *       + (Σ_k β_k·s_k·dF_k/dR)²·σ_R²      (the sunspot number's own error, mapped terms)
 *
 * with s_k the regressor scale (1, or −S_ref for PSI), m the residual steps in the cell and f
 * the AR(1) variance factor of a mean of m values. The interval is ŷ ± z·√Var with z the
 * two-sided quantile given (e.g. t(0.975, df)).
 *
 * @param model {@link ReconstructionModel}
 * @param cells {@link ReconstructionCells}
 * @param z quantile for the interval (1.96 for 95 % normal)
 * @returns {@link Reconstruction}; cells without proxies get NaN
 * @throws {InputError} as {@link reconstructionDesign}; (field `mapping`) when a mapping's
 *   covariance cannot be factored
 * @example
 * ```ts
 * import { reconstructFromProxies } from "./proxy_reconstruction.ts";
 * import assert from "node:assert/strict";
 * const r = reconstructFromProxies({
 *   coefficients: [1360.8, 135], covariance: [[1e-4, 0], [0, 1]],
 *   terms: [{ role: "facular", quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.15, rho: 0.7, stepDays: 1, backExtension: null,
 * }, {
 *   days: Float64Array.of(1, 31), direct: [Float64Array.of(0.16, 0.16)], mappings: [null],
 *   sunspot: null,
 * }, 1.96);
 * assert.ok(Math.abs(r.value[0] - (1360.8 + 1.35)) < 1e-9);
 * assert.ok(r.sd[1] < r.sd[0]); // a monthly mean is less uncertain than a day
 * ```
 */
export function reconstructFromProxies(
  model: ReconstructionModel,
  cells: ReconstructionCells,
  z: number,
): Reconstruction {
  return reconstructWithDesign(model, cells, reconstructionDesign(model, cells), z);
}

/**
 * The values ŷ = xᵀβ of {@link reconstructFromProxies} alone, without the error model or the
 * interval: for a reconstruction used only as a yardstick (the cycle amplitudes that the
 * model's sunspot mappings imply). Same design, regressors and sums in the same order, so the
 * values equal `reconstructFromProxies(model, cells, z).value` bit for bit; NaN where a cell
 * has no value. About a third of the full reconstruction's time on daily cells.
 *
 * @param model {@link ReconstructionModel}
 * @param cells {@link ReconstructionCells}
 * @returns ŷ per cell, W m-2 (NaN without a value)
 * @throws {InputError} as {@link reconstructionDesign}
 * @example
 * ```ts
 * import { reconstructedValues, reconstructFromProxies } from "./proxy_reconstruction.ts";
 * import assert from "node:assert/strict";
 * const model = {
 *   coefficients: [1360.8, 135], covariance: [[1e-4, 0], [0, 1]],
 *   terms: [{ role: "facular" as const, quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.15, rho: 0.7, stepDays: 1, backExtension: null,
 * };
 * const cells = {
 *   days: Float64Array.of(1, 31, 1), direct: [Float64Array.of(0.16, NaN, 0.17)],
 *   mappings: [null], sunspot: null,
 * };
 * const v = reconstructedValues(model, cells);
 * assert.deepEqual(v, reconstructFromProxies(model, cells, 1.96).value);
 * assert.ok(Number.isNaN(v[1]));
 * ```
 */
export function reconstructedValues(
  model: ReconstructionModel,
  cells: ReconstructionCells,
): Float64Array {
  const design = reconstructionDesign(model, cells);
  const K = model.terms.length, n = cells.days.length;
  const beta = model.coefficients, source = design.source;
  const value = new Float64Array(n).fill(beta[0]);
  for (let k = 0; k < K; k++) {
    const t = model.terms[k];
    const xk = proxyRegressorColumn(
      t.role,
      t.quietLevel,
      model.psiReference,
      design.values[k],
      work(K + k, n),
    );
    const b = beta[k + 1];
    for (let i = 0; i < n; i++) value[i] += b * xk[i];
  }
  for (let i = 0; i < n; i++) if (source[i] === SOURCE_NONE) value[i] = NaN;
  return value;
}

/**
 * {@link reconstructFromProxies} for several models on the same terms (the bands of a spectral
 * model, and their integrals), over the same cells: which proxy value each cell uses
 * ({@link reconstructionDesign}) is decided once and shared by every model with the same
 * back-extension availability. Each result equals what {@link reconstructFromProxies} gives
 * for that model alone, bit for bit. With `{ errorModel: false }` each result leaves out the
 * error model and the variances by source ({@link LeanReconstruction}): the total variance is
 * summed a block of cells at a time (core/irradiance/proxy_reconstruction_errors.ts,
 * `proxyReconstructionVariance`) with the same operations, so values, SDs and intervals are
 * the same bit for bit, without keeping about 15 arrays of one value per cell per model.
 *
 * @param models the models: same term roles, quiet levels and S_ref
 * @param cells {@link ReconstructionCells}
 * @param z per model, the quantile for its interval
 * @param options {@link ReconstructionOptions}
 * @returns one {@link Reconstruction} per model ({@link LeanReconstruction} with
 *   `errorModel: false`)
 * @throws {InputError} as {@link reconstructFromProxies}; (field `models`) when the models'
 *   terms differ, (field `z`) when there is not one quantile per model
 * @example
 * ```ts
 * import { reconstructFromProxiesMany } from "./proxy_reconstruction.ts";
 * import assert from "node:assert/strict";
 * const band = (c: number, a: number) => ({
 *   coefficients: [c, a], covariance: [[1e-6, 0], [0, 1e-2]],
 *   terms: [{ role: "facular" as const, quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.01, rho: 0.5, stepDays: 1, backExtension: null,
 * });
 * const [uv, vis] = reconstructFromProxiesMany([band(0.5, 20), band(1.8, 2)], {
 *   days: Float64Array.of(31), direct: [Float64Array.of(0.16)], mappings: [null], sunspot: null,
 * }, [1.96, 1.96]);
 * assert.ok(Math.abs(uv.value[0] - 0.7) < 1e-12 && Math.abs(vis.value[0] - 1.82) < 1e-12);
 * const [lean] = reconstructFromProxiesMany([band(0.5, 20)], {
 *   days: Float64Array.of(31), direct: [Float64Array.of(0.16)], mappings: [null], sunspot: null,
 * }, [1.96], { errorModel: false });
 * assert.equal(lean.sd[0], uv.sd[0]);
 * assert.ok(!("errorModel" in lean));
 * ```
 */
export function reconstructFromProxiesMany(
  models: readonly ReconstructionModel[],
  cells: ReconstructionCells,
  z: readonly number[],
  options?: ReconstructionOptions & { errorModel?: true },
): Reconstruction[];
export function reconstructFromProxiesMany(
  models: readonly ReconstructionModel[],
  cells: ReconstructionCells,
  z: readonly number[],
  options: ReconstructionOptions,
): LeanReconstruction[];
export function reconstructFromProxiesMany(
  models: readonly ReconstructionModel[],
  cells: ReconstructionCells,
  z: readonly number[],
  options: ReconstructionOptions = {},
): LeanReconstruction[] {
  if (z.length !== models.length) {
    throw new InputError(`Cannot reconstruct: ${z.length} quantiles for ${models.length} models`, {
      field: "z",
      reason: "length_mismatch",
      value: z.length,
    });
  }
  const first = models[0];
  models.forEach((model, j) => {
    const same = model.psiReference === first.psiReference &&
      model.terms.length === first.terms.length &&
      model.terms.every((t, k) =>
        t.role === first.terms[k].role && t.quietLevel === first.terms[k].quietLevel
      );
    if (!same) {
      throw new InputError(
        `Cannot reconstruct together: model ${j} has other terms than model 0`,
        { field: "models", reason: "invalid", index: j },
      );
    }
  });
  // the design depends on a model only through its terms and whether it can back-extend
  const designs = new Map<boolean, ReconstructionDesign>();
  // the lean path's kernel, and the regressors of each design, shared by every model
  const kernel = options.errorModel === false && models.length
    ? predictionIntervalKernel(cells.days.length)
    : null;
  const regressors = new Map<ReconstructionDesign, Float64Array[]>();
  return models.map((model, j) => {
    checkCells(model, cells);
    const key = model.backExtension !== null;
    let design = designs.get(key);
    if (!design) designs.set(key, design = reconstructionDesign(model, cells));
    if (options.errorModel !== false) return reconstructWithDesign(model, cells, design, z[j]);
    if (!kernel) return reconstructLean(model, cells, design, z[j]);
    let x = regressors.get(design);
    if (!x) regressors.set(design, x = designRegressors(model, design));
    const rec = proxyReconstructionOnKernel(kernel, model, cells, design, x, z[j]);
    return rec
      ? { ...rec, source: design.source, design }
      : reconstructLean(model, cells, design, z[j]);
  });
}

function reconstructWithDesign(
  model: ReconstructionModel,
  cells: ReconstructionCells,
  design: ReconstructionDesign,
  z: number,
): Reconstruction {
  // the regressors are computed once, for the values and for the calibration loadings, into
  // scratch arrays (nothing returned refers to them)
  const x = designColumns(model, design, cells.days.length);
  const errorModel = proxyReconstructionErrorModel(model, cells, design, x);
  const v = errorModelVariance(errorModel);
  // the variances by source are the result's components (NaN where a cell has no value)
  const components = v.bySource;
  const rec = valuesAndIntervals(model, design, x, v.total, z);
  const bySource = ERROR_SOURCES.map((s) => components[s]);
  const source = design.source, n = source.length;
  for (let i = 0; i < n; i++) {
    if (source[i] === SOURCE_NONE) { for (const c of bySource) c[i] = NaN; }
  }
  const { value, sd, lower, upper } = rec;
  return { value, sd, lower, upper, source, components, errorModel, design };
}

/** {@link reconstructWithDesign} without keeping the error model or the variances by source. */
function reconstructLean(
  model: ReconstructionModel,
  cells: ReconstructionCells,
  design: ReconstructionDesign,
  z: number,
): LeanReconstruction {
  const x = designColumns(model, design, cells.days.length);
  const total = proxyReconstructionVariance(model, cells, design, x);
  return valuesAndIntervals(model, design, x, total, z);
}

/** Per term, its regressor in each cell, in scratch arrays. */
function designColumns(
  model: ReconstructionModel,
  design: ReconstructionDesign,
  n: number,
): Float64Array[] {
  const K = model.terms.length;
  return model.terms.map((t, k) =>
    proxyRegressorColumn(t.role, t.quietLevel, model.psiReference, design.values[k], work(K + k, n))
  );
}

/** ŷ = xᵀβ, its SD √Var and its interval ŷ ± z·SD per cell (NaN where no value). */
function valuesAndIntervals(
  model: ReconstructionModel,
  design: ReconstructionDesign,
  x: readonly Float64Array[],
  total: Float64Array,
  z: number,
): LeanReconstruction {
  const K = model.terms.length, n = design.source.length;
  const beta = model.coefficients;
  const value = new Float64Array(n), sd = new Float64Array(n);
  const lower = new Float64Array(n), upper = new Float64Array(n);
  const source = design.source;
  // ŷ = β₀ + Σ_k β_k·x_k, added term by term in that order, one pass per term
  value.fill(beta[0]);
  for (let k = 0; k < K; k++) {
    const b = beta[k + 1], xk = x[k];
    for (let i = 0; i < n; i++) value[i] += b * xk[i];
  }
  for (let i = 0; i < n; i++) {
    if (source[i] === SOURCE_NONE) {
      value[i] =
        sd[i] =
        lower[i] =
        upper[i] =
          NaN;
      continue;
    }
    const y = value[i], s = Math.sqrt(total[i]);
    sd[i] = s;
    lower[i] = y - z * s;
    upper[i] = y + z * s;
  }
  return { value, sd, lower, upper, source, design };
}

/** Names of the source codes, in code order. */
export const SOURCE_NAMES = ["none", "direct", "back_extended"] as const;

/** Cells of one source: how many, and the first and last cell middles (null when none). */
export interface SourceCoverage {
  cells: number;
  start: number | null;
  end: number | null;
}

/** Where a reconstruction's values come from (result of {@link reconstructionCoverage}). */
export interface ReconstructionCoverage {
  cells: number;
  direct: SourceCoverage;
  backExtended: SourceCoverage;
  /** Cells without a value. */
  missing: number;
  /** Runs of consecutive cells of one source, in time order (start/end: cell middles). */
  segments: { source: typeof SOURCE_NAMES[number]; start: number; end: number; cells: number }[];
}

/**
 * Count the cells of each source and split the axis into runs of one source. A cell whose
 * value is not finite counts as having no value, whatever its source code.
 *
 * @param rec a reconstruction (its `value` and `source`)
 * @param time cell middles, decimal years, increasing, same length
 * @returns {@link ReconstructionCoverage}
 * @throws {InputError} (field `time`) when the lengths differ
 * @example
 * ```ts
 * import { reconstructionCoverage } from "./proxy_reconstruction.ts";
 * import assert from "node:assert/strict";
 * const c = reconstructionCoverage(
 *   { value: Float64Array.of(1, 1, NaN, 1), source: Uint8Array.of(2, 2, 2, 1) },
 *   [1700.5, 1701.5, 1702.5, 1703.5],
 * );
 * assert.equal(c.backExtended.cells, 2);
 * assert.equal(c.missing, 1);
 * assert.deepEqual(c.segments.map((s) => s.source), ["back_extended", "none", "direct"]);
 * ```
 */
export function reconstructionCoverage(
  rec: { value: ArrayLike<number>; source: ArrayLike<number> },
  time: ArrayLike<number>,
): ReconstructionCoverage {
  const n = rec.value.length;
  if (time.length !== n || rec.source.length !== n) {
    throw new InputError(
      `Cannot summarise coverage: ${n} values but ${time.length} times`,
      { field: "time", reason: "length_mismatch", value: time.length },
    );
  }
  const code = (i: number) => (Number.isFinite(rec.value[i]) ? rec.source[i] : SOURCE_NONE);
  const of = (c: number): SourceCoverage => {
    let cells = 0, start: number | null = null, end: number | null = null;
    for (let i = 0; i < n; i++) {
      if (code(i) !== c) continue;
      cells++;
      if (start === null) start = time[i];
      end = time[i];
    }
    return { cells, start, end };
  };
  const segments: ReconstructionCoverage["segments"] = [];
  for (let i = 0; i < n;) {
    let j = i;
    while (j + 1 < n && code(j + 1) === code(i)) j++;
    segments.push({
      source: SOURCE_NAMES[code(i)],
      start: time[i],
      end: time[j],
      cells: j - i + 1,
    });
    i = j + 1;
  }
  const direct = of(SOURCE_DIRECT), backExtended = of(SOURCE_BACK_EXTENDED);
  return {
    cells: n,
    direct,
    backExtended,
    missing: n - direct.cells - backExtended.cells,
    segments,
  };
}
