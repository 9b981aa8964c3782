/**
 * Ensembles of a spectral reconstruction: seeded realisations of every band of a spectral
 * model (core/irradiance/spectral_band_models.ts) drawn jointly, so that the bands of one
 * member share what they truly share and are correlated where their errors are:
 *
 * 1. per member, the sunspot numbers R + σ_corr·u + σ_ind·ε (floored at 0) and each sunspot →
 *    proxy mapping's parameters c ~ N(ĉ, Σ_c) are drawn ONCE and used by every band (they are
 *    the same inputs; the draws of core/irradiance/reconstruction_ensemble.ts);
 * 2. the calibration coefficients of all bands jointly, with the cross-band covariance of
 *    seemingly unrelated regressions with a common design (Zellner 1962, J. Am. Stat. Assoc.
 *    57, 348): Cov(β_a, β_b) = r_ab·S_a^½·S_b^½, which for S_a = σ_a²(XᵀX)⁻¹ is
 *    r_ab·σ_a·σ_b·(XᵀX)⁻¹. Drawn as β_a = β̂_a + S_a^½·ξ_a with, for each coefficient index k,
 *    (ξ_1k … ξ_Bk) = L_r·z_k, L_r the Cholesky factor of the residual correlation r: exactly the
 *    covariance {@link integrateBandModels} gives an integral;
 * 3. the residual processes of the bands (the direct model's on cells with every proxy, the
 *    back-extension's on back-extended cells) as a first-order vector autoregression with
 *    diagonal lags (Lütkepohl 2005, New Introduction to Multiple Time Series Analysis, §2.1):
 *    u_a(t) = ℓ_a(t)·u_a(t−1) + √(1 − ℓ_a(t)²)·η_a(t), η(t) = L_C·z(t), u(first) = L_r·z. Each
 *    band is marginally the AR(1) cell-mean process of core/irradiance/ar1_cell_means.ts, as
 *    in a TSI ensemble; the innovations' correlation C_ab = r_ab(1 − ℓ_aℓ_b)/√((1 − ℓ_a²)(1 −
 *    ℓ_b²)) makes the stationary lag-0 correlation of the bands equal r_ab (the covariance
 *    equation Σ = AΣA + Q of a VAR(1), Lütkepohl §2.1.4) for cells of one length; the lags ℓ
 *    are those of the most common cell length. A C that is not positive semi-definite (bands
 *    whose autocorrelations differ too much for r to be reachable) has its negative eigenvalues
 *    raised to 0 and its diagonal rescaled to 1, and the plan says so (`adjusted`).
 *
 * A band value is then S_a = β_a0 + Σ_k β_ak·x_k(F_k) + e_a with the mapped proxies F_k(c, R) of
 * the member. A member of an integral over wavelength is the weighted sum of the member's bands
 * ({@link integrateBandMembers}), so integrals follow the bands exactly. Member m draws from
 * `randomStream(seed, m)` whatever the chunking or the number of workers (independent
 * streams per replicate: L'Ecuyer 2012, "Random number generation", Handbook of Computational
 * Statistics, §5).
 *
 * Cost per member: B²/2 multiply-adds per cell for the correlated innovations (formed in blocks
 * of days by the WebAssembly SIMD kernel of ./lower_triangular_mixing.ts, bit-identical to a
 * plain loop), plus B·(K + 1) for the band values (B bands, K proxy terms).
 *
 * @module
 */
import { CholeskyDecomposition, EigenvalueDecomposition, Matrix } from "ml-matrix";
import { InputError } from "../errors.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";
import { type RandomStream, randomStream } from "../random/mod.ts";
import { drawSunspotMappingCoefficients } from "./back_extension.ts";
import { ar1CellMeans } from "./ar1_cell_means.ts";
import { type LowerTriangularMixer, lowerTriangularMixer } from "./lower_triangular_mixing.ts";
import type { SunspotProxyMapping } from "./sunspot_proxy_mapping.ts";
import type { ReconstructionCells, ReconstructionModel } from "./proxy_reconstruction.ts";
import {
  addPlannedProcess,
  type PlannedProcess,
  reconstructionEnsemblePlan,
} from "./reconstruction_ensemble.ts";
import { type BandCorrelations, symmetricSquareRoot } from "./spectral_band_models.ts";

