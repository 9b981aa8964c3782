/**
 * Superposed epoch analysis (composites) of a series around key dates, with a bootstrap band
 * and significance against random epochs (Chree 1913, Phil. Trans. R. Soc. A 212, 75;
 * method and random-epoch test as in Haurwitz & Brier 1981, Mon. Weather Rev. 109, 2074).
 *
 * The composite at offset j (in samples from the epoch, −before..after) is the mean of
 * x[e_i + j] over the epochs e_i whose whole window lies inside the series; missing values
 * (NaN) are skipped offset by offset. Optionally each epoch's window is first referenced to
 * its own pre-epoch mean (offsets −before..−1).
 *
 * Uncertainty: a bootstrap over epochs (resampling the K epochs with replacement, B times;
 * percentile band; Efron & Tibshirani 1993, ch. 13). Significance: R random sets of K epochs
 * drawn uniformly within the valid range and spread so that neighbours are at least the
 * smallest observed spacing apart (the same spacing constraint as the real epochs); per-offset
 * p-values of |composite| and a family-wise p-value of the maximum |composite| over the
 * window, all as (1 + count)/(1 + R).
 *
 * @module
 */
import { quantileSorted } from "d3-array";
import { type RandomStream, randomStream } from "../random/random_stream.ts";
import { InputError } from "../errors.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";

/** Options of {@link superposedEpoch}. */
export interface SuperposedEpochOptions extends StopOptions {
  /** Samples before the epoch in the window. */
  before: number;
  /** Samples after the epoch. */
  after: number;
  /** Subtract each epoch's mean over offsets −before..−1 first. @default false */
  preEpochBaseline?: boolean;
  /** Bootstrap resamples for the band. @default 1000 */
  bootstrap?: number;
  /** Random epoch sets for significance. @default 1000 */
  randomSets?: number;
  /** Band confidence level. @default 0.95 */
  level?: number;
  /** Seed of the random streams (bootstrap b uses stream 2b, random set r uses 2r + 1). */
  seed: number;
}

/** Result of {@link superposedEpoch}. */
export interface SuperposedEpochResult {
  /** Offsets in samples, −before..after. */
  offsets: number[];
  /** Composite mean per offset (null where no epoch has a value). */
  composite: (number | null)[];
  /** Number of epochs with a value per offset. */
  count: number[];
  /** Bootstrap percentile band. */
  lower: (number | null)[];
  upper: (number | null)[];
  /** Per offset: p of |composite| against random epochs. */
  pPerOffset: (number | null)[];
  /** Family-wise p of max |composite| over the window against random epochs. */
  pFamilyWise: number;
  /** Epoch sample indices used, and those dropped because the window did not fit. */
  used: number[];
  dropped: number[];
  /** Smallest spacing between used epochs, samples (the constraint on random epochs). */
  minSpacing: number;
}

function compositeOf(
  x: Float64Array,
  epochs: ArrayLike<number>,
  before: number,
  after: number,
  baseline: boolean,
  out: Float64Array,
  count: Float64Array,
): void {
  out.fill(0);
  count.fill(0);
  for (let i = 0; i < epochs.length; i++) {
    const e = epochs[i];
    let base = 0;
    if (baseline) {
      let s = 0, m = 0;
      for (let j = -before; j < 0; j++) {
        const v = x[e + j];
        if (v === v) {
          s += v;
          m++;
        }
      }
      base = m > 0 ? s / m : NaN;
    }
    for (let j = -before; j <= after; j++) {
      const v = x[e + j] - base;
      if (v === v) {
        out[j + before] += v;
        count[j + before]++;
      }
    }
  }
  for (let j = 0; j < out.length; j++) out[j] = count[j] > 0 ? out[j] / count[j] : NaN;
}

