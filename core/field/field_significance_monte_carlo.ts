/**
 * Field significance of a solar-signal map by Monte Carlo (Livezey & Chen 1983, Mon. Wea.
 * Rev. 111, 46): the statistic is the area-weighted fraction of cells whose local test is
 * significant at α_local; its null distribution comes from phase-randomised surrogates of the
 * solar series (Ebisuzaki 1997, J. Climate 10, 2147; core/climate/surrogates.ts), the SAME
 * surrogate correlated with every cell, so the field's spatial correlation is kept (common
 * practice). Each surrogate gets the predictor's preprocessing and, per lag, the same
 * residualisation on the controls. The best-lag version compares the observed largest
 * fraction over the lag window with each surrogate's largest fraction over the same window.
 * Each cell also gets a Monte Carlo p of its best-lag |r| (the lag search paid for).
 *
 * Local test without a p-value per cell and surrogate: |t| ≥ t* ⇔ r² ≥ r*² with
 * r*² = t*²/(t*² + df), t* the two-sided Student-t quantile at α_local with df = N_eff − 2 − q
 * of the observed map (precomputed per cell and lag), and r² ≥ r*² ⇔ cov² ≥ r*²·Σx̃²·Σỹ², so
 * the inner loop has neither square roots nor divisions.
 *
 * Speed and exactness: the overlap sums cov = Σ_t x̃_t y_{t+k} of a block of surrogate rows
 * (surrogate × lag) with all cells are one float32 matrix product (float32_matrix_product.ts).
 * A float32 dot product of n terms is within γ_n‖a‖‖y‖ of the exact one (γ_n = nu/(1 − nu),
 * u = 2⁻²⁴; Higham 2002, Accuracy and Stability of Numerical Algorithms, 2nd ed., eq. 3.5),
 * so every comparison farther than that from its threshold is decided from the float32 value
 * (a branch-free WebAssembly pass over each product row, local_test_tally.ts), and the few
 * within are recomputed in float64. Decisions are therefore those of the float64
 * computation whatever the engine (WebAssembly SIMD, plain JS, a BLAS) or the chunking.
 *
 * Chunks: surrogate i always draws from `randomStream(seed, i)`; a chunk task
 * ({@link fieldSignificanceChunk}) takes a block of surrogates × a block of cells; the reducer
 * (field_monte_carlo_summary.ts) adds integer tallies in a fixed order, so 1, 2 or 50 chunks on
 * any number of workers give bit-identical results.
 *
 * @module
 */
import { randomStream } from "../random/random_stream.ts";
import { inverseRealDft } from "../spectral/fft.ts";
import { normalQuantile, tQuantile } from "../stats/distributions.ts";
import { dftAmplitudes, phaseRandomisedSpectrum } from "../climate/surrogates.ts";
import { overlapRange } from "../climate/lagged_correlation.ts";
import { type PreprocessOptions, preprocessSeries } from "../climate/preprocess_series.ts";
import { type FieldAnalysisInputs, predictorResidual } from "./field_analysis_inputs.ts";
import type { SolarSignalMap } from "./solar_signal_map.ts";
import { type Float32ProductEngine, wasmFloat32Product } from "./float32_matrix_product.ts";
import { localTestTally } from "./local_test_tally.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";
import {
  checkMonteCarloSettings,
  combineFieldMonteCarlo,
  type FieldChunkTally,
  type FieldMonteCarloFrame,
  type FieldMonteCarloResult,
  weightUnits,
} from "./field_monte_carlo_summary.ts";

/** Options of {@link planFieldSignificance}. */
export interface FieldSignificanceOptions {
  /** Seed of the surrogate streams, integer in [0, 2³²). */
  seed: number;
  /** Number of surrogates M. @default 1000 */
  surrogates?: number;
  /** Level of the local (per cell) two-sided t test. @default 0.05 */
  alphaLocal?: number;
}

/**
 * Everything the chunk tasks need (structured-clonable). A plan may hold only a slice of the
 * cells (see {@link sliceFieldSignificancePlan}); the frame fields describe the whole test.
 */
