/**
 * The linearised error model (core/irradiance/reconstruction_error_model.ts) of a proxy
 * reconstruction (core/irradiance/proxy_reconstruction.ts): its factors and processes by
 * source, from the calibrated model, the cells and the proxy values used.
 *
 * @module
 */
import { choleskyLower } from "../stats/multivariate_normal.ts";
import { proxyRegressorColumn, proxyRegressorScale } from "./proxy_model_evaluation.ts";
import { sunspotMappingDerivatives } from "./sunspot_proxy_mapping.ts";
import { mappingCholesky } from "./back_extension.ts";
import { type Ar1CellMeans, ar1CellMeans, ar1CellMeanSd } from "./ar1_cell_means.ts";
import { scaleErrorLag1 } from "./sunspot_number_uncertainty.ts";
import {
  type LinearLoading,
  PREDICTION_BLOCK,
  type PredictionIntervalKernel,
} from "./prediction_interval_kernel.ts";
import {
  ERROR_SOURCES,
  type ErrorFactor,
  type ErrorProcess,
  type ErrorSource,
  type ReconstructionErrorModel,
} from "./reconstruction_error_model.ts";
import {
  type ReconstructionCells,
  type ReconstructionDesign,
  type ReconstructionModel,
  SOURCE_BACK_EXTENDED,
  SOURCE_DIRECT,
} from "./proxy_reconstruction.ts";

/**
 * dTSI/dR of each back-extended cell: Σ over the terms mapped there of β_k·s_k·dF_k/dR at the
 * cell's sunspot number (0 elsewhere), W m-2 per unit of sunspot number.
 *
 * @param model the calibrated model
 * @param cells the cells (mappings and sunspot numbers)
 * @param design the values used ({@link reconstructionDesign} in ./proxy_reconstruction.ts)
 * @returns the sensitivity per cell
 * @example
 * ```ts
 * import { sunspotSensitivity } from "./proxy_reconstruction_errors.ts";
 * import { fitLinearSunspotMapping } from "./sunspot_proxy_mapping.ts";
 * import assert from "node:assert/strict";
 * const m = fitLinearSunspotMapping([0, 50, 100, 150], [0.15, 0.155, 0.16, 0.165]);
 * const s = sunspotSensitivity(
 *   { coefficients: [1360.8, 135], covariance: [[0, 0], [0, 0]],
 *     terms: [{ role: "facular", quietLevel: 0.15 }], psiReference: 1360.8,
 *     residualSd: 0.1, rho: 0, stepDays: 1, backExtension: null },
 *   { days: Float64Array.of(1), direct: [Float64Array.of(NaN)], mappings: [m],
 *     sunspot: Float64Array.of(50) },
 *   { source: Uint8Array.of(2), values: [Float64Array.of(0.155)], mapped: [Uint8Array.of(1)] },
 * );
 * assert.ok(Math.abs(s[0] - 135 * 1e-4) < 1e-12);
 * ```
 */
export function sunspotSensitivity(
  model: ReconstructionModel,
  cells: ReconstructionCells,
  design: ReconstructionDesign,
): Float64Array {
  const n = cells.days.length, out = new Float64Array(n);
  if (!cells.sunspot) return out;
  model.terms.forEach((t, k) => {
    const m = cells.mappings[k];
    if (!m || !design.mapped[k].includes(1)) return;
    const slope = sunspotMappingDerivatives(m, cells.sunspot!).slope;
    const f = model.coefficients[k + 1] * proxyRegressorScale(t.role, model.psiReference);
    for (let i = 0; i < n; i++) if (design.mapped[k][i]) out[i] += f * slope[i];
  });
  return out;
}

/**
 * The regressors of the values a reconstruction uses: per term, its regressor in every cell
 * ({@link proxyRegressorColumn}; NaN where the cell has no value).
 *
 * @param model the calibrated model (terms and S_ref)
 * @param design the values used ({@link reconstructionDesign} in ./proxy_reconstruction.ts)
 * @returns one column per term
 * @example
 * ```ts
 * import { designRegressors } from "./proxy_reconstruction_errors.ts";
 * import assert from "node:assert/strict";
 * const x = designRegressors(
 *   { terms: [{ role: "facular", quietLevel: 0.15 }], psiReference: 1360.8 },
 *   { source: Uint8Array.of(1), values: [Float64Array.of(0.16)], mapped: [Uint8Array.of(0)] },
 * );
 * assert.ok(Math.abs(x[0][0] - 0.01) < 1e-15);
 * ```
 */
