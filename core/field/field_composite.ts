/**
 * Composite maps of a gridded field around key dates, such as solar-cycle maxima and minima:
 * the superposed epoch analysis of core/climate/superposed_epoch.ts (Chree 1913, Phil. Trans.
 * R. Soc. A 212, 75) applied to every cell, with each epoch's value the mean of the cell over
 * an offset window after (or around) the epoch.
 *
 * - One set of epochs: the map is the mean of the epoch values; local test Student's one-sample
 *   t = ȳ/(s/√K) with K − 1 df.
 * - Two sets (e.g. maxima and minima): the map is the difference of the two means; local test
 *   Student's two-sample t with pooled variance and K₁ + K₂ − 2 df (Student 1908; e.g. Wilks
 *   2011, Statistical Methods in the Atmospheric Sciences, 3rd ed., eq. 5.8).
 *   Epoch values are treated as independent: true when the epochs are years apart.
 *
 * Field significance, the same two ways as the solar-signal maps: Benjamini–Hochberg on the
 * per-cell p (false_discovery_rate.ts), or Monte Carlo after Livezey & Chen 1983 with random
 * epoch sets drawn as in core/climate/superposed_epoch.ts (same counts, the observed smallest
 * spacing kept; Haurwitz & Brier 1981, Mon. Weather Rev. 109, 2074), the SAME random set for
 * every cell, statistic the area-weighted fraction of cells with |t| ≥ t*. Replicate r draws
 * from `randomStream(seed, r)` (the first set, then the second), chunk tasks split replicates ×
 * cells, and the shared reducer (field_monte_carlo_summary.ts) combines them.
 *
 * A composite shows association with the chosen dates, not its cause.
 *
 * @module
 */
import { randomStream } from "../random/random_stream.ts";
import { tCdf, tQuantile } from "../stats/distributions.ts";
import { randomSpacedEpochs } from "../climate/superposed_epoch.ts";
import type { PreprocessOptions } from "../climate/preprocess_series.ts";
import type { GriddedField } from "./gridded_field.ts";
import { preprocessFieldCells } from "./field_analysis_inputs.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";
import {
  checkMonteCarloSettings,
  combineFieldMonteCarlo,
  type FieldChunkTally,
  type FieldMonteCarloFrame,
  type FieldMonteCarloResult,
  weightUnits,
} from "./field_monte_carlo_summary.ts";

/** Options of {@link planFieldComposite}. */
export interface FieldCompositeOptions extends StopOptions {
  /** Time-step index of each epoch of the first set (e.g. cycle maxima). */
  epochs: readonly number[];
  /** Second set (e.g. minima): the map is first − second. */
  contrastEpochs?: readonly number[];
  /** Offset window averaged for each epoch, inclusive, in time steps (e.g. 0..11). */
  from: number;
  to: number;
  /** Trend removal per cell. @default { method: "mean" } */
  preprocess?: PreprocessOptions;
  /** Remove each seasonal phase's mean first (12 for monthly data). @default 0 (none) */
  seasonalPeriod?: number;
  /** Seed of the random epoch sets. @default 0 */
  seed?: number;
  /** Random epoch sets M for the Monte Carlo test. @default 1000 */
  replicates?: number;
  /** Level of the local two-sided t test. @default 0.05 */
  alphaLocal?: number;
}

/** The observed composite map (per grid cell; NaN for cells left out). */
export interface FieldCompositeMap {
  /** Mean (or difference of means) of the epoch values, in field units. */
  composite: Float64Array;
  t: Float64Array;
  /** Two-sided p with `df` degrees of freedom. */
  p: Float64Array;
  df: number;
  /** Per grid cell: 0 taken in, 1 missing values. */
  status: Uint8Array;
  /** Epochs whose window fits in the series, per set, and those dropped. */
  used: number[];
  contrastUsed: number[];
  dropped: number[];
  warnings: string[];
}

/** Plan of the composite and its Monte Carlo test (structured-clonable). */
export interface FieldCompositePlan extends FieldMonteCarloFrame {
  seed: number;
  n: number;
  /** Valid epoch positions lo..hi and the spacing of random epochs, per set. */
  lo: number;
  hi: number;
  count1: number;
  count2: number;
  spacing1: number;
  spacing2: number;
  df: number;
  /** |t| critical value of the local test. */
  tStar: number;
  /** Window mean of every cell at every position lo..hi, position-major ((hi − lo + 1) × cells). */
  windowMeans: Float64Array;
  /** Observed |t| per cell taken in. */
  observedAbsT: Float64Array;
  observed: FieldCompositeMap;
}

