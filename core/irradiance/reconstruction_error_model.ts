/**
 * The first-order (linearised) error model of a proxy reconstruction, and what follows from it
 * analytically: the variance of each cell by source and the variance of a cell's difference
 * from the mean over a reference set of cells (the uncertainty of an anomaly or a forcing).
 *
 * The error of cell t is written as a sum of independent parts (delta method: e.g. Bevington &
 * Robinson 2003, Data Reduction and Error Analysis, 3rd ed., §3.2):
 *
 *   e(t) = Σ_j ℓ_j(t)·z_j + Σ_p L_p(t)·u_p(t)
 *
 * - factors z_j ~ N(0, 1), shared by every cell: the calibration coefficients (ℓ = Lᵀx with
 *   Σ_β = LLᵀ and x the cell's regressors) and the parameters of each sunspot → proxy mapping
 *   (ℓ = β_k·s_k·Lᵀg with g = ∂F/∂c at the cell's sunspot number);
 * - processes u_p, unit variance, correlated from one cell to the next by lag1_p(t) (so
 *   corr(u_p(s), u_p(t)) = Π lag1 over the cells between): the residual processes of the direct
 *   and of the back-extended model (core/irradiance/ar1_cell_means.ts), and the correlated and
 *   independent parts of the sunspot number's own error
 *   (core/irradiance/sunspot_number_uncertainty.ts) times the sensitivity Σ_k β_k·s_k·dF_k/dR.
 *
 * @module
 */
import { InputError } from "../errors.ts";

/** Cells per block of the variance sums (8 loadings of 2,048 doubles fit a 256 kB cache). */
const BLOCK = 2048;

/** The sources of uncertainty of a reconstruction, in the order results list them. */
export const ERROR_SOURCES = ["calibration", "residual", "mapping", "input"] as const;
/** One source of uncertainty. */
export type ErrorSource = typeof ERROR_SOURCES[number];

/** A shared standard-normal factor and its loading on every cell. */
export interface ErrorFactor {
  source: ErrorSource;
  /** What the factor is, e.g. "calibration coefficient direction 1". */
  label: string;
  /** ℓ(t), W m-2 per unit of the factor; 0 where the cell does not depend on it. */
  loading: Float64Array;
}

/** A unit-variance process over the cells, its loading and its lag-1 correlation. */
export interface ErrorProcess {
  source: ErrorSource;
  label: string;
  /** L(t), W m-2 (signed); 0 where the cell does not depend on it. */
  loading: Float64Array;
  /** Correlation of u(t) with u(t − 1) (0 for the first cell). */
  lag1: Float64Array;
}

/** The linearised error model of a reconstruction over its cells. */
export interface ReconstructionErrorModel {
  /** Number of cells. */
  cells: number;
  factors: ErrorFactor[];
  processes: ErrorProcess[];
}

function checkModel(em: ReconstructionErrorModel): void {
  const parts: { label: string; loading: Float64Array; lag1?: Float64Array }[] = [
    ...em.factors,
    ...em.processes,
  ];
  for (const part of parts) {
    if (part.loading.length !== em.cells || (part.lag1 && part.lag1.length !== em.cells)) {
      throw new InputError(
        `Cannot use the error model: part "${part.label}" does not have ${em.cells} cells`,
        { field: "errorModel", reason: "length_mismatch" },
      );
    }
  }
}

/**
 * The variance of each cell by source: Σ ℓ_j(t)² over the factors and Σ L_p(t)² over the
 * processes of that source, and their total.
 *
 * @param em the error model
 * @returns per source and in total, W² m-4 per cell
 * @throws {InputError} (field `errorModel`) when a part does not cover every cell
 * @example
 * ```ts
 * import { errorModelVariance } from "./reconstruction_error_model.ts";
 * import assert from "node:assert/strict";
 * const v = errorModelVariance({
 *   cells: 2,
 *   factors: [{ source: "calibration", label: "a", loading: Float64Array.of(0.3, 0.3) }],
 *   processes: [{ source: "residual", label: "r", loading: Float64Array.of(0.4, 0),
 *     lag1: Float64Array.of(0, 0.5) }],
 * });
 * assert.ok(Math.abs(v.total[0] - 0.25) < 1e-15);
 * assert.ok(Math.abs(v.bySource.calibration[1] - 0.09) < 1e-15);
 * ```
 */
export function errorModelVariance(
  em: ReconstructionErrorModel,
): { total: Float64Array; bySource: Record<ErrorSource, Float64Array> } {
  checkModel(em);
  const n = em.cells;
  const bySource = Object.fromEntries(
    ERROR_SOURCES.map((s) => [s, new Float64Array(n)]),
  ) as Record<ErrorSource, Float64Array>;
  // each source's loadings in model order; cells in blocks that stay in cache while every
  // loading of the block is squared and added (one read of each loading and one write of each
  // sum, where a pass per loading re-reads and re-writes the sums)
  const parts = [...em.factors, ...em.processes];
  const groups = ERROR_SOURCES.map((s) =>
    parts.filter((p) => p.source === s).map((p) => p.loading)
  );
  const total = new Float64Array(n);
  const { calibration, residual, mapping, input } = bySource;
  for (let i0 = 0; i0 < n; i0 += BLOCK) {
    const i1 = Math.min(n, i0 + BLOCK);
    for (let g = 0; g < groups.length; g++) {
      const out = bySource[ERROR_SOURCES[g]];
      for (const l of groups[g]) for (let i = i0; i < i1; i++) out[i] += l[i] * l[i];
    }
    // Σ over the sources in ERROR_SOURCES order, as ((0 + calibration) + residual) + …
    for (let i = i0; i < i1; i++) {
      total[i] = 0 + calibration[i] + residual[i] + mapping[i] + input[i];
    }
  }
  return { total, bySource };
}