/** The residual processes of all bands on their active cells (plain data). */
export interface BandProcessPlan {
  /** Active cells, increasing. */
  cells: Int32Array;
  /** Per active cell, its kind: the cell lengths since the previous active cell. */
  kind: Int32Array;
  /** Per kind × band: SD of the cell mean, chained lag to the previous active cell, √(1 − lag²). */
  sd: Float64Array;
  lag: Float64Array;
  innovation: Float64Array;
  /** Lower Cholesky factors (B × B, row-major) of the start correlation r and of the innovations' C. */
  lowerStart: Float64Array;
  lowerStep: Float64Array;
}

/** Everything a member draw of the bands needs, computed once (plain data: it travels to workers). */
export interface SpectralBandEnsemblePlan {
  bands: number;
  cells: number;
  /** Per band, its coefficients β̂ (B × p, band-major). */
  coefficients: Float64Array;
  /** Per band, the symmetric square root of its coefficient covariance (B × p × p). */
  coefficientRoots: Float64Array;
  /** Lower Cholesky factor of the bands' residual correlation (B × B), for the coefficients. */
  coefficientLower: Float64Array;
  termScale: number[];
  termOffset: number[];
  source: Uint8Array;
  directCells: Int32Array;
  backCells: Int32Array;
  /** Per term, the direct value (NaN where mapped or no value) and where it is mapped. */
  direct: Float64Array[];
  mapped: Uint8Array[];
  mappings:
    ({ form: SunspotProxyMapping["form"]; coefficients: number[]; lower: number[][] } | null)[];
  sunspot: Float64Array | null;
  inputCorrelated: PlannedProcess | null;
  inputIndependent: PlannedProcess | null;
  residualDirect: BandProcessPlan;
  residualBack: BandProcessPlan | null;
  /** What was adjusted to make a correlation matrix usable (empty when nothing was). */
  adjusted: string[];
}

/**
 * Prepare the joint draws of several band models on the same cells: the design (which proxy
 * value each cell uses, shared by every band), the factors of the bands' coefficient
 * covariances and of their residual correlations, and the band processes by kind of cell.
 *
 * @param models per band, its model: same terms, quiet levels and S_ref; either every band has
 *   a back-extension residual process or none has
 * @param cells the cells (with mappings, sunspot numbers and their uncertainty)
 * @param correlations the bands' residual correlations (lag 0 is used); null = independent
 *   bands (said in `adjusted`)
 * @returns the {@link SpectralBandEnsemblePlan}
 * @throws {InputError} (field `models`) when there is no band or the bands' terms or
 *   back-extension availability differ; (field `correlations`) when a correlation matrix is not
 *   B × B or not finite; as `reconstructionEnsemblePlan`
 * @example
 * ```ts
 * import { drawSpectralBandMembers, spectralBandEnsemblePlan } from "./spectral_band_ensemble.ts";
 * import assert from "node:assert/strict";
 * const band = (c: number, a: number) => ({
 *   coefficients: [c, a], covariance: [[1e-6, 0], [0, 1e-2]],
 *   terms: [{ role: "facular" as const, quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.01, rho: 0.5, stepDays: 1, backExtension: null,
 * });
 * const r = [[1, 0.8], [0.8, 1]];
 * const plan = spectralBandEnsemblePlan([band(0.5, 20), band(1.8, 2)], {
 *   days: Float64Array.of(1, 1, 1), direct: [Float64Array.of(0.16, 0.16, 0.17)], mappings: [null],
 *   sunspot: null,
 * }, { residual: { lag0: r, lag1: r }, backExtension: null });
 * const m = drawSpectralBandMembers(plan, 7, 0, 2); // 2 members × 3 cells × 2 bands
 * assert.equal(m.length, 12);
 * assert.deepEqual(m.subarray(6), drawSpectralBandMembers(plan, 7, 1, 1)); // chunking-free
 * ```
 */
