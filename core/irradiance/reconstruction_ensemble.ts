/**
 * Ensembles of a proxy reconstruction: seeded realisations drawn jointly from every source of
 * its error model (core/irradiance/proxy_reconstruction_errors.ts), but through the
 * reconstruction's own non-linear arithmetic rather than its linearisation:
 *
 * 1. the calibration coefficients β ~ N(β̂, Σ_β) (core/stats/multivariate_normal.ts);
 * 2. each sunspot → proxy mapping's parameters c ~ N(ĉ, Σ_c), redrawn while a saturating R0 is
 *    not positive (core/irradiance/back_extension.ts);
 * 3. the sunspot numbers R + σ_corr·u + σ_ind·ε, with u the unit process of the correlated
 *    (scale) error and ε independent (core/irradiance/sunspot_number_uncertainty.ts), floored at
 *    0 (a sunspot number cannot be negative);
 * 4. the residual processes of the direct and the back-extended model, as cell means
 *    (core/irradiance/ar1_cell_means.ts);
 *
 * then TSI = β₀ + Σ_k β_k·x_k(F_k) + e with the mapped proxies F_k = F(c_k, R) recomputed. A
 * member's stream is `randomStream(seed, member)`, so member m is the same whichever chunk or
 * worker draws it: the ensemble does not depend on the chunking (Monte Carlo with independent
 * streams per replicate, e.g. L'Ecuyer 2012, "Random number generation", in Handbook of
 * Computational Statistics, §5).
 *
 * @module
 */
import { InputError } from "../errors.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";
import { type RandomStream, randomStream } from "../random/mod.ts";
import { choleskyLower, drawMultivariateNormal } from "../stats/multivariate_normal.ts";
import { proxyRegressorScale } from "./proxy_model_evaluation.ts";
import { drawSunspotMappingCoefficients, mappingCholesky } from "./back_extension.ts";
import { ar1CellMeans } from "./ar1_cell_means.ts";
import { scaleErrorLag1 } from "./sunspot_number_uncertainty.ts";
import type { SunspotProxyMapping } from "./sunspot_proxy_mapping.ts";
import {
  type ReconstructionCells,
  reconstructionDesign,
  type ReconstructionModel,
  SOURCE_BACK_EXTENDED,
  SOURCE_DIRECT,
} from "./proxy_reconstruction.ts";

/** Most members one ensemble may have. */
export const MAX_REALIZATIONS = 1000;

/** A unit process drawn on its active cells only (the lag between them accumulated). */
export interface PlannedProcess {
  /** Active cells, increasing. */
  cells: Int32Array;
  /** SD at each active cell (in the units the process adds to). */
  sd: Float64Array;
  /** Correlation with the previous active cell (the product of lag-1 correlations between). */
  lag: Float64Array;
  /** √(1 − lag²), the innovation's share (1 at the first cell). */
  innovation: Float64Array;
}

/** Everything a member draw needs, computed once (plain data: it travels to workers). */
export interface ReconstructionEnsemblePlan {
  cells: number;
  coefficients: number[];
  coefficientsLower: number[][];
  /** Per term: scale and offset of the regressor, x = scale·F − offset (proxyRegressor). */
  termScale: number[];
  termOffset: number[];
  source: Uint8Array;
  /** Cells with every proxy observed, and back-extended cells. */
  directCells: Int32Array;
  backCells: Int32Array;
  /** Per term, true when it is mapped at every back-extended cell. */
  mappedEverywhere: boolean[];
  /** Per term, the direct value (NaN where mapped or no value). */
  direct: Float64Array[];
  mapped: Uint8Array[];
  mappings:
    ({ form: SunspotProxyMapping["form"]; coefficients: number[]; lower: number[][] } | null)[];
  sunspot: Float64Array | null;
  /** The sunspot number's correlated and independent errors, and the two residual processes. */
  inputCorrelated: PlannedProcess | null;
  inputIndependent: PlannedProcess | null;
  residualDirect: PlannedProcess;
  residualBack: PlannedProcess | null;
}

/** The active cells of a process with their SD and the lag-1 correlations chained across. */
function planProcess(
  active: (i: number) => boolean,
  sd: ArrayLike<number>,
  lag1: ArrayLike<number>,
  n: number,
): PlannedProcess {
  const idx: number[] = [];
  for (let i = 0; i < n; i++) if (active(i) && sd[i] > 0) idx.push(i);
  const cells = Int32Array.from(idx);
  const m = cells.length;
  const s = new Float64Array(m), lag = new Float64Array(m), innovation = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    s[j] = sd[cells[j]];
    innovation[j] = 1;
    if (j === 0) continue;
    let r = 1;
    for (let i = cells[j - 1] + 1; i <= cells[j]; i++) r *= lag1[i];
    lag[j] = r;
    innovation[j] = Math.sqrt(1 - r * r);
  }
  return { cells, sd: s, lag, innovation };
}

