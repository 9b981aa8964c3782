/**
 * The reducer shared by the Monte Carlo field-significance tests (solar-signal maps and
 * composite maps): it adds the tallies of chunk tasks, each covering a block of replicates
 * (surrogates or random epoch sets) × a block of cells, in a fixed order, and turns them into
 * p-values (Livezey & Chen 1983, Mon. Wea. Rev. 111, 46: the statistic is the area-weighted
 * fraction of locally significant cells, compared with its distribution over replicates).
 *
 * Order independence: area weights are carried as integers ("weight units", the weight scaled
 * to 2³² of the largest and rounded), so a replicate's significant area is an exact integer sum
 * whatever the split into cell blocks; per-cell exceedance counts are integers too. p-values
 * are (1 + #{replicates at least as extreme}) / (1 + M) (Davison & Hinkley 1997, eq. 4.11).
 *
 * @module
 */

/** Tallies of one chunk task. */
export interface FieldChunkTally {
  replicateStart: number;
  replicateEnd: number;
  cellStart: number;
  cellEnd: number;
  /** Per replicate (row) and lag: significant area in weight units over the block's cells. */
  units: Float64Array;
  /** Per cell of the block: replicates whose best-lag |statistic| reached the observed one. */
  exceed: Uint32Array;
  /**
   * Comparisons decided by the exact (float64) recomputation: a diagnostic of the chunk that
   * depends on the product engine's rounding, so it is not carried into the combined result.
   */
  rechecked: number;
}

/** What the reducer needs to know of the test (part of each plan). */
export interface FieldMonteCarloFrame {
  /** Replicates M. */
  replicates: number;
  /** Lags (1 for a composite). */
  lagCount: number;
  /** Cells taken in (the cell index space of the chunks). */
  cellCount: number;
  /** Grid index of each cell taken in. */
  cells: Int32Array;
  gridCells: number;
  /** Integer weight per cell taken in, and their sum. */
  weightUnits: Float64Array;
  totalUnits: number;
  /** Observed significant area per lag, in weight units. */
  observedUnits: Float64Array;
}

/** Summary of the null distribution of the field statistic. */
export interface FieldNullSummary {
  mean: number;
  sd: number;
  /** Type-7 quantiles (R's default) at 0.5, 0.9, 0.95, 0.99. */
  q50: number;
  q90: number;
  q95: number;
  q99: number;
  max: number;
  /** Share of replicates with no significant cell. */
  zeroFraction: number;
  /** Counts in bins of width 0.02 over [0, 1] (the last bin includes 1). */
  histogram: number[];
  /**
   * Sarle's bimodality coefficient (g² + 1)/(κ + 3(n − 1)²/((n − 2)(n − 3))), g the sample
   * skewness and κ the excess kurtosis; above 5/9 (its value for a uniform distribution)
   * suggests a bimodal or very flat null (Pfister et al. 2013, Front. Psychol. 4, 700; from
   * memory).
   */
  bimodality: number;
}

/** Result of {@link combineFieldMonteCarlo}. */
export interface FieldMonteCarloResult {
  replicates: number;
  /** Observed area fraction of locally significant cells, per lag. */
  observedFraction: number[];
  /** The largest of them and the index of its lag (first on ties). */
  observedBest: number;
  observedBestIndex: number;
  /** Per lag: p of that lag's fraction against the same lag's null. */
  pPerLag: number[];
  /** p of the best-lag fraction against the replicates' best-lag fractions (the search over lags paid for). */
  pField: number;
  /** Null distribution of the best-lag fraction. */
  nullBest: FieldNullSummary;
  /**
   * Per grid cell: Monte Carlo p of the cell's best-lag |statistic| (1 + exceed)/(1 + M); NaN
   * for cells not taken in.
   */
  cellP: Float64Array;
  warnings: string[];
}

/**
 * Check the settings every field Monte Carlo test takes.
 *
 * @param fn what was being done, for messages
 * @param seed seed of the random streams
 * @param replicates number of replicates M (named `name` in messages)
 * @param alphaLocal level of the local test
 * @param name what the replicates are called @default "replicates"
 * @throws {RangeError} naming the first bad setting
 * @example
 * ```ts
 * import { checkMonteCarloSettings } from "./field_monte_carlo_summary.ts";
 * import assert from "node:assert/strict";
 * assert.throws(() => checkMonteCarloSettings("test", -1, 10, 0.05), /seed/);
 * ```
 */