export interface FieldSignificancePlan extends FieldMonteCarloFrame {
  n: number;
  minLag: number;
  seed: number;
  alphaLocal: number;
  preprocess: PreprocessOptions;
  /** DFT amplitudes of the surrogate source, f = 0..floor(N/2). */
  amplitude: Float64Array;
  /** Per-lag orthonormal bases of [1, controls] (as FieldAnalysisInputs.bases). */
  bases: Float64Array[];
  /** First cell (in 0..cellCount) held by this plan, and how many. */
  sliceStart: number;
  sliceCount: number;
  /** Field of the held cells, time-major (n × sliceCount), float32. */
  y: Float32Array;
  /**
   * Per lag × held cell (lag-major): thresholds on cov²/Σx̃² (see the module documentation);
   * the bounds of the uncertain band in float32, widened by 2⁻²² so rounding never narrows it.
   */
  sigExact: Float64Array;
  sigHi: Float32Array;
  sigLo: Float32Array;
  exExact: Float64Array;
  exHi: Float32Array;
  exLo: Float32Array;
}

/** Input of {@link fieldSignificanceChunk}. */
export interface FieldSignificanceChunkInput {
  plan: FieldSignificancePlan;
  surrogateStart: number;
  surrogateEnd: number;
  cellStart: number;
  cellEnd: number;
}

/**
 * Two-sided Student-t critical values t*(df) at level α for many non-integer df: below
 * df = 3 the quantile itself; above, 4-point Lagrange interpolation in u = 1/df on 4,096
 * equal steps of (0, 1/3] (t*(u) is smooth there, the interpolation error is below 1e-12 of
 * the quantile; u = 0 is the normal quantile). One quantile costs about 9 µs and a map has one
 * per cell and lag, hence the table (computed here, derived).
 */
function criticalTTable(alpha: number): (df: number) => number {
  const STEPS = 4096, H = 1 / 3 / STEPS;
  const p = 1 - alpha / 2;
  // nodes at u = (i − 1)·H for i = 0..STEPS+2 (u = −H mirrors the first step, unused at u < 0),
  // each evaluated when first needed (a map's df span only a few hundred of them)
  const nodes = new Float64Array(STEPS + 3).fill(NaN);
  const node = (i: number): number => {
    if (Number.isNaN(nodes[i])) {
      const u = (i - 1) * H;
      nodes[i] = i === 0
        ? 2 * node(1) - node(2)
        : u === 0
        ? normalQuantile(p)
        : tQuantile(p, 1 / u);
    }
    return nodes[i];
  };
  return (df: number) => {
    if (df < 3) return tQuantile(p, df);
    const x = 1 / df / H, i = Math.min(STEPS - 1, Math.floor(x)), f = x - i;
    // points i − 1, i, i + 1, i + 2 at u-steps i−1..i+2 are nodes[i..i+3]
    const y0 = node(i), y1 = node(i + 1), y2 = node(i + 2), y3 = node(i + 3);
    return (
      (-f * (f - 1) * (f - 2) / 6) * y0 + ((f + 1) * (f - 1) * (f - 2) / 2) * y1 +
      (-(f + 1) * f * (f - 2) / 2) * y2 + ((f + 1) * f * (f - 1) / 6) * y3
    );
  };
}

/** Relative bound on the float32 error of an n-term dot product, with a safety factor 2. */
function float32DotBound(n: number): number {
  const u = 2 ** -24;
  const gamma = (n * u) / (1 - n * u);
  return 2 * (gamma * (1 + u) + u);
}

/**
 * Plan the Monte Carlo test of a map.
 *
 * @param inputs the prepared inputs of the map
 * @param map the observed map (its N_eff set the local critical values)
 * @param weights area weight per grid cell (e.g. fieldAreaWeights)
 * @param options seed, surrogates, α_local
 * @returns the plan (all cells)
 * @throws {RangeError} on a bad seed, surrogate count or α_local, weights of the wrong length,
 *   or a map with no analysed cell of positive weight
 * @example
 * ```ts
 * import { prepareFieldAnalysis } from "./field_analysis_inputs.ts";
 * import { solarSignalMap } from "./solar_signal_map.ts";
 * import { planFieldSignificance } from "./field_significance_monte_carlo.ts";
 * import assert from "node:assert/strict";
 * const n = 96;
 * const x = Float64Array.from({ length: n }, (_, t) => Math.sin(t / 5) + Math.cos(2.2 * t));
 * const values = Float32Array.from({ length: n * 3 }, (_, i) => Math.sin(i * 0.77));
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0, 120, 240) };
 * const inputs = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 3 });
 * const plan = planFieldSignificance(inputs, solarSignalMap(inputs), [1, 1, 1], { seed: 1, surrogates: 50 });
 * assert.equal(plan.cellCount, 3);
 * assert.equal(plan.observedUnits.length, 4);
 * ```
 */