/**
 * Prepare the draws of an ensemble: the proxy values used, the Cholesky factors of the
 * coefficient and mapping covariances, and the processes on their active cells.
 *
 * @param model the calibrated model
 * @param cells the cells (with mappings, sunspot numbers and their uncertainty)
 * @returns the {@link ReconstructionEnsemblePlan}
 * @throws {InputError} as `reconstructionDesign`; (field `covariance` or `mapping`) when a
 *   covariance cannot be factored
 * @example
 * ```ts
 * import { drawReconstructionMembers, reconstructionEnsemblePlan } from "./reconstruction_ensemble.ts";
 * import assert from "node:assert/strict";
 * const plan = reconstructionEnsemblePlan({
 *   coefficients: [1360.8, 135], covariance: [[1e-4, 0], [0, 1]],
 *   terms: [{ role: "facular", quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.15, rho: 0.7, stepDays: 1, backExtension: null,
 * }, { days: Float64Array.of(1, 1), direct: [Float64Array.of(0.16, 0.17)], mappings: [null],
 *   sunspot: null });
 * const a = drawReconstructionMembers(plan, 7, 0, 3);
 * const b = drawReconstructionMembers(plan, 7, 2, 1);
 * assert.equal(a.length, 6);
 * assert.deepEqual(a.subarray(4, 6), b); // member 2 is the same in either chunk
 * ```
 */
export function reconstructionEnsemblePlan(
  model: ReconstructionModel,
  cells: ReconstructionCells,
): ReconstructionEnsemblePlan {
  const design = reconstructionDesign(model, cells);
  const n = cells.days.length, K = model.terms.length, { source } = design;
  const termScale = model.terms.map((t) => proxyRegressorScale(t.role, model.psiReference));
  const termOffset = model.terms.map((t) => (t.role === "sunspot_darkening" ? 0 : t.quietLevel));
  const direct = design.values.map((v, k) => v.map((x, i) => (design.mapped[k][i] ? NaN : x)));
  const anyBack = source.includes(SOURCE_BACK_EXTENDED);
  const mappings = cells.mappings.map((m, k) =>
    m && anyBack && design.mapped[k].includes(1)
      ? { form: m.form, coefficients: [...m.coefficients], lower: mappingCholesky(m) }
      : null
  );
  const rd = ar1CellMeans(cells.days, model.residualSd, model.rho, model.stepDays);
  const be = model.backExtension;
  const rb = be && anyBack ? ar1CellMeans(cells.days, be.residualSd, be.rho, be.stepDays) : null;
  const u = cells.sunspotUncertainty;
  let inputCorrelated: PlannedProcess | null = null, inputIndependent: PlannedProcess | null = null;
  if (u && anyBack) {
    const lag1 = scaleErrorLag1(cells.days, u.correlationYears);
    const back = (i: number) => source[i] === SOURCE_BACK_EXTENDED;
    const finite = (a: Float64Array) => a.map((v) => (Number.isFinite(v) ? v : 0));
    inputCorrelated = planProcess(back, finite(u.correlated), lag1, n);
    inputIndependent = planProcess(back, finite(u.independent), new Float64Array(n), n);
  }
  if (K === 0) {
    throw new InputError("Cannot plan an ensemble: the model has no terms", {
      field: "model",
      reason: "empty",
    });
  }
  return {
    cells: n,
    coefficients: [...model.coefficients],
    coefficientsLower: choleskyLower(model.covariance),
    termScale,
    termOffset,
    source,
    directCells: cellsOf(source, SOURCE_DIRECT),
    backCells: cellsOf(source, SOURCE_BACK_EXTENDED),
    mappedEverywhere: design.mapped.map((mk) =>
      source.every((src, i) => src !== SOURCE_BACK_EXTENDED || mk[i] === 1)
    ),
    direct,
    mapped: design.mapped,
    mappings,
    sunspot: anyBack && cells.sunspot ? Float64Array.from(cells.sunspot) : null,
    inputCorrelated,
    inputIndependent,
    residualDirect: planProcess((i) => source[i] === SOURCE_DIRECT, rd.sd, rd.lag1, n),
    residualBack: rb
      ? planProcess((i) => source[i] === SOURCE_BACK_EXTENDED, rb.sd, rb.lag1, n)
      : null,
  };
}

/** The cells of one source. */
function cellsOf(source: Uint8Array, code: number): Int32Array {
  const out: number[] = [];
  for (let i = 0; i < source.length; i++) if (source[i] === code) out.push(i);
  return Int32Array.from(out);
}