export function designRegressors(
  model: Pick<ReconstructionModel, "terms" | "psiReference">,
  design: ReconstructionDesign,
): Float64Array[] {
  return model.terms.map((t, k) =>
    proxyRegressorColumn(t.role, t.quietLevel, model.psiReference, design.values[k])
  );
}

/**
 * The error model of a reconstruction, part by part (see
 * core/irradiance/reconstruction_error_model.ts for the form):
 *
 * - calibration: K + 1 factors with loadings Lᵀx(t), Σ_β = LLᵀ, x(t) the cell's regressors;
 * - mapping: per mapped term, one factor per mapping parameter, loading β_k·s_k·Lᵀg(t) with
 *   g = ∂F/∂c at the cell's sunspot number, on the cells where the term was mapped;
 * - residual: the direct model's residual process on direct cells, the back-extended model's
 *   on back-extended cells (cell means of AR(1) processes: core/irradiance/ar1_cell_means.ts);
 * - input: the sunspot number's correlated error (lag-1 correlation e^{−Δt/τ} between cell
 *   middles Δt apart) and its independent error, times {@link sunspotSensitivity}, on
 *   back-extended cells.
 *
 * Cells without a value have zero loadings.
 *
 * @param model the calibrated model
 * @param cells the cells
 * @param design the values used
 * @param regressors per term, the regressor in each cell (default: {@link designRegressors})
 * @returns the {@link ReconstructionErrorModel}
 * @throws {InputError} (field `covariance` or `mapping`) when a covariance cannot be factored;
 *   (fields of ar1CellMeans) for an invalid residual process
 * @example
 * ```ts
 * import { proxyReconstructionErrorModel } from "./proxy_reconstruction_errors.ts";
 * import { errorModelVariance } from "./reconstruction_error_model.ts";
 * import assert from "node:assert/strict";
 * const em = proxyReconstructionErrorModel(
 *   { coefficients: [1360.8, 135], covariance: [[1e-4, 0], [0, 1]],
 *     terms: [{ role: "facular", quietLevel: 0.15 }], psiReference: 1360.8,
 *     residualSd: 0.15, rho: 0, stepDays: 1, backExtension: null },
 *   { days: Float64Array.of(1), direct: [Float64Array.of(0.16)], mappings: [null], sunspot: null },
 *   { source: Uint8Array.of(1), values: [Float64Array.of(0.16)], mapped: [Uint8Array.of(0)] },
 * );
 * // xᵀΣx + σ² = 1e-4 + 0.01² + 0.15²
 * assert.ok(Math.abs(errorModelVariance(em).total[0] - (1e-4 + 1e-4 + 0.0225)) < 1e-12);
 * ```
 */
export function proxyReconstructionErrorModel(
  model: ReconstructionModel,
  cells: ReconstructionCells,
  design: ReconstructionDesign,
  regressors: readonly Float64Array[] = designRegressors(model, design),
): ReconstructionErrorModel {
  const n = cells.days.length;
  const factors: ErrorFactor[] = [];
  const processes: ErrorProcess[] = [];
  for (const part of errorParts(model, cells, design, regressors)) {
    // a process's full lag-1 correlations first: its loading blocks may then reuse them
    const lag1 = part.lag1?.();
    const loading = new Float64Array(n);
    for (let i0 = 0; i0 < n; i0 += BLOCK) {
      const i1 = Math.min(n, i0 + BLOCK);
      part.block(loading.subarray(i0, i1), i0, i1);
    }
    if (lag1) processes.push({ source: part.source, label: part.label, loading, lag1 });
    else factors.push({ source: part.source, label: part.label, loading });
  }
  return { cells: n, factors, processes };
}