export function spectralBandEnsemblePlan(
  models: readonly ReconstructionModel[],
  cells: ReconstructionCells,
  correlations: BandCorrelations | null,
): SpectralBandEnsemblePlan {
  const B = models.length;
  if (B === 0) {
    throw new InputError("Cannot plan a spectral ensemble: no band", {
      field: "models",
      reason: "empty",
    });
  }
  const first = models[0];
  const p = first.coefficients.length;
  models.forEach((m, b) => {
    const same = m.coefficients.length === p && m.psiReference === first.psiReference &&
      m.terms.length === first.terms.length &&
      m.terms.every((t, k) =>
        t.role === first.terms[k].role && t.quietLevel === first.terms[k].quietLevel
      ) && (m.backExtension === null) === (first.backExtension === null);
    if (!same) {
      throw new InputError(
        `Cannot plan a spectral ensemble: band ${b} has other terms, quiet levels or back-extension than band 0`,
        { field: "models", reason: "invalid", index: b },
      );
    }
  });
  // the shared part (design, mappings, sunspot-number processes) is the TSI plan's for band 0
  const base = reconstructionEnsemblePlan(first, cells);
  const adjusted: string[] = [];
  const identity = Array.from(
    { length: B },
    (_, a) => Array.from({ length: B }, (_, b) => +(a === b)),
  );
  if (!correlations) {
    adjusted.push("no cross-band residual correlation: bands drawn independently");
  }
  const r0 = correlations ? checkCorrelation(correlations.residual.lag0, B, "residual") : identity;
  const rb = correlations?.backExtension
    ? checkCorrelation(correlations.backExtension.lag0, B, "backExtension")
    : r0;
  if (correlations && !correlations.backExtension && first.backExtension) {
    adjusted.push(
      "no cross-band correlation of the back-extension residuals: the direct model's used",
    );
  }
  const coefficientLower = correlationLower(r0, "residual correlation", adjusted);
  const coefficients = new Float64Array(B * p), coefficientRoots = new Float64Array(B * p * p);
  models.forEach((m, b) => {
    coefficients.set(m.coefficients, b * p);
    coefficientRoots.set(symmetricSquareRoot(m.covariance).flat(), b * p * p);
  });
  const n = cells.days.length;
  const processOf = (
    active: Int32Array,
    process: (m: ReconstructionModel) => { residualSd: number; rho: number; stepDays: number },
    r: number[][],
    label: string,
  ) => bandProcessPlan(cells.days, active, models.map(process), r, label, adjusted);
  return {
    bands: B,
    cells: n,
    coefficients,
    coefficientRoots,
    coefficientLower,
    termScale: base.termScale,
    termOffset: base.termOffset,
    source: base.source,
    directCells: base.directCells,
    backCells: base.backCells,
    direct: base.direct,
    mapped: base.mapped,
    mappings: base.mappings,
    sunspot: base.sunspot,
    inputCorrelated: base.inputCorrelated,
    inputIndependent: base.inputIndependent,
    residualDirect: processOf(base.directCells, (m) => m, r0, "residual"),
    residualBack: base.backCells.length && first.backExtension
      ? processOf(base.backCells, (m) => m.backExtension!, rb, "back-extension residual")
      : null,
    adjusted,
  };
}

/** A B × B correlation matrix of finite numbers, symmetrised. */
function checkCorrelation(r: readonly (readonly number[])[], B: number, which: string): number[][] {
  if (r.length !== B || !r.every((row) => row.length === B && row.every(Number.isFinite))) {
    throw new InputError(
      `Cannot plan a spectral ensemble: the ${which} correlation must be ${B} × ${B} finite numbers`,
      { field: "correlations", reason: "length_mismatch", value: r.length },
    );
  }
  return r.map((row, a) => row.map((v, b) => (a === b ? 1 : (v + r[b][a]) / 2)));
}