/**
 * Draw K random epochs in [lo, hi] at least `spacing` samples apart, uniformly among such
 * sets: K sorted uniform positions in [0, hi − lo − (K − 1)·spacing], the i-th shifted by
 * lo + i·spacing (the random-epoch null of Haurwitz & Brier 1981 with the observed epochs'
 * smallest spacing kept). Draws exactly K integers from the stream.
 *
 * @param stream the random stream of this set
 * @param count number of epochs K
 * @param lo smallest allowed epoch index
 * @param hi largest allowed epoch index
 * @param spacing smallest distance between neighbouring epochs, ≥ 0
 * @param out receives the K epochs, ascending
 * @throws {RangeError} when there is no room for K epochs that far apart
 * @example
 * ```ts
 * import { randomSpacedEpochs } from "./superposed_epoch.ts";
 * import { type RandomStream, randomStream } from "../random/random_stream.ts";
 * import assert from "node:assert/strict";
 * const e = new Array<number>(3);
 * randomSpacedEpochs(randomStream(1, 0), 3, 10, 100, 30, e);
 * assert.ok(e[0] >= 10 && e[2] <= 100 && e[1] - e[0] >= 30 && e[2] - e[1] >= 30);
 * ```
 */
export function randomSpacedEpochs(
  stream: RandomStream,
  count: number,
  lo: number,
  hi: number,
  spacing: number,
  out: number[],
): void {
  const span = hi - lo - (count - 1) * spacing;
  if (span < 0) {
    throw new RangeError(
      `Cannot draw random epochs: no room for ${count} epochs ${spacing} samples apart in ${lo}..${hi}`,
    );
  }
  for (let i = 0; i < count; i++) out[i] = stream.int(0, span);
  out.length = count;
  out.sort((a, b) => a - b);
  for (let i = 0; i < count; i++) out[i] = lo + out[i] + i * spacing;
}

/**
 * Superposed epoch analysis of an evenly spaced series around epoch sample indices.
 *
 * @param x evenly spaced values; NaN marks a missing value
 * @param epochIndices sample index of each epoch (nearest sample to the key date)
 * @param options window, baseline, bootstrap and random-set counts, seed
 * @returns composite, band, p-values and the epochs used
 * @throws {InputError} when the window is invalid (field `before`/`after`), fewer than 2
 *   epochs fit inside the series or there is no room for random epochs (`epochIndices`), or
 *   counts are not positive integers (`bootstrap`/`randomSets`)
 * @throws {StoppedError} when `options.shouldStop` answers true (polled before each bootstrap
 *   replicate and each random set)
 * @example
 * ```ts
 * import { superposedEpoch } from "./superposed_epoch.ts";
 * import assert from "node:assert/strict";
 * // a bump 2 samples after every epoch on top of an alternating pattern
 * const x = Float64Array.from({ length: 300 }, (_, i) => (i % 2 ? 0.1 : -0.1));
 * const ep = [30, 80, 130, 180, 230];
 * for (const e of ep) x[e + 2] += 1;
 * const r = superposedEpoch(x, ep, { before: 5, after: 5, seed: 1, bootstrap: 200, randomSets: 200 });
 * assert.ok(Math.abs(r.composite[7]! - 0.9) < 1e-12);
 * assert.ok(r.pFamilyWise < 0.05);
 * ```
 */