export function planFieldSignificance(
  inputs: FieldAnalysisInputs,
  map: SolarSignalMap,
  weights: ArrayLike<number>,
  options: FieldSignificanceOptions,
): FieldSignificancePlan {
  const fn = "plan field significance";
  const { n, minLag, maxLag, gridCells } = inputs;
  const L = maxLag - minLag + 1;
  const q = inputs.controlNames.length;
  const seed = options.seed, M = options.surrogates ?? 1000, alpha = options.alphaLocal ?? 0.05;
  checkMonteCarloSettings(fn, seed, M, alpha, "surrogates");
  if (weights.length !== gridCells) {
    throw new RangeError(`Cannot ${fn}: ${weights.length} weights for ${gridCells} cells`);
  }
  // cells of the map with a positive weight, in the column order of inputs.y
  const cols: number[] = [], cells: number[] = [], w: number[] = [];
  for (let i = 0; i < inputs.cells.length; i++) {
    const c = inputs.cells[i];
    if (map.status[c] === 0 && weights[c] > 0) {
      cols.push(i);
      cells.push(c);
      w.push(weights[c]);
    }
  }
  if (cells.length === 0) {
    throw new RangeError(`Cannot ${fn}: no analysed cell has a positive weight`);
  }
  const { units, total } = weightUnits(w);
  const C = cells.length, nc = inputs.cells.length;
  const y = new Float32Array(n * C);
  for (let t = 0; t < n; t++) {
    for (let i = 0; i < C; i++) y[t * C + i] = inputs.y[t * nc + cols[i]];
  }
  const sigExact = new Float64Array(L * C), exExact = new Float64Array(L * C);
  const bound = () => new Float32Array(L * C);
  const sigHi = bound(), sigLo = bound(), exHi = bound(), exLo = bound();
  const UP = 1 + 2 ** -22, DOWN = 1 - 2 ** -22;
  const observedUnits = new Float64Array(L);
  const dotBound = float32DotBound(n);
  const tStar = criticalTTable(alpha);
  for (let i = 0; i < C; i++) {
    const c = cells[i];
    const rBest = Math.abs(map.best.r[c]);
    for (let j = 0; j < L; j++) {
      const s = { syy: map.residualSs[j * gridCells + c], segSs: map.segmentSs[j * gridCells + c] };
      const o = j * C + i;
      const delta = dotBound * Math.sqrt(s.segSs / s.syy);
      const df = map.perLag.nEff[j * gridCells + c] - 2 - q;
      let rStar = Infinity;
      if (df > 0) {
        const ts = tStar(df);
        rStar = Math.sqrt((ts * ts) / (ts * ts + df));
        const r = map.perLag.r[j * gridCells + c];
        if (r * r >= rStar * rStar) observedUnits[j] += units[i];
      }
      sigExact[o] = rStar * rStar * s.syy;
      sigHi[o] = (rStar + delta) ** 2 * s.syy * UP;
      sigLo[o] = Math.max(0, rStar - delta) ** 2 * s.syy * DOWN;
      exExact[o] = rBest * rBest * s.syy;
      exHi[o] = (rBest + delta) ** 2 * s.syy * UP;
      exLo[o] = Math.max(0, rBest - delta) ** 2 * s.syy * DOWN;
    }
  }
  return {
    replicates: M,
    lagCount: L,
    cellCount: C,
    cells: Int32Array.from(cells),
    gridCells,
    weightUnits: units,
    totalUnits: total,
    observedUnits,
    n,
    minLag,
    seed,
    alphaLocal: alpha,
    preprocess: inputs.preprocess,
    amplitude: dftAmplitudes(inputs.surrogateSource),
    bases: inputs.bases,
    sliceStart: 0,
    sliceCount: C,
    y,
    sigExact,
    sigHi,
    sigLo,
    exExact,
    exHi,
    exLo,
  };
}