/**
 * The lower Cholesky factor (row-major) of a correlation matrix; one that is not positive
 * definite gets its eigenvalues raised to at least 1e-10 and its diagonal rescaled to 1 first
 * (noted in `adjusted`).
 */
function correlationLower(r: number[][], label: string, adjusted: string[]): Float64Array {
  const B = r.length;
  let m = new Matrix(r);
  let chol = new CholeskyDecomposition(m);
  if (!chol.isPositiveDefinite()) {
    const e = new EigenvalueDecomposition(m, { assumeSymmetric: true });
    const V = e.eigenvectorMatrix.to2DArray();
    const lam = e.realEigenvalues.map((v) => Math.max(v, 1e-10));
    const fixed = Array.from({ length: B }, (_, a) =>
      Array.from({ length: B }, (_, b) => {
        let s = 0;
        for (let k = 0; k < B; k++) s += V[a][k] * lam[k] * V[b][k];
        return s;
      }));
    const d = fixed.map((row, a) => Math.sqrt(row[a]));
    m = new Matrix(fixed.map((row, a) => row.map((v, b) => v / (d[a] * d[b]))));
    chol = new CholeskyDecomposition(m);
    adjusted.push(
      `the ${label} matrix was not positive definite: smallest eigenvalue ${
        Math.min(...e.realEigenvalues).toPrecision(3)
      } raised to 1e-10 and the diagonal rescaled to 1`,
    );
  }
  return Float64Array.from(chol.lowerTriangularMatrix.to2DArray().flat());
}

/** The bands' residual process on the active cells, by kind of cell. */
function bandProcessPlan(
  days: Float64Array,
  active: Int32Array,
  params: { residualSd: number; rho: number; stepDays: number }[],
  r: number[][],
  label: string,
  adjusted: string[],
): BandProcessPlan {
  const B = params.length, m = active.length;
  // a kind is the run of cell lengths from the previous active cell to this one
  const keys = new Map<string, number>();
  const runs: number[][] = [];
  const kind = new Int32Array(m), counts: number[] = [];
  for (let j = 0; j < m; j++) {
    const run = j === 0 ? [days[active[0]]] : Array.from(
      { length: active[j] - active[j - 1] + 1 },
      (_, k) => days[active[j - 1] + k],
    );
    const key = (j === 0 ? "start:" : "") + run.join(",");
    let k = keys.get(key);
    if (k === undefined) {
      keys.set(key, k = runs.length);
      runs.push(run);
      counts.push(0);
    }
    kind[j] = k;
    counts[k]++;
  }
  const K = runs.length;
  const sd = new Float64Array(K * B), lag = new Float64Array(K * B);
  const innovation = new Float64Array(K * B);
  runs.forEach((run, k) => {
    const start = m > 0 && k === kind[0]; // only the first active cell has the start kind
    params.forEach((q, b) => {
      const cm = ar1CellMeans(run, q.residualSd, q.rho, q.stepDays);
      let l = 1;
      for (let i = 1; i < run.length; i++) l *= cm.lag1[i];
      if (start) l = 0;
      sd[k * B + b] = cm.sd[run.length - 1];
      lag[k * B + b] = l;
      innovation[k * B + b] = Math.sqrt(Math.max(0, 1 - l * l));
    });
  });
  const lowerStart = correlationLower(r, `${label} correlation`, adjusted);
  // the innovations' correlation for the most common kind after the start
  let common = -1;
  for (let k = 0; k < K; k++) {
    if (k !== kind[0] && (common < 0 || counts[k] > counts[common])) common = k;
  }
  let lowerStep = lowerStart;
  if (common >= 0) {
    const c = r.map((row, a) =>
      row.map((v, b) => {
        if (a === b) return 1;
        const la = lag[common * B + a], lb = lag[common * B + b];
        const ia = innovation[common * B + a], ib = innovation[common * B + b];
        return ia * ib > 1e-12 ? (v * (1 - la * lb)) / (ia * ib) : v;
      })
    );
    lowerStep = correlationLower(c, `${label} innovation correlation`, adjusted);
  }
  return { cells: active, kind, sd, lag, innovation, lowerStart, lowerStep };
}