/** Input of {@link fieldCompositeChunk}. */
export interface FieldCompositeChunkInput {
  plan: FieldCompositePlan;
  replicateStart: number;
  replicateEnd: number;
  cellStart: number;
  cellEnd: number;
}

function checkEpochs(fn: string, name: string, e: readonly number[]) {
  for (const v of e) {
    if (!Number.isInteger(v)) throw new RangeError(`Cannot ${fn}: ${name} has a non-integer ${v}`);
  }
}

function smallestSpacing(e: number[]): number {
  let g = Infinity;
  for (let i = 1; i < e.length; i++) g = Math.min(g, e[i] - e[i - 1]);
  return Number.isFinite(g) ? g : 0;
}

/** Mean and Σ(v − mean)² of cell c's window means at the given epoch positions. */
function meanAndSs(
  means: Float64Array,
  C: number,
  lo: number,
  c: number,
  set: ArrayLike<number>,
): [number, number] {
  let s = 0, q = 0;
  for (let i = 0; i < set.length; i++) {
    const v = means[(set[i] - lo) * C + c];
    s += v;
    q += v * v;
  }
  const m = s / set.length;
  return [m, Math.max(0, q - set.length * m * m)];
}

/** Per cell: composite, t (one-sample or pooled two-sample) for the given epoch positions. */
function compositeT(
  means: Float64Array,
  C: number,
  lo: number,
  c: number,
  set1: ArrayLike<number>,
  set2: ArrayLike<number> | null,
): { d: number; t: number } {
  const [m1, ss1] = meanAndSs(means, C, lo, c, set1), k1 = set1.length;
  if (!set2) {
    const se = Math.sqrt(ss1 / (k1 - 1) / k1);
    return { d: m1, t: se > 0 ? m1 / se : m1 === 0 ? 0 : Math.sign(m1) * Infinity };
  }
  const [m2, ss2] = meanAndSs(means, C, lo, c, set2), k2 = set2.length;
  const pooled = (ss1 + ss2) / (k1 + k2 - 2);
  const se = Math.sqrt(pooled * (1 / k1 + 1 / k2));
  const d = m1 - m2;
  return { d, t: se > 0 ? d / se : d === 0 ? 0 : Math.sign(d) * Infinity };
}

/**
 * Plan a composite map: preprocess the cells, compute the observed map, and precompute what
 * the Monte Carlo chunks need.
 *
 * @param field the field (cells with a missing value are left out)
 * @param weights area weight per grid cell (e.g. fieldAreaWeights)
 * @param options epochs, window, preprocessing, Monte Carlo settings, and `shouldStop` (polled
 *   every 64 cells)
 * @returns the plan, with the observed map in `observed`
 * @throws {RangeError} on a malformed field, bad window, non-integer epochs, fewer than 2
 *   epochs (per set) whose window fits, no room for random epoch sets, or bad settings
 * @throws {StoppedError} when `options.shouldStop` answers true
 * @example
 * ```ts
 * import { planFieldComposite } from "./field_composite.ts";
 * import assert from "node:assert/strict";
 * const n = 240;
 * const values = new Float32Array(n * 2);
 * for (let t = 0; t < n; t++) {
 *   values[2 * t] = Math.sin(t * 1.3); // noise-like
 *   values[2 * t + 1] = Math.sin(t * 1.3) + (t % 60 < 6 ? 1 : 0); // warm 6 steps after each epoch
 * }
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0, 180) };
 * const plan = planFieldComposite(field, [1, 1], { epochs: [0, 60, 120, 180], from: 0, to: 5 });
 * assert.ok(plan.observed.p[1] < 0.01 && plan.observed.p[0] > 0.05);
 * ```
 */