/**
 * The total predictive variance of each cell under the error model of
 * {@link proxyReconstructionErrorModel}, without keeping it: the loadings are computed a block
 * of cells at a time into scratch arrays, squared and summed by source and then over the
 * sources, with the same operations in the same order as
 * `errorModelVariance(proxyReconstructionErrorModel(...)).total`, so the result equals it bit
 * for bit, with a few blocks of memory in place of the model's loadings (K + 1 calibration
 * factors, the mappings' factors and up to four processes, each one value per cell).
 *
 * @param model the calibrated model
 * @param cells the cells
 * @param design the values used
 * @param regressors per term, the regressor in each cell (default: {@link designRegressors})
 * @returns Var per cell, W² m-4 (0 where the cell has no value)
 * @throws {InputError} as {@link proxyReconstructionErrorModel}
 * @example
 * ```ts
 * import {
 *   proxyReconstructionErrorModel,
 *   proxyReconstructionVariance,
 * } from "./proxy_reconstruction_errors.ts";
 * import { errorModelVariance } from "./reconstruction_error_model.ts";
 * import assert from "node:assert/strict";
 * const model = { coefficients: [1360.8, 135], covariance: [[1e-4, 0], [0, 1]],
 *   terms: [{ role: "facular" as const, quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.15, rho: 0.6, stepDays: 1, backExtension: null };
 * const cells = { days: Float64Array.of(1, 31), direct: [Float64Array.of(0.16, 0.17)],
 *   mappings: [null], sunspot: null };
 * const design = { source: Uint8Array.of(1, 1), values: [Float64Array.of(0.16, 0.17)],
 *   mapped: [Uint8Array.of(0, 0)] };
 * const full = errorModelVariance(proxyReconstructionErrorModel(model, cells, design)).total;
 * assert.deepEqual(proxyReconstructionVariance(model, cells, design), full);
 * ```
 */
export function proxyReconstructionVariance(
  model: ReconstructionModel,
  cells: ReconstructionCells,
  design: ReconstructionDesign,
  regressors: readonly Float64Array[] = designRegressors(model, design),
): Float64Array {
  const n = cells.days.length;
  const parts = errorParts(model, cells, design, regressors);
  // each source's parts in model order, as errorModelVariance sums them
  const groups = ERROR_SOURCES.map((s) => parts.filter((p) => p.source === s));
  const sums = ERROR_SOURCES.map(() => new Float64Array(BLOCK));
  const [calibration, residual, mapping, input] = sums;
  const loading = new Float64Array(BLOCK), total = new Float64Array(n);
  for (let i0 = 0; i0 < n; i0 += BLOCK) {
    const i1 = Math.min(n, i0 + BLOCK), m = i1 - i0;
    for (let g = 0; g < groups.length; g++) {
      const out = sums[g];
      out.fill(0, 0, m);
      for (const part of groups[g]) {
        part.block(loading, i0, i1);
        for (let i = 0; i < m; i++) out[i] += loading[i] * loading[i];
      }
    }
    for (let i = 0; i < m; i++) {
      total[i0 + i] = 0 + calibration[i] + residual[i] + mapping[i] + input[i];
    }
  }
  return total;
}