/**
 * A plan holding only cells [start, end) (for sending a cell block to a worker or machine
 * without the rest of the field).
 *
 * @param plan a plan holding those cells
 * @param start first cell (index among the plan's cells, 0..cellCount)
 * @param end one past the last
 * @returns the sliced plan
 * @throws {RangeError} when the plan does not hold [start, end)
 * @example
 * ```ts
 * import { prepareFieldAnalysis } from "./field_analysis_inputs.ts";
 * import { solarSignalMap } from "./solar_signal_map.ts";
 * import { planFieldSignificance, sliceFieldSignificancePlan } from "./field_significance_monte_carlo.ts";
 * import assert from "node:assert/strict";
 * const n = 64;
 * const x = Float64Array.from({ length: n }, (_, t) => Math.sin(t / 4) + Math.cos(2.2 * t));
 * const values = Float32Array.from({ length: n * 4 }, (_, i) => Math.sin(i * 0.77));
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0, 90, 180, 270) };
 * const inputs = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 1 });
 * const plan = planFieldSignificance(inputs, solarSignalMap(inputs), [1, 1, 1, 1], { seed: 1 });
 * const part = sliceFieldSignificancePlan(plan, 1, 3);
 * assert.equal(part.y.length, n * 2);
 * ```
 */
export function sliceFieldSignificancePlan(
  plan: FieldSignificancePlan,
  start: number,
  end: number,
): FieldSignificancePlan {
  const s0 = plan.sliceStart, held = plan.sliceCount;
  if (
    !(Number.isInteger(start) && Number.isInteger(end) && start >= s0 && start < end &&
      end <= s0 + held)
  ) {
    throw new RangeError(
      `Cannot slice plan: cells ${start}..${end} are not within the held ${s0}..${s0 + held}`,
    );
  }
  const C = end - start, L = plan.lagCount, n = plan.n, off = start - s0;
  const y = new Float32Array(n * C);
  for (let t = 0; t < n; t++) y.set(plan.y.subarray(t * held + off, t * held + off + C), t * C);
  const cut = <A extends Float64Array | Float32Array>(a: A): A => {
    const out = new (a.constructor as new (n: number) => A)(L * C);
    for (let j = 0; j < L; j++) out.set(a.subarray(j * held + off, j * held + off + C), j * C);
    return out;
  };
  return {
    ...plan,
    sliceStart: start,
    sliceCount: C,
    y,
    sigExact: cut(plan.sigExact),
    sigHi: cut(plan.sigHi),
    sigLo: cut(plan.sigLo),
    exExact: cut(plan.exExact),
    exHi: cut(plan.exHi),
    exLo: cut(plan.exLo),
  };
}

/** Columns [off, off + cb) of a time-major n × held matrix, time-major. */
function sliceColumns(y: Float32Array, n: number, held: number, off: number, cb: number) {
  const out = new Float32Array(n * cb);
  for (let t = 0; t < n; t++) out.set(y.subarray(t * held + off, t * held + off + cb), t * cb);
  return out;
}

/** Lag-major rows [off, off + cb) of a lag-major L × held array. */
function sliceLags<A extends Float32Array | Float64Array>(
  a: A,
  L: number,
  held: number,
  off: number,
  cb: number,
): A {
  if (off === 0 && cb === held) return a;
  const out = new (a.constructor as new (n: number) => A)(L * cb);
  for (let j = 0; j < L; j++) out.set(a.subarray(j * held + off, j * held + off + cb), j * cb);
  return out;
}

/** State of a chunk's exact recomputations (see {@link settleBand}). */
interface BandState {
  plan: FieldSignificancePlan;
  cb: number;
  ranges: [number, number][];
  /** The block's surrogate rows in float64 and their Σx̃². */
  a64: Float64Array;
  sxx: Float64Array;
  /** Chunk field, time-major, and its cell-major copy (made at the first recomputation). */
  yb: Float32Array;
  ybT: Float32Array | null;
  /** Chunk bounds (lag-major, chunk cells), and the chunk's weight units. */
  sigHi: Float32Array;
  sigLo: Float32Array;
  exHi: Float32Array;
  exLo: Float32Array;
  sigExact: Float64Array;
  exExact: Float64Array;
  w: Float64Array;
  rechecked: number;
}