export function planFieldComposite(
  field: GriddedField,
  weights: ArrayLike<number>,
  options: FieldCompositeOptions,
): FieldCompositePlan {
  const fn = "plan composite map";
  const { from, to } = options;
  const seed = options.seed ?? 0, M = options.replicates ?? 1000;
  const alpha = options.alphaLocal ?? 0.05;
  if (!Number.isInteger(from) || !Number.isInteger(to) || from > to) {
    throw new RangeError(`Cannot ${fn}: the window must be integers from ≤ to, got ${from}..${to}`);
  }
  checkMonteCarloSettings(fn, seed, M, alpha);
  checkEpochs(fn, "epochs", options.epochs);
  if (options.contrastEpochs) checkEpochs(fn, "contrastEpochs", options.contrastEpochs);
  const prepared = preprocessFieldCells(
    field,
    options.preprocess ?? { method: "mean" },
    options.seasonalPeriod ?? 0,
    options,
  );
  const n = field.nTime, gridCells = prepared.status.length;
  if (weights.length !== gridCells) {
    throw new RangeError(`Cannot ${fn}: ${weights.length} weights for ${gridCells} cells`);
  }
  const lo = Math.max(0, -from), hi = Math.min(n - 1, n - 1 - to);
  if (hi < lo) {
    throw new RangeError(`Cannot ${fn}: the window ${from}..${to} does not fit in ${n} steps`);
  }
  const dropped: number[] = [];
  const split = (e: readonly number[]) =>
    [...e].sort((a, b) => a - b).filter((v) => {
      const ok = v >= lo && v <= hi;
      if (!ok) dropped.push(v);
      return ok;
    });
  const used = split(options.epochs);
  const contrastUsed = options.contrastEpochs ? split(options.contrastEpochs) : [];
  const two = options.contrastEpochs !== undefined;
  for (const [name, set] of [["epochs", used], ["contrastEpochs", contrastUsed]] as const) {
    if ((name === "epochs" || two) && set.length < 2) {
      throw new RangeError(
        `Cannot ${fn}: needs at least 2 ${name} whose window fits, got ${set.length}`,
      );
    }
  }
  const spacing1 = smallestSpacing(used), spacing2 = smallestSpacing(contrastUsed);
  for (const [k, g] of [[used.length, spacing1], [contrastUsed.length, spacing2]]) {
    if (k > 0 && hi - lo - (k - 1) * g < 0) {
      throw new RangeError(`Cannot ${fn}: no room for ${k} random epochs ${g} steps apart`);
    }
  }
  // cells taken in: no missing value and a positive weight
  const cols: number[] = [], cells: number[] = [], w: number[] = [];
  const nc = prepared.cells.length;
  for (let i = 0; i < nc; i++) {
    const c = prepared.cells[i];
    if (weights[c] > 0) {
      cols.push(i);
      cells.push(c);
      w.push(weights[c]);
    }
  }
  if (cells.length === 0) {
    throw new RangeError(`Cannot ${fn}: no cell with data has a positive weight`);
  }
  const { units, total } = weightUnits(w);
  const C = cells.length, P = hi - lo + 1, width = to - from + 1;
  // window means by prefix sums over time, per cell
  const windowMeans = new Float64Array(P * C);
  const prefix = new Float64Array(n + 1);
  for (let i = 0; i < C; i++) {
    if (i % 64 === 0) throwIfStopped(options, fn);
    for (let t = 0; t < n; t++) prefix[t + 1] = prefix[t] + prepared.y[t * nc + cols[i]];
    for (let p = 0; p < P; p++) {
      const e = lo + p;
      windowMeans[p * C + i] = (prefix[e + to + 1] - prefix[e + from]) / width;
    }
  }
  const df = two ? used.length + contrastUsed.length - 2 : used.length - 1;
  const tStar = tQuantile(1 - alpha / 2, df);
  const composite = new Float64Array(gridCells).fill(NaN);
  const tt = new Float64Array(gridCells).fill(NaN), pp = new Float64Array(gridCells).fill(NaN);
  const observedAbsT = new Float64Array(C);
  const observedUnits = new Float64Array(1);
  for (let i = 0; i < C; i++) {
    const r = compositeT(windowMeans, C, lo, i, used, two ? contrastUsed : null);
    composite[cells[i]] = r.d;
    tt[cells[i]] = r.t;
    pp[cells[i]] = Math.min(1, 2 * tCdf(-Math.abs(r.t), df));
    observedAbsT[i] = Math.abs(r.t);
    if (Math.abs(r.t) >= tStar) observedUnits[0] += units[i];
  }
  const warnings = [...prepared.warnings];
  if (dropped.length > 0) {
    warnings.push(
      `${dropped.length} epochs were dropped: their window does not fit in the series.`,
    );
  }
  return {
    replicates: M,
    lagCount: 1,
    cellCount: C,
    cells: Int32Array.from(cells),
    gridCells,
    weightUnits: units,
    totalUnits: total,
    observedUnits,
    seed,
    n,
    lo,
    hi,
    count1: used.length,
    count2: contrastUsed.length,
    spacing1,
    spacing2,
    df,
    tStar,
    windowMeans,
    observedAbsT,
    observed: {
      composite,
      t: tt,
      p: pp,
      df,
      status: prepared.status,
      used,
      contrastUsed,
      dropped,
      warnings,
    },
  };
}