/**
 * The values ŷ = xᵀβ, SDs √Var and intervals ŷ ∓ z·√Var of a reconstruction, on the
 * prediction-interval kernel (./prediction_interval_kernel.ts): the variance of
 * {@link proxyReconstructionVariance} and the values of `reconstructFromProxies`
 * (./proxy_reconstruction.ts) with the same operations in the same order, bit for bit, a block
 * of cells at a time in WebAssembly SIMD. Regressor arrays passed for several models (the
 * bands of one spectral model) are copied into the kernel once.
 *
 * @param kernel a kernel for `cells.days.length` cells
 * @param model the calibrated model
 * @param cells the cells
 * @param design the values used
 * @param regressors per term, the regressor in each cell ({@link designRegressors})
 * @param z the interval's quantile
 * @returns value, SD, lower and upper bound per cell (NaN where the cell has no value); null
 *   when the model has more parts than the kernel holds (then use the plain path)
 * @throws {InputError} as {@link proxyReconstructionErrorModel}
 * @example
 * ```ts
 * import { designRegressors, proxyReconstructionOnKernel } from "./proxy_reconstruction_errors.ts";
 * import { predictionIntervalKernel } from "./prediction_interval_kernel.ts";
 * import { reconstructFromProxies } from "./proxy_reconstruction.ts";
 * import assert from "node:assert/strict";
 * const model = { coefficients: [1360.8, 135], covariance: [[1e-4, 0], [0, 1]],
 *   terms: [{ role: "facular" as const, quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.15, rho: 0.6, stepDays: 1, backExtension: null };
 * const cells = { days: Float64Array.of(1, 31, 1), direct: [Float64Array.of(0.16, 0.17, NaN)],
 *   mappings: [null], sunspot: null };
 * const design = { source: Uint8Array.of(1, 1, 0), values: [Float64Array.of(0.16, 0.17, NaN)],
 *   mapped: [Uint8Array.of(0, 0, 0)] };
 * const k = predictionIntervalKernel(3);
 * if (k) {
 *   const r = proxyReconstructionOnKernel(k, model, cells, design,
 *     designRegressors(model, design), 1.96)!;
 *   const plain = reconstructFromProxies(model, cells, 1.96);
 *   assert.deepEqual([r.value, r.sd, r.upper], [plain.value, plain.sd, plain.upper]);
 * }
 * ```
 */
export function proxyReconstructionOnKernel(
  kernel: PredictionIntervalKernel,
  model: ReconstructionModel,
  cells: ReconstructionCells,
  design: ReconstructionDesign,
  regressors: readonly Float64Array[],
  z: number,
): { value: Float64Array; sd: Float64Array; lower: Float64Array; upper: Float64Array } | null {
  const n = cells.days.length;
  let shared = sharedByKernel.get(kernel);
  if (!shared || shared.days !== cells.days || shared.source !== design.source) {
    shared = sharedCells(cells.days, design.source);
    sharedByKernel.set(kernel, shared);
  }
  const parts = errorParts(model, cells, design, regressors, shared);
  // each source's parts in model order, as errorModelVariance sums them
  const groups = ERROR_SOURCES.map((s) => parts.filter((p) => p.source === s));
  const beta = model.coefficients;
  const bound = kernel.bind(
    groups.map((g) => g.map((p) => p.linear ?? null)),
    regressors,
    beta,
    design.source,
    z,
  );
  if (!bound) return null;
  const out = {
    value: new Float64Array(n),
    sd: new Float64Array(n),
    lower: new Float64Array(n),
    upper: new Float64Array(n),
  };
  const js = groups.flat().filter((p) => !p.linear);
  const scratch = js.map((_, j) => kernel.scratch(j));
  for (let i0 = 0; i0 < n; i0 += BLOCK) {
    const i1 = Math.min(n, i0 + BLOCK), m = i1 - i0;
    js.forEach((p, j) => p.block(scratch[j], i0, i1));
    kernel.cells(i0, m, out);
  }
  return out;
}

/**
 * What the parts of every model on the same cells and design share: the cells' common length
 * in days (NaN when they differ) and, per source code, the mask of its cells.
 */
interface SharedCells {
  days: Float64Array;
  source: Uint8Array;
  uniformDays: number;
  sourceMask(which: number): Uint8Array;
}

function sharedCells(days: Float64Array, source: Uint8Array): SharedCells {
  let uniformDays = days.length ? days[0] : NaN;
  for (let i = 1; i < days.length && uniformDays === uniformDays; i++) {
    if (days[i] !== uniformDays) uniformDays = NaN;
  }
  const masks = new Map<number, Uint8Array>();
  return {
    days,
    source,
    uniformDays,
    sourceMask(which) {
      let m = masks.get(which);
      if (!m) masks.set(which, m = source.map((s) => (s === which ? 1 : 0)));
      return m;
    },
  };
}

/** The cells shared by the models of one kernel (its latest cells and design). */
const sharedByKernel = new WeakMap<PredictionIntervalKernel, SharedCells>();

/**
 * One part of the error model, computed on demand: its loading on cells [i0, i1) written to
 * out[0 … i1 − i0), and for a process its lag-1 correlations over every cell.
 */