/** Exact (float64) cov² of one surrogate row with one chunk cell at lag index j. */
function exactCov2(st: BandState, row: number, cc: number, j: number): number {
  const n = st.plan.n, cb = st.cb;
  if (st.ybT === null) {
    // cell-major copy: a time-major column is one cache line a step
    const ybT = new Float32Array(n * cb), yb = st.yb;
    for (let t = 0; t < n; t++) for (let c = 0; c < cb; c++) ybT[c * n + t] = yb[t * cb + c];
    st.ybT = ybT;
  }
  const [a, b] = st.ranges[j];
  const k = st.plan.minLag + j, a64 = st.a64, ybT = st.ybT;
  let s = 0;
  const ra = row * n, ca = cc * n;
  for (let t = a + k; t < b + k; t++) s += a64[ra + t] * ybT[ca + t];
  return s * s;
}

/**
 * Settle a cell the threshold pass listed as within a band (local_test_tally.ts) by the exact
 * recomputation: returns its weight units when significant, and sets its flag (word 2·cc of
 * `flags`) when it reaches the cell's observed best |r|.
 */
function settleBand(
  st: BandState,
  v: number,
  row: number,
  cc: number,
  j: number,
  flags: Int32Array,
): number {
  const sx = st.sxx[row], o = j * st.cb + cc, v2 = v * v;
  let u = 0;
  if (!(v2 >= st.sigHi[o] * sx) && v2 > st.sigLo[o] * sx) {
    st.rechecked++;
    if (exactCov2(st, row, cc, j) >= st.sigExact[o] * sx) u = st.w[cc];
  }
  if (flags[2 * cc] === 0 && !(v2 >= st.exHi[o] * sx) && v2 > st.exLo[o] * sx) {
    st.rechecked++;
    if (exactCov2(st, row, cc, j) >= st.exExact[o] * sx) flags[2 * cc] = 1;
  }
  return u;
}

/** Surrogates per matrix product inside a chunk (rows = this × lags). */
const SURROGATE_BLOCK = 8;

/**
 * One chunk task: surrogates [surrogateStart, surrogateEnd) × cells [cellStart, cellEnd)
 * (the worker task `field.significance_chunk`; a pure function of its input).
 *
 * @param input plan and ranges (the plan must hold the cells)
 * @param engine matrix product engine @default wasmFloat32Product()
 * @param control `shouldStop`, polled before each block of 8 surrogates (not part of the
 *   input: a worker passes its own)
 * @returns integer tallies for the reducer
 * @throws {RangeError} on ranges outside the plan
 * @throws {StoppedError} when `control.shouldStop` answers true
 * @example
 * ```ts
 * import { prepareFieldAnalysis } from "./field_analysis_inputs.ts";
 * import { solarSignalMap } from "./solar_signal_map.ts";
 * import { fieldSignificanceChunk, planFieldSignificance } from "./field_significance_monte_carlo.ts";
 * import assert from "node:assert/strict";
 * const n = 64;
 * const x = Float64Array.from({ length: n }, (_, t) => Math.sin(t / 4) + Math.cos(2.2 * t));
 * const values = Float32Array.from({ length: n * 2 }, (_, i) => Math.sin(i * 0.77));
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0, 180) };
 * const inputs = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 2 });
 * const plan = planFieldSignificance(inputs, solarSignalMap(inputs), [1, 1], { seed: 3, surrogates: 20 });
 * const t = fieldSignificanceChunk({ plan, surrogateStart: 0, surrogateEnd: 20, cellStart: 0, cellEnd: 2 });
 * assert.equal(t.units.length, 20 * 3);
 * assert.ok(t.exceed.every((v) => v <= 20));
 * ```
 */