/** Days per block of mixed innovations (64 days of 100 bands: 51 kB of z and of e, in cache). */
const MIX_DAYS = 64;

/** Scratch buffers of a member draw. */
interface Scratch {
  z: Float64Array;
  zc: Float64Array;
  r: Float64Array | null;
  u: Float64Array;
  zb: Float64Array;
  beta: Float64Array;
  slope: Float64Array;
  base: Float64Array;
  v: Float64Array;
  /** The innovations' mixers of the direct and back-extension residual processes. */
  mixDirect: LowerTriangularMixer;
  mixBack: LowerTriangularMixer | null;
}

/**
 * Write the bands' residual process into `out` (cells × B) at its active cells. The start is
 * drawn with the start factor; the innovations L·z of the following cells are formed in blocks
 * of days by `mixer` (./lower_triangular_mixing.ts: the same sums in the same order as one cell
 * at a time, so the numbers do not depend on the blocking or the engine), then run through
 * each band's recursion.
 */
function drawBandProcess(
  p: BandProcessPlan,
  B: number,
  stream: RandomStream,
  out: Float64Array,
  s: Scratch,
  mixer: LowerTriangularMixer,
): void {
  const { cells, kind, sd, lag, innovation } = p;
  const u = s.u, z = s.zb, m = cells.length;
  if (m === 0) return;
  // the stationary start
  stream.fillNormal(z, 0, B);
  const L0 = p.lowerStart, at0 = cells[0] * B, k0 = kind[0] * B;
  for (let a = 0; a < B; a++) {
    const row = a * B;
    let e = 0;
    for (let c = 0; c <= a; c++) e += L0[row + c] * z[c];
    const o = k0 + a;
    const ua = lag[o] * u[a] + innovation[o] * e;
    u[a] = ua;
    out[at0 + a] = sd[o] * ua;
  }
  const { z: zm, e: em, stride, maxDays } = mixer;
  for (let j = 1; j < m; j += maxDays) {
    const days = Math.min(maxDays, m - j);
    stream.fillNormal(zm, 0, days * B);
    mixer.mix(days);
    for (let t = 0; t < days; t++) {
      const at = cells[j + t] * B, k = kind[j + t] * B, et = t * stride;
      for (let a = 0; a < B; a++) {
        const o = k + a;
        const ua = lag[o] * u[a] + innovation[o] * em[et + a];
        u[a] = ua;
        out[at + a] = sd[o] * ua;
      }
    }
  }
}