interface ErrorPart {
  source: ErrorSource;
  label: string;
  block(out: Float64Array, i0: number, i1: number): void;
  lag1?: () => Float64Array;
  /** The loading as a linear combination of whole-series columns, when it is one. */
  linear?: LinearLoading;
}

/** The parts of {@link proxyReconstructionErrorModel}, factors first, in model order. */
function errorParts(
  model: ReconstructionModel,
  cells: ReconstructionCells,
  design: ReconstructionDesign,
  regressors: readonly Float64Array[],
  shared?: SharedCells,
): ErrorPart[] {
  const n = cells.days.length, K = model.terms.length;
  const { source } = design;
  const parts: ErrorPart[] = [];
  // calibration: loadings Lᵀx, x = (1, x_1, …, x_K): column j is 0 + Σ_{a ≥ j} x_a·L[a][j],
  // added in that order (x_0 = 1 contributes L[0][0] itself), on the cells with a value
  const L = choleskyLower(model.covariance);
  for (let j = 0; j <= K; j++) {
    const terms = regressors.slice(Math.max(1, j) - 1);
    const weights = terms.map((_, a) => L[Math.max(1, j) + a][j]);
    const init = j === 0 ? 0 + L[0][0] : 0;
    parts.push({
      source: "calibration",
      label: `calibration coefficients, direction ${j + 1}`,
      block: (out, i0, i1) => maskedCombination(out, i0, i1, init, terms, weights, source, 1),
      linear: { init, xs: terms, cs: weights, mask: source, scale: 1 },
    });
  }
  // mappings: loadings β_k·s_k·Lᵀg, Lᵀg summed as above, on the cells where term k was mapped
  model.terms.forEach((t, k) => {
    const m = cells.mappings[k], mapped = design.mapped[k];
    if (!m || !cells.sunspot || !mapped.includes(1)) return;
    const Lc = mappingCholesky(m);
    const f = model.coefficients[k + 1] * proxyRegressorScale(t.role, model.psiReference);
    const p = m.coefficients.length;
    // the gradient of a linear mapping is (1, R): its constant column enters as the initial
    // term (0 + 1·Lc[0][0]) rather than as a column of ones
    const linear = m.form === "linear";
    const g = linear ? [cells.sunspot] : sunspotMappingDerivatives(m, cells.sunspot).gradient;
    for (let j = 0; j < p; j++) {
      const init = linear && j === 0 ? 0 + Lc[0][0] : 0;
      const from = linear ? Math.max(1, j) : j;
      const terms = g.slice(linear ? from - 1 : from);
      const weights = terms.map((_, a) => Lc[from + a][j]);
      parts.push({
        source: "mapping",
        label: `mapping of term ${k + 1} (${m.form}), parameter direction ${j + 1}`,
        block: (out, i0, i1) => maskedCombination(out, i0, i1, init, terms, weights, mapped, f),
        // a linear mapping's columns (the sunspot numbers) are the same for every model
        linear: linear ? { init, xs: terms, cs: weights, mask: mapped, scale: f } : undefined,
      });
    }
  });
  // residual processes: cell means of AR(1) processes, kept on their source's cells only
  const residual = (
    which: number,
    sd: number,
    rho: number,
    stepDays: number,
    label: string,
  ) => {
    // the process's parameters are checked now, as for the whole model
    ar1CellMeanSd(cells.days.subarray(0, 0), sd, rho, stepDays);
    let whole: Ar1CellMeans | null = null;
    // cells of one length have one SD: the loading is that SD on the source's cells (a
    // linear loading without columns, 1·(SD) = SD), computed as the blocks would compute it
    let linear: LinearLoading | undefined;
    if (shared && n > 0 && shared.uniformDays === shared.uniformDays) {
      const sd1 = new Float64Array(1);
      blockCellMeanSd(cells.days, 0, 1, sd, rho, stepDays, sd1);
      linear = { init: sd1[0], xs: [], cs: [], mask: shared.sourceMask(which), scale: 1 };
    }
    parts.push({
      source: "residual",
      label,
      linear,
      lag1: () => (whole ??= ar1CellMeans(cells.days, sd, rho, stepDays)).lag1,
      block: (out, i0, i1) => {
        // a cell's SD depends on its own length only: the block's equals the whole's
        if (whole) out.set(whole.sd.subarray(i0, i1));
        else blockCellMeanSd(cells.days, i0, i1, sd, rho, stepDays, out);
        for (let i = i0; i < i1; i++) if (source[i] !== which) out[i - i0] = 0;
      },
    });
  };
  residual(
    SOURCE_DIRECT,
    model.residualSd,
    model.rho,
    model.stepDays,
    "residual process of the model with observed proxies",
  );
  const be = model.backExtension;
  if (be && source.includes(SOURCE_BACK_EXTENDED)) {
    residual(
      SOURCE_BACK_EXTENDED,
      be.residualSd,
      be.rho,
      be.stepDays,
      "residual process of the model with proxies mapped from sunspot number",
    );
  }
  // the sunspot number's own error
  const u = cells.sunspotUncertainty;
  if (u && source.includes(SOURCE_BACK_EXTENDED)) {
    const sens = sunspotSensitivity(model, cells, design);
    const input = (values: Float64Array, label: string, lag1: () => Float64Array) =>
      parts.push({
        source: "input",
        label,
        lag1,
        block: (out, i0, i1) => {
          for (let i = i0; i < i1; i++) {
            const c = values[i];
            out[i - i0] = source[i] !== SOURCE_BACK_EXTENDED || sens[i] === 0
              ? 0
              : Number.isFinite(c)
              ? sens[i] * c
              : 0;
          }
        },
      });
    input(
      u.correlated,
      "sunspot number: error correlated over decades (scale)",
      () => scaleErrorLag1(cells.days, u.correlationYears),
    );
    input(
      u.independent,
      "sunspot number: error independent between values",
      () => new Float64Array(n),
    );
  }
  return parts;
}