export function fieldSignificanceChunk(
  input: FieldSignificanceChunkInput,
  engine: Float32ProductEngine = wasmFloat32Product(),
  control: StopOptions = {},
): FieldChunkTally {
  const { plan, surrogateStart: s0, surrogateEnd: s1, cellStart, cellEnd } = input;
  const fn = "run field significance chunk";
  if (
    !(Number.isInteger(s0) && Number.isInteger(s1) && 0 <= s0 && s0 < s1 && s1 <= plan.replicates)
  ) {
    throw new RangeError(`Cannot ${fn}: surrogates ${s0}..${s1} outside 0..${plan.replicates}`);
  }
  const held = plan.sliceCount, off = cellStart - plan.sliceStart;
  if (
    !(Number.isInteger(cellStart) && Number.isInteger(cellEnd) && off >= 0 && cellStart < cellEnd &&
      cellEnd - plan.sliceStart <= held)
  ) {
    throw new RangeError(
      `Cannot ${fn}: cells ${cellStart}..${cellEnd} not held by the plan (${plan.sliceStart}..${
        plan.sliceStart + held
      })`,
    );
  }
  const n = plan.n, L = plan.lagCount, cb = cellEnd - cellStart;
  // the block's field columns, time-major (the plan's own array when the chunk has all its cells)
  const yb = off === 0 && cb === held ? plan.y : sliceColumns(plan.y, n, held, off, cb);
  engine.setRight(yb, n, cb);
  const ranges = Array.from({ length: L }, (_, j) => overlapRange(n, plan.minLag + j));
  const units = new Float64Array((s1 - s0) * L);
  const exceed = new Uint32Array(cb);
  const cut = <A extends Float32Array | Float64Array>(x: A) => sliceLags(x, L, held, off, cb);
  const st: BandState = {
    plan,
    cb,
    ranges,
    a64: new Float64Array(SURROGATE_BLOCK * L * n),
    sxx: new Float64Array(SURROGATE_BLOCK * L),
    yb,
    ybT: null,
    sigHi: cut(plan.sigHi),
    sigLo: cut(plan.sigLo),
    exHi: cut(plan.exHi),
    exLo: cut(plan.exLo),
    sigExact: cut(plan.sigExact),
    exExact: cut(plan.exExact),
    w: plan.weightUnits.slice(cellStart, cellEnd),
    rechecked: 0,
  };
  const pass = localTestTally(st, st.w, SURROGATE_BLOCK);
  const a32 = new Float32Array(SURROGATE_BLOCK * L * n);
  const res = new Float64Array(n);
  const { a64, sxx } = st;
  for (let blockStart = s0; blockStart < s1; blockStart += SURROGATE_BLOCK) {
    throwIfStopped(control, fn);
    const blockEnd = Math.min(s1, blockStart + SURROGATE_BLOCK);
    const nb = blockEnd - blockStart, rows = nb * L;
    a64.fill(0, 0, rows * n);
    for (let i = blockStart; i < blockEnd; i++) {
      const spec = phaseRandomisedSpectrum(plan.amplitude, n, randomStream(plan.seed, i));
      const s = preprocessSeries(inverseRealDft(spec, n), plan.preprocess);
      for (let j = 0; j < L; j++) {
        const row = (i - blockStart) * L + j;
        sxx[row] = predictorResidual(plan, j, s, res);
        const [a, b] = ranges[j];
        a64.set(res.subarray(0, b - a), row * n + a + plan.minLag + j);
      }
    }
    for (let i = 0; i < rows * n; i++) a32[i] = a64[i];
    const { c, ldc } = engine.multiply(a32, rows);
    pass.setProducts(c, rows, ldc);
    for (let ii = 0; ii < nb; ii++) {
      const flags = pass.flags(ii);
      for (let j = 0; j < L; j++) {
        const row = ii * L + j;
        let { units: u, banded } = pass.row(row, j, ii, sxx[row]);
        if (banded > 0) {
          const listed = pass.listed();
          for (let q = 0; q < banded; q++) {
            const cc = listed[q];
            u += settleBand(st, c[row * ldc + cc], row, cc, j, flags);
          }
        }
        units[(blockStart + ii - s0) * L + j] = u;
      }
      for (let cc = 0; cc < cb; cc++) if (flags[2 * cc] !== 0) exceed[cc]++;
    }
  }
  const rechecked = st.rechecked;
  return {
    replicateStart: s0,
    replicateEnd: s1,
    cellStart,
    cellEnd,
    units,
    exceed,
    rechecked,
  };
}

/** Sizes of {@link fieldSignificanceTasks}. */
export interface FieldTaskSizes {
  /** Surrogates per task. @default 100 */
  surrogatesPerTask?: number;
  /** Cells per task (each task carries only its cells' columns). @default all cells */
  cellsPerTask?: number;
}