/** Draw one member into `out` (cells × B, cell-major). */
function drawBandMember(
  plan: SpectralBandEnsemblePlan,
  stream: RandomStream,
  out: Float64Array,
  s: Scratch,
): void {
  const B = plan.bands, n = plan.cells, K = plan.termScale.length, p = K + 1;
  // 1. the coefficients of all bands, correlated across bands for each coefficient index
  stream.fillNormal(s.zc);
  const L = plan.coefficientLower, beta = s.beta;
  beta.set(plan.coefficients);
  for (let k = 0; k < p; k++) {
    for (let a = 0; a < B; a++) {
      let xi = 0;
      for (let c = 0; c <= a; c++) xi += L[a * B + c] * s.zc[k * B + c];
      // β_a += S_a^½[:, k]·ξ_ak (column k of the symmetric root)
      const root = a * p * p;
      for (let i = 0; i < p; i++) beta[a * p + i] += plan.coefficientRoots[root + i * p + k] * xi;
    }
  }
  for (let a = 0; a < B; a++) {
    let b0 = beta[a * p];
    for (let k = 0; k < K; k++) {
      s.slope[a * K + k] = beta[a * p + k + 1] * plan.termScale[k];
      b0 -= beta[a * p + k + 1] * plan.termOffset[k];
    }
    s.base[a] = b0;
  }
  // 2. the mappings' parameters and the sunspot numbers, once for every band
  const c = plan.mappings.map((m) =>
    m
      ? drawSunspotMappingCoefficients(
        { form: m.form, coefficients: m.coefficients } as SunspotProxyMapping,
        m.lower,
        stream,
      )
      : null
  );
  const R = s.r;
  if (R && plan.sunspot) {
    stream.fillNormal(s.z);
    R.fill(0);
    let at = 0;
    if (plan.inputCorrelated) at = addPlannedProcess(plan.inputCorrelated, s.z, at, R);
    if (plan.inputIndependent) addPlannedProcess(plan.inputIndependent, s.z, at, R);
    const ss = plan.sunspot;
    for (let i = 0; i < n; i++) {
      const v = ss[i] + R[i];
      R[i] = v > 0 ? v : 0;
    }
  }
  // 3. the residual processes, correlated across bands
  out.fill(NaN);
  s.u.fill(0);
  drawBandProcess(plan.residualDirect, B, stream, out, s, s.mixDirect);
  if (plan.residualBack) {
    s.u.fill(0);
    drawBandProcess(plan.residualBack, B, stream, out, s, s.mixBack!);
  }
  // 4. the band values: S_a = base_a + Σ_k slope_ak·F_k + e_a
  const dc = plan.directCells, slope = s.slope, b0 = s.base, v = s.v;
  for (let j = 0; j < dc.length; j++) {
    const i = dc[j];
    for (let k = 0; k < K; k++) v[k] = plan.direct[k][i];
    const at = i * B;
    for (let a = 0; a < B; a++) {
      let y = b0[a];
      for (let k = 0; k < K; k++) y += slope[a * K + k] * v[k];
      out[at + a] += y;
    }
  }
  const bc = plan.backCells;
  if (!plan.residualBack) return;
  for (let j = 0; j < bc.length; j++) {
    const i = bc[j], x = R ? R[i] : NaN;
    for (let k = 0; k < K; k++) {
      if (plan.mapped[k][i]) {
        const ck = c[k]!;
        v[k] = plan.mappings[k]!.form === "linear"
          ? ck[0] + ck[1] * x
          : ck[0] + ck[1] * (ck[2] * -Math.expm1(-(x / ck[2])));
      } else v[k] = plan.direct[k][i];
    }
    const at = i * B;
    for (let a = 0; a < B; a++) {
      let y = b0[a];
      for (let k = 0; k < K; k++) y += slope[a * K + k] * v[k];
      out[at + a] += y;
    }
  }
}

/**
 * Draw members `first .. first + count − 1` of the spectral ensemble of `plan` with `seed`:
 * member m uses the stream `randomStream(seed, m)`, so any split into chunks gives the same
 * numbers.
 *
 * @param plan from {@link spectralBandEnsemblePlan}
 * @param seed the ensemble's seed, an integer in [0, 2^32)
 * @param first index of the first member (≥ 0)
 * @param count members to draw (≥ 0)
 * @param options `shouldStop`, polled before every member (a stop throws StoppedError,
 *   core/stop_signal.ts); `into`, an array of count × cells × bands values to write the members
 *   into instead of a new one (a caller that streams members one at a time reuses one buffer)
 * @returns count × cells × bands values (`into` when given) (member, then cell, then band: value of band b at cell
 *   i of member m at [(m·cells + i)·bands + b]), in the bands' units; NaN where a cell has no
 *   value
 * @throws {InputError} (field `first` or `count`) when not non-negative integers or beyond
 *   2^32 members; (field `into`) when `into` does not hold count × cells × bands values;
 *   (field `mapping`) when a saturating mapping has no admissible draw
 * @example
 * ```ts
 * import { drawSpectralBandMembers, spectralBandEnsemblePlan } from "./spectral_band_ensemble.ts";
 * import assert from "node:assert/strict";
 * const band = (c: number) => ({
 *   coefficients: [c, 0], covariance: [[0, 0], [0, 0]],
 *   terms: [{ role: "facular" as const, quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 1, rho: 0, stepDays: 1, backExtension: null,
 * });
 * const r = [[1, -0.9], [-0.9, 1]];
 * const plan = spectralBandEnsemblePlan([band(0), band(0)], {
 *   days: Float64Array.of(1), direct: [Float64Array.of(0.15)], mappings: [null], sunspot: null,
 * }, { residual: { lag0: r, lag1: r }, backExtension: null });
 * const m = drawSpectralBandMembers(plan, 3, 0, 4000);
 * let c = 0;
 * for (let j = 0; j < 4000; j++) c += m[2 * j] * m[2 * j + 1] / 4000;
 * assert.ok(Math.abs(c + 0.9) < 0.05); // the bands' errors are correlated as the model says
 * ```
 */