export function checkMonteCarloSettings(
  fn: string,
  seed: number,
  replicates: number,
  alphaLocal: number,
  name = "replicates",
): void {
  if (!Number.isInteger(seed) || seed < 0 || seed >= 2 ** 32) {
    throw new RangeError(`Cannot ${fn}: seed must be an integer in [0, 2^32), got ${seed}`);
  }
  if (!Number.isInteger(replicates) || replicates < 1) {
    throw new RangeError(`Cannot ${fn}: ${name} must be a positive integer, got ${replicates}`);
  }
  if (!(alphaLocal > 0 && alphaLocal < 1)) {
    throw new RangeError(`Cannot ${fn}: alphaLocal must be in (0, 1), got ${alphaLocal}`);
  }
}

/**
 * Integer weight units: w / max(w) · 2³², rounded (cells with weight 0 get 0).
 *
 * @param weights non-negative weights
 * @returns units (exact integers in float64) and their total
 * @throws {RangeError} when a weight is negative or not finite, or all are 0
 * @example
 * ```ts
 * import { weightUnits } from "./field_monte_carlo_summary.ts";
 * import assert from "node:assert/strict";
 * const { units, total } = weightUnits([1, 0.5]);
 * assert.deepEqual(Array.from(units), [2 ** 32, 2 ** 31]);
 * assert.equal(total, 1.5 * 2 ** 32);
 * ```
 */
export function weightUnits(weights: ArrayLike<number>): { units: Float64Array; total: number } {
  let max = 0;
  for (let i = 0; i < weights.length; i++) {
    const w = weights[i];
    if (!(w >= 0) || !Number.isFinite(w)) {
      throw new RangeError(`Cannot scale weights: weights[${i}] must be finite and ≥ 0, got ${w}`);
    }
    max = Math.max(max, w);
  }
  if (!(max > 0)) throw new RangeError("Cannot scale weights: every weight is 0");
  const units = new Float64Array(weights.length);
  let total = 0;
  for (let i = 0; i < weights.length; i++) {
    units[i] = Math.round((weights[i] / max) * 2 ** 32);
    total += units[i];
  }
  return { units, total };
}