/**
 * Split a test into chunk task inputs (surrogate blocks × cell blocks), each with a plan
 * sliced to its cells.
 *
 * @param plan the whole plan
 * @param sizes block sizes
 * @returns the task inputs, in the reducer's order
 * @example
 * ```ts
 * import { prepareFieldAnalysis } from "./field_analysis_inputs.ts";
 * import { solarSignalMap } from "./solar_signal_map.ts";
 * import { fieldSignificanceTasks, planFieldSignificance } from "./field_significance_monte_carlo.ts";
 * import assert from "node:assert/strict";
 * const n = 64;
 * const x = Float64Array.from({ length: n }, (_, t) => Math.sin(t / 4) + Math.cos(2.2 * t));
 * const values = Float32Array.from({ length: n * 4 }, (_, i) => Math.sin(i * 0.77));
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0, 90, 180, 270) };
 * const inputs = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 1 });
 * const plan = planFieldSignificance(inputs, solarSignalMap(inputs), [1, 1, 1, 1], { seed: 1, surrogates: 250 });
 * const tasks = fieldSignificanceTasks(plan, { surrogatesPerTask: 100, cellsPerTask: 3 });
 * assert.equal(tasks.length, 3 * 2);
 * ```
 */
export function fieldSignificanceTasks(
  plan: FieldSignificancePlan,
  sizes: FieldTaskSizes = {},
): FieldSignificanceChunkInput[] {
  const sp = sizes.surrogatesPerTask ?? 100, cp = sizes.cellsPerTask ?? plan.cellCount;
  if (!(Number.isInteger(sp) && sp >= 1 && Number.isInteger(cp) && cp >= 1)) {
    throw new RangeError(
      `Cannot split field significance: block sizes must be positive integers, got ${sp} and ${cp}`,
    );
  }
  const out: FieldSignificanceChunkInput[] = [];
  for (let c0 = 0; c0 < plan.cellCount; c0 += cp) {
    const c1 = Math.min(plan.cellCount, c0 + cp);
    const part = c0 === 0 && c1 === plan.cellCount
      ? plan
      : sliceFieldSignificancePlan(plan, c0, c1);
    for (let s0 = 0; s0 < plan.replicates; s0 += sp) {
      out.push({
        plan: part,
        surrogateStart: s0,
        surrogateEnd: Math.min(plan.replicates, s0 + sp),
        cellStart: c0,
        cellEnd: c1,
      });
    }
  }
  return out;
}

/**
 * The whole test in this thread: plan, chunk tasks, reducer.
 *
 * @param inputs prepared inputs
 * @param map the observed map
 * @param weights area weight per grid cell
 * @param options seed, surrogates, α_local, and block sizes
 * @returns observed fractions, p per lag and for the best lag, null summary, per-cell p
 * @example
 * ```ts
 * import { prepareFieldAnalysis } from "./field_analysis_inputs.ts";
 * import { solarSignalMap } from "./solar_signal_map.ts";
 * import { fieldSignificanceMonteCarlo } from "./field_significance_monte_carlo.ts";
 * import assert from "node:assert/strict";
 * import { randomStream } from "../random/random_stream.ts";
 * const n = 120, noise = randomStream(5);
 * const x = Float64Array.from({ length: n }, () => noise.normal());
 * // 12 cells along the equator: the first 6 follow x, the others are noise
 * const values = new Float32Array(n * 12);
 * for (let t = 0; t < n; t++) {
 *   for (let c = 0; c < 12; c++) values[t * 12 + c] = (c < 6 ? x[t] : 0) + noise.normal();
 * }
 * const lon = Float64Array.from({ length: 12 }, (_, j) => 30 * j);
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon };
 * const inputs = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 2 });
 * const w = new Float64Array(12).fill(1);
 * const r = fieldSignificanceMonteCarlo(inputs, solarSignalMap(inputs), w, { seed: 7, surrogates: 99 });
 * assert.ok(r.observedBest >= 0.5);
 * assert.ok(r.pField <= 0.05);
 * ```
 */
export function fieldSignificanceMonteCarlo(
  inputs: FieldAnalysisInputs,
  map: SolarSignalMap,
  weights: ArrayLike<number>,
  options: FieldSignificanceOptions & FieldTaskSizes,
): FieldMonteCarloResult {
  const plan = planFieldSignificance(inputs, map, weights, options);
  const engine = wasmFloat32Product();
  const tallies = fieldSignificanceTasks(plan, options).map((t) =>
    fieldSignificanceChunk(t, engine)
  );
  return combineFieldMonteCarlo(plan, tallies);
}