export function drawSpectralBandMembers(
  plan: SpectralBandEnsemblePlan,
  seed: number,
  first: number,
  count: number,
  options: SpectralDrawOptions = {},
): Float64Array {
  for (const [field, v] of [["first", first], ["count", count]] as const) {
    if (!Number.isInteger(v) || v < 0 || first + count > 2 ** 32) {
      throw new InputError(
        `Cannot draw spectral members: ${field} must be a non-negative integer`,
        { field, reason: "out_of_range", value: v },
      );
    }
  }
  const B = plan.bands, n = plan.cells, K = plan.termScale.length;
  const inputCells = (plan.inputCorrelated?.cells.length ?? 0) +
    (plan.inputIndependent?.cells.length ?? 0);
  const into = options.into;
  if (into && into.length !== count * n * B) {
    throw new InputError(
      `Cannot draw spectral members: into holds ${into.length} values, not ${count} × ${n} × ${B}`,
      { field: "into", reason: "length_mismatch", value: into.length },
    );
  }
  const out = into ?? new Float64Array(count * n * B);
  const s: Scratch = {
    z: new Float64Array(inputCells),
    zc: new Float64Array((K + 1) * B),
    r: plan.sunspot ? new Float64Array(n) : null,
    u: new Float64Array(B),
    zb: new Float64Array(B),
    beta: new Float64Array(B * (K + 1)),
    slope: new Float64Array(B * K),
    base: new Float64Array(B),
    v: new Float64Array(K),
    mixDirect: lowerTriangularMixer(plan.residualDirect.lowerStep, B, MIX_DAYS),
    mixBack: plan.residualBack
      ? lowerTriangularMixer(plan.residualBack.lowerStep, B, MIX_DAYS)
      : null,
  };
  for (let m = 0; m < count; m++) {
    throwIfStopped(options, "draw spectral ensemble members");
    drawBandMember(
      plan,
      randomStream(seed, first + m),
      out.subarray(m * n * B, (m + 1) * n * B),
      s,
    );
  }
  return out;
}

/** Options of {@link drawSpectralBandMembers}. */
export interface SpectralDrawOptions extends StopOptions {
  /** Where to write the members (count × cells × bands values) @default a new array */
  into?: Float64Array;
}

/** Input of the worker task {@link spectralBandEnsembleChunk}. */
export interface SpectralBandEnsembleChunk {
  plan: SpectralBandEnsemblePlan;
  seed: number;
  first: number;
  count: number;
}