/**
 * The SDs of {@link ar1CellMeanSd} on cells [i0, i1) into out[0 … i1 − i0); an invalid cell
 * length is reported as the whole series reports it (with its index in the series).
 */
function blockCellMeanSd(
  days: Float64Array,
  i0: number,
  i1: number,
  sd: number,
  rho: number,
  stepDays: number,
  out: Float64Array,
): void {
  try {
    ar1CellMeanSd(days.subarray(i0, i1), sd, rho, stepDays, out);
  } catch (e) {
    ar1CellMeanSd(days, sd, rho, stepDays);
    throw e;
  }
}

/** Cells per block of the loadings (a few columns of 2,048 doubles stay in cache). */
const BLOCK = PREDICTION_BLOCK;

/**
 * out[i − i0] = scale·(init + x_0[i]·c_0 + x_1[i]·c_1 + …), added in that order, where
 * mask[i] ≠ 0, and 0 elsewhere, for the cells i of one block [i0, i1).
 */
function maskedCombination(
  out: Float64Array,
  i0: number,
  i1: number,
  init: number,
  xs: readonly Float64Array[],
  cs: readonly number[],
  mask: Uint8Array,
  scale: number,
): void {
  const m = i1 - i0;
  // one and two columns (the usual terms and mapping parameters) in one pass per cell; the
  // operations on each cell are the same as the general passes below
  if (xs.length === 1) {
    const x = xs[0], c = cs[0];
    for (let i = 0; i < m; i++) {
      out[i] = mask[i0 + i] ? scale * (init + x[i0 + i] * c) : 0;
    }
    return;
  }
  if (xs.length === 2) {
    const x = xs[0], c = cs[0], y = xs[1], d = cs[1];
    for (let i = 0; i < m; i++) {
      out[i] = mask[i0 + i] ? scale * (init + x[i0 + i] * c + y[i0 + i] * d) : 0;
    }
    return;
  }
  out.fill(init, 0, m);
  for (let a = 0; a < xs.length; a++) {
    const x = xs[a], c = cs[a];
    for (let i = 0; i < m; i++) out[i] += x[i0 + i] * c;
  }
  for (let i = 0; i < m; i++) out[i] = mask[i0 + i] ? scale * out[i] : 0;
}