/**
 * One chunk task of the composite's Monte Carlo test: random epoch sets
 * [replicateStart, replicateEnd) × cells [cellStart, cellEnd) (worker task
 * `field.composite_chunk`).
 *
 * @param input plan and ranges
 * @param control `shouldStop`, polled before each random epoch set (not part of the input: a
 *   worker passes its own)
 * @returns integer tallies for combineFieldMonteCarlo
 * @throws {RangeError} on ranges outside the plan
 * @throws {StoppedError} when `control.shouldStop` answers true
 * @example
 * ```ts
 * import { fieldCompositeChunk, planFieldComposite } from "./field_composite.ts";
 * import assert from "node:assert/strict";
 * const n = 120;
 * const values = Float32Array.from({ length: n }, (_, t) => Math.sin(t * 1.3));
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0) };
 * const plan = planFieldComposite(field, [1], { epochs: [10, 50, 90], from: 0, to: 3, replicates: 30 });
 * const t = fieldCompositeChunk({ plan, replicateStart: 0, replicateEnd: 30, cellStart: 0, cellEnd: 1 });
 * assert.equal(t.units.length, 30);
 * ```
 */
export function fieldCompositeChunk(
  input: FieldCompositeChunkInput,
  control: StopOptions = {},
): FieldChunkTally {
  const { plan, replicateStart: r0, replicateEnd: r1, cellStart, cellEnd } = input;
  const fn = "run composite chunk";
  if (
    !(Number.isInteger(r0) && Number.isInteger(r1) && 0 <= r0 && r0 < r1 && r1 <= plan.replicates)
  ) {
    throw new RangeError(`Cannot ${fn}: replicates ${r0}..${r1} outside 0..${plan.replicates}`);
  }
  if (
    !(Number.isInteger(cellStart) && Number.isInteger(cellEnd) && 0 <= cellStart &&
      cellStart < cellEnd && cellEnd <= plan.cellCount)
  ) {
    throw new RangeError(
      `Cannot ${fn}: cells ${cellStart}..${cellEnd} outside 0..${plan.cellCount}`,
    );
  }
  const C = plan.cellCount;
  const units = new Float64Array(r1 - r0), exceed = new Uint32Array(cellEnd - cellStart);
  const set1: number[] = [], set2: number[] = [];
  for (let r = r0; r < r1; r++) {
    throwIfStopped(control, fn);
    const st = randomStream(plan.seed, r);
    randomSpacedEpochs(st, plan.count1, plan.lo, plan.hi, plan.spacing1, set1);
    if (plan.count2 > 0) randomSpacedEpochs(st, plan.count2, plan.lo, plan.hi, plan.spacing2, set2);
    let u = 0;
    for (let c = cellStart; c < cellEnd; c++) {
      const at = Math.abs(
        compositeT(plan.windowMeans, C, plan.lo, c, set1, plan.count2 > 0 ? set2 : null).t,
      );
      if (at >= plan.tStar) u += plan.weightUnits[c];
      if (at >= plan.observedAbsT[c]) exceed[c - cellStart]++;
    }
    units[r - r0] = u;
  }
  return {
    replicateStart: r0,
    replicateEnd: r1,
    cellStart,
    cellEnd,
    units,
    exceed,
    rechecked: 0,
  };
}

/**
 * The composite's Monte Carlo field significance in this thread (plan → chunks → reducer).
 *
 * @param plan from planFieldComposite
 * @param replicatesPerTask replicates per chunk @default 250
 * @returns the field p-value, null summary and per-cell Monte Carlo p
 * @example
 * ```ts
 * import { fieldCompositeMonteCarlo, planFieldComposite } from "./field_composite.ts";
 * import assert from "node:assert/strict";
 * const n = 240;
 * const values = Float32Array.from({ length: n * 3 }, (_, i) => Math.sin(i * 0.9));
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0, 120, 240) };
 * const plan = planFieldComposite(field, [1, 1, 1], { epochs: [20, 80, 140, 200], from: 0, to: 5, replicates: 99 });
 * const r = fieldCompositeMonteCarlo(plan);
 * assert.ok(r.pField > 0 && r.pField <= 1);
 * ```
 */
export function fieldCompositeMonteCarlo(
  plan: FieldCompositePlan,
  replicatesPerTask = 250,
): FieldMonteCarloResult {
  const tallies: FieldChunkTally[] = [];
  for (let r = 0; r < plan.replicates; r += replicatesPerTask) {
    tallies.push(fieldCompositeChunk({
      plan,
      replicateStart: r,
      replicateEnd: Math.min(plan.replicates, r + replicatesPerTask),
      cellStart: 0,
      cellEnd: plan.cellCount,
    }));
  }
  return combineFieldMonteCarlo(plan, tallies);
}