export function superposedEpoch(
  x: Float64Array,
  epochIndices: readonly number[],
  options: SuperposedEpochOptions,
): SuperposedEpochResult {
  const { before, after } = options;
  const B = options.bootstrap ?? 1000, R = options.randomSets ?? 1000;
  const level = options.level ?? 0.95;
  const baseline = options.preEpochBaseline ?? false;
  const fn = "compute superposed epoch composite";
  for (const [name, v] of [["before", before], ["after", after]] as const) {
    if (!Number.isInteger(v) || v < 0) {
      throw new InputError(`Cannot ${fn}: ${name} must be a non-negative integer, got ${v}`, {
        field: name,
        reason: "out_of_range",
        value: v,
      });
    }
  }
  if (baseline && before < 1) {
    throw new InputError(`Cannot ${fn}: a pre-epoch baseline needs before ≥ 1`, {
      field: "before",
      reason: "out_of_range",
      value: before,
    });
  }
  for (const [name, v] of [["bootstrap", B], ["randomSets", R]] as const) {
    if (!Number.isInteger(v) || v < 1) {
      throw new InputError(`Cannot ${fn}: ${name} must be a positive integer, got ${v}`, {
        field: name,
        reason: "out_of_range",
        value: v,
      });
    }
  }
  const n = x.length;
  const lo = before, hi = n - 1 - after;
  const sortedEpochs = [...epochIndices].sort((a, b) => a - b);
  const used: number[] = [], dropped: number[] = [];
  for (const e of sortedEpochs) {
    if (!Number.isInteger(e)) {
      throw new InputError(`Cannot ${fn}: epoch index ${e} is not an integer`, {
        field: "epochIndices",
        reason: "invalid",
        index: epochIndices.indexOf(e),
        value: e,
      });
    }
    if (e >= lo && e <= hi) used.push(e);
    else dropped.push(e);
  }
  const K = used.length;
  if (K < 2) {
    throw new InputError(
      `Cannot ${fn}: needs at least 2 epochs whose window fits in the series, got ${K}`,
      { field: "epochIndices", reason: "too_few_points", value: K },
    );
  }
  let minSpacing = Infinity;
  for (let i = 1; i < K; i++) minSpacing = Math.min(minSpacing, used[i] - used[i - 1]);
  const w = before + after + 1;
  const comp = new Float64Array(w), cnt = new Float64Array(w);
  compositeOf(x, used, before, after, baseline, comp, cnt);
  const composite = Array.from(comp, (v) => (Number.isNaN(v) ? null : v));
  const count = Array.from(cnt);
  // bootstrap over epochs
  const boot = Array.from({ length: w }, () => new Float64Array(B));
  const bc = new Float64Array(w), bn = new Float64Array(w);
  const pick = new Array<number>(K);
  for (let b = 0; b < B; b++) {
    throwIfStopped(options, fn);
    const st = randomStream(options.seed, 2 * b);
    for (let i = 0; i < K; i++) pick[i] = used[st.int(0, K - 1)];
    compositeOf(x, pick, before, after, baseline, bc, bn);
    for (let j = 0; j < w; j++) boot[j][b] = bc[j];
  }
  const lower: (number | null)[] = [], upper: (number | null)[] = [];
  for (let j = 0; j < w; j++) {
    const vals = Array.from(boot[j].filter((v) => !Number.isNaN(v)).sort());
    if (vals.length === 0) {
      lower.push(null);
      upper.push(null);
    } else {
      // R's type-7 quantiles (Hyndman & Fan 1996), as d3-array computes them
      lower.push(quantileSorted(vals, (1 - level) / 2)!);
      upper.push(quantileSorted(vals, (1 + level) / 2)!);
    }
  }
  // random epochs honouring the minimum spacing: K sorted uniform positions in
  // [0, span − (K − 1)·g], the i-th shifted by i·g
  const g = Number.isFinite(minSpacing) ? minSpacing : 0;
  const span = hi - lo - (K - 1) * g;
  if (span < 0) {
    throw new InputError(
      `Cannot ${fn}: no room for ${K} random epochs ${g} samples apart in the valid range`,
      { field: "epochIndices", reason: "invalid", value: K },
    );
  }
  let obsMax = 0;
  for (const v of comp) if (!Number.isNaN(v)) obsMax = Math.max(obsMax, Math.abs(v));
  const exceed = new Float64Array(w);
  let famEx = 0;
  const rnd = new Array<number>(K);
  for (let r = 0; r < R; r++) {
    throwIfStopped(options, fn);
    const st = randomStream(options.seed, 2 * r + 1);
    randomSpacedEpochs(st, K, lo, hi, g, rnd);
    compositeOf(x, rnd, before, after, baseline, bc, bn);
    let mx = 0;
    for (let j = 0; j < w; j++) {
      const v = Math.abs(bc[j]);
      if (Number.isNaN(v)) continue;
      if (!Number.isNaN(comp[j]) && v >= Math.abs(comp[j]) - 1e-12) exceed[j]++;
      mx = Math.max(mx, v);
    }
    if (mx >= obsMax - 1e-12) famEx++;
  }
  const offsets = Array.from({ length: w }, (_, j) => j - before);
  return {
    offsets,
    composite,
    count,
    lower,
    upper,
    pPerOffset: Array.from(exceed, (e, j) => (Number.isNaN(comp[j]) ? null : (1 + e) / (1 + R))),
    pFamilyWise: (1 + famEx) / (1 + R),
    used,
    dropped,
    minSpacing: Number.isFinite(minSpacing) ? minSpacing : 0,
  };
}