/** Result of {@link differenceFromMeanVariance}. */
export interface DifferenceVariance {
  /** Var(e(t) − ē) per cell, ē the mean error over the reference cells. */
  variance: Float64Array;
  /** Var(ē). */
  meanVariance: number;
  /** Cov(e(t), ē) per cell. */
  covariance: Float64Array;
  /** Reference cells used. */
  count: number;
}

/**
 * The variance of each cell's difference from the mean over reference cells,
 * Var(x_t − m̄) = Var(x_t) + Var(m̄) − 2·Cov(x_t, m̄), with the covariances of the error model:
 * for a factor, Cov = ℓ(t)·ℓ̄; for a process, Cov(t, m̄) = L(t)/n·Σ_{s∈ref} L(s)·ρ(s, t) with
 * ρ the product of the lag-1 correlations between s and t, accumulated in one forward and one
 * backward pass (O(cells) per part). This is the uncertainty of an anomaly or a radiative
 * forcing relative to a reference period: errors shared with the reference (the quiet-Sun
 * level, a mapping's offset) cancel, and errors correlated with it over time partly cancel.
 *
 * @param em the error model
 * @param inReference per cell, true (or 1) where it belongs to the reference
 * @returns {@link DifferenceVariance}
 * @throws {InputError} (field `inReference`) when its length differs or it selects no cell;
 *   (field `errorModel`) as {@link errorModelVariance}
 * @example
 * ```ts
 * import { differenceFromMeanVariance } from "./reconstruction_error_model.ts";
 * import assert from "node:assert/strict";
 * // a shared offset cancels; independent noise adds the reference mean's variance
 * const d = differenceFromMeanVariance({
 *   cells: 3,
 *   factors: [{ source: "calibration", label: "offset", loading: Float64Array.of(1, 1, 1) }],
 *   processes: [{ source: "residual", label: "noise", loading: Float64Array.of(0.1, 0.1, 0.1),
 *     lag1: new Float64Array(3) }],
 * }, [1, 1, 0]);
 * assert.ok(Math.abs(d.variance[2] - (0.01 + 0.01 / 2)) < 1e-15);
 * assert.ok(Math.abs(d.variance[0] - (0.01 + 0.005 - 0.01)) < 1e-15);
 * ```
 */
export function differenceFromMeanVariance(
  em: ReconstructionErrorModel,
  inReference: ArrayLike<boolean | number>,
): DifferenceVariance {
  checkModel(em);
  const n = em.cells;
  if (inReference.length !== n) {
    throw new InputError(
      `Cannot compute the variance of differences: ${inReference.length} flags for ${n} cells`,
      { field: "inReference", reason: "length_mismatch", value: inReference.length },
    );
  }
  const ref = new Uint8Array(n);
  let count = 0;
  for (let i = 0; i < n; i++) if (inReference[i]) (ref[i] = 1), count++;
  if (count === 0) {
    throw new InputError("Cannot compute the variance of differences: no reference cell", {
      field: "inReference",
      reason: "empty",
    });
  }
  const variance = new Float64Array(n), covariance = new Float64Array(n);
  let meanVariance = 0;
  for (const f of em.factors) {
    let mean = 0;
    for (let i = 0; i < n; i++) if (ref[i]) mean += f.loading[i];
    mean /= count;
    meanVariance += mean * mean;
    for (let i = 0; i < n; i++) {
      const l = f.loading[i];
      variance[i] += l * l;
      covariance[i] += l * mean;
    }
  }
  const forward = new Float64Array(n), backward = new Float64Array(n);
  for (const p of em.processes) {
    const L = p.loading, r = p.lag1;
    let a = 0;
    for (let i = 0; i < n; i++) {
      a = (i === 0 ? 0 : r[i] * a) + (ref[i] ? L[i] : 0);
      forward[i] = a;
    }
    let b = 0;
    for (let i = n - 1; i >= 0; i--) {
      b = (i === n - 1 ? 0 : r[i + 1] * b) + (ref[i] ? L[i] : 0);
      backward[i] = b;
    }
    let mv = 0;
    for (let i = 0; i < n; i++) {
      const around = forward[i] + backward[i] - (ref[i] ? L[i] : 0);
      const c = (L[i] * around) / count;
      covariance[i] += c;
      variance[i] += L[i] * L[i];
      if (ref[i]) mv += c;
    }
    meanVariance += mv / count;
  }
  for (let i = 0; i < n; i++) {
    variance[i] = Math.max(0, variance[i] + meanVariance - 2 * covariance[i]);
  }
  return { variance, meanVariance, covariance, count };
}