/**
 * Add a draw of a planned process to `out` at its active cells, from the standard normals
 * `z[at..]`: u_j = lag_j·u_{j−1} + innovation_j·z_j, out[cell_j] += sd_j·u_j.
 *
 * @param p the planned process (its active cells, SDs and chained lag-1 correlations)
 * @param z standard normals, at least `at` + active cells long
 * @param at index of the first normal used
 * @param out values per cell, added to
 * @returns the index of the first normal not used
 * @example
 * ```ts
 * import { addPlannedProcess } from "./reconstruction_ensemble.ts";
 * import assert from "node:assert/strict";
 * const p = { cells: Int32Array.of(1, 2), sd: Float64Array.of(2, 2),
 *   lag: Float64Array.of(0, 0.6), innovation: Float64Array.of(1, 0.8) };
 * const out = new Float64Array(3);
 * assert.equal(addPlannedProcess(p, Float64Array.of(9, 1, 1), 1, out), 3);
 * assert.deepEqual([...out], [0, 2, 2 * (0.6 + 0.8)]);
 * ```
 */
export function addPlannedProcess(
  p: PlannedProcess,
  z: Float64Array,
  at: number,
  out: Float64Array,
): number {
  const { cells, sd, lag, innovation } = p, m = cells.length;
  let u = 0;
  for (let j = 0; j < m; j++) {
    u = lag[j] * u + innovation[j] * z[at + j];
    out[cells[j]] += sd[j] * u;
  }
  return at + m;
}

/** Draw one member into `out` (length = cells), using `scratch` buffers. */
function drawMember(
  plan: ReconstructionEnsemblePlan,
  stream: RandomStream,
  out: Float64Array,
  scratch: { z: Float64Array; r: Float64Array | null; e: Float64Array },
): void {
  const n = plan.cells, K = plan.direct.length;
  const beta = drawMultivariateNormal(plan.coefficients, plan.coefficientsLower, stream);
  const c = plan.mappings.map((m) =>
    m
      ? drawSunspotMappingCoefficients(
        { form: m.form, coefficients: m.coefficients } as SunspotProxyMapping,
        m.lower,
        stream,
      )
      : null
  );
  const { z, e } = scratch;
  stream.fillNormal(z);
  e.fill(0);
  let at = 0;
  const R = scratch.r;
  if (R && plan.sunspot) {
    R.fill(0);
    if (plan.inputCorrelated) at = addPlannedProcess(plan.inputCorrelated, z, at, R);
    if (plan.inputIndependent) at = addPlannedProcess(plan.inputIndependent, z, at, R);
    const s = plan.sunspot;
    for (let i = 0; i < n; i++) {
      const v = s[i] + R[i];
      R[i] = v > 0 ? v : 0;
    }
  }
  at = addPlannedProcess(plan.residualDirect, z, at, e);
  if (plan.residualBack) addPlannedProcess(plan.residualBack, z, at, e);
  let base = beta[0];
  const slope = new Float64Array(K);
  for (let k = 0; k < K; k++) {
    slope[k] = beta[k + 1] * plan.termScale[k];
    base -= beta[k + 1] * plan.termOffset[k];
  }
  out.fill(NaN);
  // cells with every proxy observed: y = base + Σ slope_k·F_k + e
  const dc = plan.directCells;
  for (let j = 0; j < dc.length; j++) {
    const i = dc[j];
    let y = base + e[i];
    for (let k = 0; k < K; k++) y += slope[k] * plan.direct[k][i];
    out[i] = y;
  }
  const bc = plan.backCells;
  if (bc.length === 0) return;
  // back-extended cells: a linear mapping used everywhere folds into y = a + b·R; the others
  // (saturating, or a term observed at some back-extended cells) are evaluated per cell
  let a = base, b = 0;
  const perCell: number[] = [];
  for (let k = 0; k < K; k++) {
    const m = plan.mappings[k];
    if (m && m.form === "linear" && plan.mappedEverywhere[k]) {
      a += slope[k] * c[k]![0];
      b += slope[k] * c[k]![1];
    } else perCell.push(k);
  }
  for (let j = 0; j < bc.length; j++) {
    const i = bc[j], x = R![i];
    let y = a + b * x + e[i];
    for (const k of perCell) {
      let v: number;
      if (plan.mapped[k][i]) {
        const ck = c[k]!;
        v = plan.mappings[k]!.form === "linear"
          ? ck[0] + ck[1] * x
          : ck[0] + ck[1] * (ck[2] * -Math.expm1(-(x / ck[2])));
      } else v = plan.direct[k][i];
      y += slope[k] * v;
    }
    out[i] = y;
  }
}