/**
 * One chunk of spectral members as a worker task: {@link drawSpectralBandMembers} of its input.
 *
 * @param input the plan, seed and member range
 * @param control `shouldStop`, polled before every member
 * @returns the members (member, cell, band)
 * @example
 * ```ts
 * import { spectralBandEnsembleChunk, spectralBandEnsemblePlan } from "./spectral_band_ensemble.ts";
 * import assert from "node:assert/strict";
 * const plan = spectralBandEnsemblePlan([{
 *   coefficients: [1, 2], covariance: [[1e-6, 0], [0, 1e-2]],
 *   terms: [{ role: "facular", quietLevel: 0.15 }], psiReference: 1360.8,
 *   residualSd: 0.01, rho: 0.5, stepDays: 1, backExtension: null,
 * }], { days: Float64Array.of(1), direct: [Float64Array.of(0.16)], mappings: [null], sunspot: null }, null);
 * assert.equal(spectralBandEnsembleChunk({ plan, seed: 1, first: 0, count: 3 }).length, 3);
 * ```
 */
export function spectralBandEnsembleChunk(
  input: SpectralBandEnsembleChunk,
  control: StopOptions = {},
): Float64Array {
  return drawSpectralBandMembers(input.plan, input.seed, input.first, input.count, control);
}

/**
 * The members of a weighted sum of bands (an integral over wavelength with the weights of
 * core/irradiance/wavelength_bands.ts): member m's value at cell i is Σ_b w_b·S_b(m, i), NaN
 * where a band with non-zero weight has no value. Bands with zero weight are skipped.
 *
 * @param members count × cells × bands ({@link drawSpectralBandMembers})
 * @param bands number of bands
 * @param weights per band, W m-2 per unit band value
 * @returns count × cells values, member-major
 * @throws {InputError} (field `weights`) when there is not one weight per band; (field
 *   `members`) when the length is not a multiple of the bands
 * @example
 * ```ts
 * import { integrateBandMembers } from "./spectral_band_ensemble.ts";
 * import assert from "node:assert/strict";
 * // 1 member, 2 cells, 2 bands
 * const s = integrateBandMembers(Float64Array.of(1, 2, 3, NaN), 2, [10, 1]);
 * assert.equal(s[0], 12);
 * assert.ok(Number.isNaN(s[1]));
 * assert.equal(integrateBandMembers(Float64Array.of(1, 2, 3, NaN), 2, [10, 0])[1], 30);
 * ```
 */
export function integrateBandMembers(
  members: Float64Array,
  bands: number,
  weights: ArrayLike<number>,
): Float64Array {
  if (weights.length !== bands) {
    throw new InputError(
      `Cannot integrate band members: ${weights.length} weights for ${bands} bands`,
      { field: "weights", reason: "length_mismatch", value: weights.length },
    );
  }
  if (bands === 0 || members.length % bands !== 0) {
    throw new InputError(
      `Cannot integrate band members: ${members.length} values are not ${bands} bands`,
      { field: "members", reason: "length_mismatch", value: members.length },
    );
  }
  const used: number[] = [];
  for (let b = 0; b < bands; b++) if (weights[b] !== 0) used.push(b);
  const points = members.length / bands;
  const out = new Float64Array(points);
  for (let j = 0; j < points; j++) {
    let s = 0;
    const at = j * bands;
    for (const b of used) s += weights[b] * members[at + b];
    out[j] = s;
  }
  return out;
}

/**
 * The members of one band, member-major (count × cells), from the joint draw.
 *
 * @param members count × cells × bands ({@link drawSpectralBandMembers})
 * @param bands number of bands
 * @param band the band's index
 * @returns count × cells values
 * @throws {InputError} (field `band`) when out of range
 * @example
 * ```ts
 * import { bandMembers } from "./spectral_band_ensemble.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual([...bandMembers(Float64Array.of(1, 2, 3, 4), 2, 1)], [2, 4]);
 * ```
 */
export function bandMembers(members: Float64Array, bands: number, band: number): Float64Array {
  if (!Number.isInteger(band) || band < 0 || band >= bands) {
    throw new InputError(`Cannot take band members: band ${band} of ${bands}`, {
      field: "band",
      reason: "out_of_range",
      value: band,
    });
  }
  const points = members.length / bands, out = new Float64Array(points);
  for (let j = 0; j < points; j++) out[j] = members[j * bands + band];
  return out;
}
