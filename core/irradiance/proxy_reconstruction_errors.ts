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
import { ar1CellMeans } from "./ar1_cell_means.ts";
import { scaleErrorLag1 } from "./sunspot_number_uncertainty.ts";
import type {
  ErrorFactor,
  ErrorProcess,
  ReconstructionErrorModel,
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
  const n = cells.days.length, K = model.terms.length;
  const { source } = design;
  const factors: ErrorFactor[] = [];
  const processes: ErrorProcess[] = [];
  // calibration: loadings Lᵀx, x = (1, x_1, …, x_K): column j is 0 + Σ_{a ≥ j} x_a·L[a][j],
  // added in that order (x_0 = 1 contributes L[0][0] itself), on the cells with a value
  const L = choleskyLower(model.covariance);
  for (let j = 0; j <= K; j++) {
    const terms = regressors.slice(Math.max(1, j) - 1);
    const weights = terms.map((_, a) => L[Math.max(1, j) + a][j]);
    factors.push({
      source: "calibration",
      label: `calibration coefficients, direction ${j + 1}`,
      loading: maskedCombination(n, j === 0 ? 0 + L[0][0] : 0, terms, weights, source, 1),
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
      factors.push({
        source: "mapping",
        label: `mapping of term ${k + 1} (${m.form}), parameter direction ${j + 1}`,
        loading: maskedCombination(n, init, terms, weights, mapped, f),
      });
    }
  });
  // residual processes
  const residual = (
    which: number,
    sd: number,
    rho: number,
    stepDays: number,
    label: string,
  ) => {
    const cm = ar1CellMeans(cells.days, sd, rho, stepDays);
    const loading = cm.sd; // kept on this source's cells only
    for (let i = 0; i < n; i++) if (source[i] !== which) loading[i] = 0;
    processes.push({ source: "residual", label, loading, lag1: cm.lag1 });
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
    const correlated = new Float64Array(n), independent = new Float64Array(n);
    const lag1 = scaleErrorLag1(cells.days, u.correlationYears);
    for (let i = 0; i < n; i++) {
      if (source[i] !== SOURCE_BACK_EXTENDED || sens[i] === 0) continue;
      const c = u.correlated[i], d = u.independent[i];
      correlated[i] = Number.isFinite(c) ? sens[i] * c : 0;
      independent[i] = Number.isFinite(d) ? sens[i] * d : 0;
    }
    processes.push({
      source: "input",
      label: "sunspot number: error correlated over decades (scale)",
      loading: correlated,
      lag1,
    });
    processes.push({
      source: "input",
      label: "sunspot number: error independent between values",
      loading: independent,
      lag1: new Float64Array(n),
    });
  }
  return { cells: n, factors, processes };
}

/** Cells per block of {@link maskedCombination} (a few columns of 2,048 doubles stay in cache). */
const BLOCK = 2048;

/**
 * out[i] = scale·(init + x_0[i]·c_0 + x_1[i]·c_1 + …), added in that order, where mask[i] ≠ 0,
 * and 0 elsewhere; computed in blocks of cells so that each column is read once.
 */
function maskedCombination(
  n: number,
  init: number,
  xs: readonly Float64Array[],
  cs: readonly number[],
  mask: Uint8Array,
  scale: number,
): Float64Array {
  const out = new Float64Array(n);
  for (let i0 = 0; i0 < n; i0 += BLOCK) {
    const i1 = Math.min(n, i0 + BLOCK);
    out.fill(init, i0, i1);
    for (let a = 0; a < xs.length; a++) {
      const x = xs[a], c = cs[a];
      for (let i = i0; i < i1; i++) out[i] += x[i] * c;
    }
    for (let i = i0; i < i1; i++) out[i] = mask[i] ? scale * out[i] : 0;
  }
  return out;
}