/** Normals one member consumes in bulk. */
function bulkNormals(plan: ReconstructionEnsemblePlan): number {
  return [plan.inputCorrelated, plan.inputIndependent, plan.residualDirect, plan.residualBack]
    .reduce((s, p) => s + (p ? p.cells.length : 0), 0);
}

/**
 * Draw members `first .. first + count − 1` of the ensemble of `plan` with `seed`: member m
 * uses the stream `randomStream(seed, m)`, so any split of the members into chunks gives the
 * same numbers.
 *
 * @param plan from {@link reconstructionEnsemblePlan}
 * @param seed the ensemble's seed, an integer in [0, 2^32)
 * @param first index of the first member (≥ 0)
 * @param count members to draw (≥ 0)
 * @param options `shouldStop`, polled before every member
 * @returns count × cells values, member by member (member-major), W m-2; NaN where a cell has
 *   no value
 * @throws {InputError} (field `first` or `count`) when not non-negative integers or beyond
 *   2^32 members; (field `mapping`) when a saturating mapping has no admissible draw
 * @throws {StoppedError} when `shouldStop` answers true
 * @example
 * ```ts
 * import { drawReconstructionMembers, reconstructionEnsemblePlan } from "./reconstruction_ensemble.ts";
 * import assert from "node:assert/strict";
 * const plan = reconstructionEnsemblePlan({
 *   coefficients: [1360.8, 135], covariance: [[1e-4, 0], [0, 1]],
 *   terms: [{ role: "facular", quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.15, rho: 0.7, stepDays: 1, backExtension: null,
 * }, { days: Float64Array.of(1), direct: [Float64Array.of(0.16)], mappings: [null], sunspot: null });
 * const m = drawReconstructionMembers(plan, 1, 0, 4000);
 * const mean = m.reduce((s, v) => s + v, 0) / m.length;
 * const sd = Math.sqrt(m.reduce((s, v) => s + (v - mean) ** 2, 0) / (m.length - 1));
 * // √(σ_S² + (0.01·1)² + σ_e²) = √(1e-4 + 1e-4 + 0.0225) = 0.1507
 * assert.ok(Math.abs(mean - 1362.15) < 0.01 && Math.abs(sd - 0.1507) < 0.006);
 * ```
 */
export function drawReconstructionMembers(
  plan: ReconstructionEnsemblePlan,
  seed: number,
  first: number,
  count: number,
  options: StopOptions = {},
): Float64Array {
  for (const [field, v] of [["first", first], ["count", count]] as const) {
    if (!Number.isInteger(v) || v < 0 || first + count > 2 ** 32) {
      throw new InputError(`Cannot draw members: ${field} must be a non-negative integer`, {
        field,
        reason: "out_of_range",
        value: v,
      });
    }
  }
  const n = plan.cells;
  const out = new Float64Array(count * n);
  const scratch = {
    z: new Float64Array(bulkNormals(plan)),
    r: plan.sunspot ? new Float64Array(n) : null,
    e: new Float64Array(n),
  };
  for (let m = 0; m < count; m++) {
    throwIfStopped(options, "draw ensemble members");
    drawMember(plan, randomStream(seed, first + m), out.subarray(m * n, (m + 1) * n), scratch);
  }
  return out;
}

/** Input of the worker task {@link reconstructionEnsembleChunk}. */
export interface ReconstructionEnsembleChunk {
  plan: ReconstructionEnsemblePlan;
  seed: number;
  first: number;
  count: number;
}

/**
 * One chunk of members as a worker task: {@link drawReconstructionMembers} of its input.
 *
 * @param input the plan, seed and member range
 * @param control `shouldStop`, polled before every member
 * @returns the members, member-major
 * @throws {StoppedError} when `shouldStop` answers true
 * @example
 * ```ts
 * import { reconstructionEnsembleChunk, reconstructionEnsemblePlan } from "./reconstruction_ensemble.ts";
 * import assert from "node:assert/strict";
 * const plan = reconstructionEnsemblePlan({
 *   coefficients: [1360.8, 135], covariance: [[1e-4, 0], [0, 1]],
 *   terms: [{ role: "facular", quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.15, rho: 0.7, stepDays: 1, backExtension: null,
 * }, { days: Float64Array.of(1), direct: [Float64Array.of(0.16)], mappings: [null], sunspot: null });
 * assert.equal(reconstructionEnsembleChunk({ plan, seed: 1, first: 0, count: 2 }).length, 2);
 * ```
 */
export function reconstructionEnsembleChunk(
  input: ReconstructionEnsembleChunk,
  control: StopOptions = {},
): Float64Array {
  return drawReconstructionMembers(input.plan, input.seed, input.first, input.count, control);
}