function quantile7(sorted: Float64Array, p: number): number {
  const h = (sorted.length - 1) * p, lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * Summary of a sample of field fractions in [0, 1].
 *
 * @param values the sample (at least one value)
 * @returns mean, sd, quantiles, zero share, histogram, bimodality coefficient (NaN below 4 values)
 * @example
 * ```ts
 * import { summariseFieldNull } from "./field_monte_carlo_summary.ts";
 * import assert from "node:assert/strict";
 * const s = summariseFieldNull(Float64Array.of(0, 0, 0.1, 0.5));
 * assert.equal(s.zeroFraction, 0.5);
 * assert.equal(s.histogram[0], 2);
 * ```
 */
export function summariseFieldNull(values: Float64Array): FieldNullSummary {
  const m = values.length;
  if (m === 0) throw new RangeError("Cannot summarise null distribution: no replicates");
  const sorted = Float64Array.from(values).sort();
  let mean = 0;
  for (const v of values) mean += v;
  mean /= m;
  let m2 = 0, m3 = 0, m4 = 0, zeros = 0;
  const histogram = new Array<number>(50).fill(0);
  for (const v of values) {
    const d = v - mean;
    m2 += d * d;
    m3 += d * d * d;
    m4 += d * d * d * d;
    if (v === 0) zeros++;
    histogram[Math.min(49, Math.floor(v * 50))]++;
  }
  const sd = m > 1 ? Math.sqrt(m2 / (m - 1)) : 0;
  let bimodality = NaN;
  if (m > 3 && m2 > 0) {
    const g = (m3 / m) / (m2 / m) ** 1.5;
    const k = (m4 / m) / (m2 / m) ** 2 - 3;
    bimodality = (g * g + 1) / (k + (3 * (m - 1) ** 2) / ((m - 2) * (m - 3)));
  }
  return {
    mean,
    sd,
    q50: quantile7(sorted, 0.5),
    q90: quantile7(sorted, 0.9),
    q95: quantile7(sorted, 0.95),
    q99: quantile7(sorted, 0.99),
    max: sorted[m - 1],
    zeroFraction: zeros / m,
    histogram,
    bimodality,
  };
}

/**
 * Combine chunk tallies covering replicates 0..M−1 × cells 0..cellCount−1 exactly once, in
 * the fixed order (replicate block, then cell block), into field p-values.
 *
 * @param frame the test's frame (from its plan)
 * @param chunks tallies of the chunk tasks, any order, any split
 * @returns observed fractions, p per lag and for the best lag, the null summary, per-cell p
 * @throws {RangeError} when the chunks do not tile the replicate × cell rectangle exactly
 * @example
 * ```ts
 * import { combineFieldMonteCarlo } from "./field_monte_carlo_summary.ts";
 * import assert from "node:assert/strict";
 * const frame = {
 *   replicates: 3, lagCount: 1, cellCount: 2, cells: Int32Array.of(0, 1), gridCells: 2,
 *   weightUnits: Float64Array.of(1, 1), totalUnits: 2, observedUnits: Float64Array.of(2),
 * };
 * const chunk = {
 *   replicateStart: 0, replicateEnd: 3, cellStart: 0, cellEnd: 2,
 *   units: Float64Array.of(0, 1, 2), exceed: Uint32Array.of(1, 0), rechecked: 0,
 * };
 * const r = combineFieldMonteCarlo(frame, [chunk]);
 * assert.equal(r.observedBest, 1);
 * assert.equal(r.pField, 0.5); // (1 + 1) / (1 + 3)
 * ```
 */
export function combineFieldMonteCarlo(
  frame: FieldMonteCarloFrame,
  chunks: readonly FieldChunkTally[],
): FieldMonteCarloResult {
  const fn = "combine Monte Carlo tallies";
  const M = frame.replicates, L = frame.lagCount, C = frame.cellCount;
  const sorted = [...chunks].sort((a, b) =>
    a.replicateStart - b.replicateStart || a.cellStart - b.cellStart
  );
  let area = 0;
  for (let i = 0; i < sorted.length; i++) {
    const a = sorted[i];
    if (
      !(a.replicateStart >= 0 && a.replicateStart < a.replicateEnd && a.replicateEnd <= M &&
        a.cellStart >= 0 && a.cellStart < a.cellEnd && a.cellEnd <= C)
    ) {
      throw new RangeError(
        `Cannot ${fn}: chunk ${a.replicateStart}..${a.replicateEnd} × ${a.cellStart}..${a.cellEnd} is outside ${M} × ${C}`,
      );
    }
    for (let j = i + 1; j < sorted.length; j++) {
      const b = sorted[j];
      if (b.replicateStart >= a.replicateEnd) break;
      if (b.cellStart < a.cellEnd && a.cellStart < b.cellEnd) {
        throw new RangeError(`Cannot ${fn}: chunks overlap`);
      }
    }
    area += (a.replicateEnd - a.replicateStart) * (a.cellEnd - a.cellStart);
  }
  if (area !== M * C) {
    throw new RangeError(`Cannot ${fn}: chunks cover ${area} of ${M * C} replicate-cells`);
  }
  const units = new Float64Array(M * L);
  const exceed = new Float64Array(C);
  for (const ch of sorted) {
    const off = ch.replicateStart * L;
    for (let i = 0; i < ch.units.length; i++) units[off + i] += ch.units[i];
    for (let c = 0; c < ch.exceed.length; c++) exceed[ch.cellStart + c] += ch.exceed[c];
  }
  const obs = frame.observedUnits;
  let obsBest = -1, obsBestIndex = 0;
  for (let j = 0; j < L; j++) {
    if (obs[j] > obsBest) {
      obsBest = obs[j];
      obsBestIndex = j;
    }
  }
  const countPerLag = new Float64Array(L);
  const best = new Float64Array(M);
  let countBest = 0;
  for (let i = 0; i < M; i++) {
    let mx = 0;
    for (let j = 0; j < L; j++) {
      const u = units[i * L + j];
      if (u >= obs[j]) countPerLag[j]++;
      if (u > mx) mx = u;
    }
    if (mx >= obsBest) countBest++;
    best[i] = mx / frame.totalUnits;
  }
  const nullBest = summariseFieldNull(best);
  const cellP = new Float64Array(frame.gridCells).fill(NaN);
  for (let c = 0; c < C; c++) cellP[frame.cells[c]] = (1 + exceed[c]) / (1 + M);
  const warnings: string[] = [];
  if (nullBest.bimodality > 5 / 9) {
    warnings.push(
      `The null distribution of the field statistic looks bimodal or very flat (bimodality coefficient ${
        nullBest.bimodality.toFixed(2)
      } > 0.56): with a nearly periodic predictor many surrogates line up with any cycle-length signal. The p-value is valid but the test has little power; look at the null histogram.`,
    );
  }
  if (nullBest.q95 > 0.25) {
    warnings.push(
      `The null distribution is wide: in 5 % of replicates at least ${
        (100 * nullBest.q95).toFixed(0)
      } % of the area is locally significant by chance.`,
    );
  }
  return {
    replicates: M,
    observedFraction: Array.from(obs, (u) => u / frame.totalUnits),
    observedBest: obsBest / frame.totalUnits,
    observedBestIndex: obsBestIndex,
    pPerLag: Array.from(countPerLag, (c) => (1 + c) / (1 + M)),
    pField: (1 + countBest) / (1 + M),
    nullBest,
    cellP,
    warnings,
  };
}
