/**
 * Averaging a series into calendar periods: the one binning pass behind resampling,
 * alignment, model calibration and reconstruction axes, and the keyed means the irradiance
 * analyses read at target periods.
 *
 * Coverage rules, stated once:
 * - a missing value (NaN) is not an observation: it is neither summed nor counted, but it
 *   still counts as an input point of its period (`points`);
 * - a period's mean is formed from the values present in it; it is kept ("covered") only when
 *   at least `minCount` values are present (default 1); otherwise it is a gap, never a mean of
 *   too few values. {@link resampleMeans} adds its per-resolution thresholds on top (e.g. 20
 *   days for a monthly mean, 10 months for an annual mean, a longest run of missing days);
 * - periods are those of core/series/period_key.ts: an instant belongs to the period holding
 *   its calendar date.
 *
 * @module
 */
import type { CalendarResolution } from "../time/mod.ts";
import { InputError } from "../errors.ts";
import { periodKeyer } from "./period_key.ts";

/** Most periods one series may span (a daily series of about 13,700 years). */
export const MAX_PERIODS = 5_000_000;

/** Sums and counts per calendar period (result of {@link periodSums}). */
export interface PeriodSums {
  resolution: CalendarResolution;
  /** Key of the first period; period j has key `firstKey + j`. Periods run from the first to
   * the last holding an input point. */
  firstKey: number;
  /** Sum of the present (finite) values per period. */
  sum: Float64Array;
  /** Number of present values per period. */
  count: Int32Array;
  /** Σσ² of the present values per period, or null without uncertainties. */
  sumSquaredUncertainty: Float64Array | null;
  /** Input points per period, present or missing. */
  points: Int32Array;
}

/**
 * Sum a series into calendar periods in one pass (sums in input order, so a mean equals the
 * plain left-to-right mean of its values). O(n + periods) with typed arrays.
 *
 * @param time decimal years, finite, any order
 * @param value values; NaN marks a missing value
 * @param resolution the period length
 * @param uncertainty one-sigma uncertainty per point, or null @default null
 * @returns {@link PeriodSums}; with no points, zero periods
 * @throws {InputError} `time` (index) when a time is not finite; `value`/`uncertainty` when a
 *   length differs; `time` when the series spans more than {@link MAX_PERIODS} periods
 * @example
 * ```ts
 * import { periodSums } from "./period_means.ts";
 * import assert from "node:assert/strict";
 * const s = periodSums([2001.01, 2001.02, 2001.2], [1, NaN, 5], "monthly");
 * assert.equal(s.firstKey, 2001 * 12);
 * assert.deepEqual([...s.count], [1, 0, 1]);
 * assert.deepEqual([...s.points], [2, 0, 1]);
 * ```
 */
export function periodSums(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  resolution: CalendarResolution,
  uncertainty: ArrayLike<number> | null = null,
): PeriodSums {
  const n = time.length;
  if (value.length !== n) {
    throw new InputError(
      `Cannot average into periods: value has ${value.length} entries but time has ${n}`,
      { field: "value", reason: "length_mismatch", value: value.length },
    );
  }
  if (uncertainty && uncertainty.length !== n) {
    throw new InputError(
      `Cannot average into periods: uncertainty has ${uncertainty.length} entries but time has ${n}`,
      { field: "uncertainty", reason: "length_mismatch", value: uncertainty.length },
    );
  }
  const keys = new Float64Array(n);
  const keyOf = periodKeyer(resolution);
  let k0 = Infinity, k1 = -Infinity;
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(time[i])) {
      throw new InputError(
        `Cannot average into periods: time[${i}] is not finite (${time[i]})`,
        { field: "time", reason: "not_finite", index: i, value: time[i] },
      );
    }
    const k = keyOf(time[i]);
    keys[i] = k;
    if (k < k0) k0 = k;
    if (k > k1) k1 = k;
  }
  const m = n === 0 ? 0 : k1 - k0 + 1;
  if (m > MAX_PERIODS) {
    throw new InputError(
      `Cannot average into periods: ${m} ${resolution} periods is too many (at most ${MAX_PERIODS})`,
      { field: "time", reason: "out_of_range", value: m },
    );
  }
  const sum = new Float64Array(m), count = new Int32Array(m), points = new Int32Array(m);
  const sq = uncertainty ? new Float64Array(m) : null;
  for (let i = 0; i < n; i++) {
    const j = keys[i] - k0;
    points[j]++;
    const v = value[i];
    if (!Number.isFinite(v)) continue;
    sum[j] += v;
    count[j]++;
    if (sq && uncertainty) sq[j] += uncertainty[i] * uncertainty[i];
  }
  return {
    resolution,
    firstKey: n === 0 ? 0 : k0,
    sum,
    count,
    sumSquaredUncertainty: sq,
    points,
  };
}

/** Means of the covered periods of a series, by key (result of {@link periodMeansByKey}). */
export interface PeriodMeansByKey {
  resolution: CalendarResolution;
  /** Keys of the covered periods, increasing. */
  keys: Int32Array;
  /** Mean of the present values of each covered period. */
  mean: Float64Array;
  /** Number of values averaged. */
  count: Int32Array;
  /** The coverage rule applied: values a period needs. */
  minCount: number;
}

/** Options of {@link periodMeansByKey}. */
export interface PeriodMeansOptions {
  /** Present values a period needs for a mean. @default 1 */
  minCount?: number;
}

/**
 * Means per calendar period, keeping only the periods that meet coverage (at least `minCount`
 * present values; see the module's coverage rules), as sorted keys with their means.
 *
 * @param series `{ time, value }`: decimal years (any order), values with NaN for missing
 * @param resolution the period length
 * @param options coverage threshold
 * @returns {@link PeriodMeansByKey}; empty when no period is covered
 * @throws {InputError} as {@link periodSums}; `minCount` when it is not a positive integer
 * @example
 * ```ts
 * import { periodMeansByKey } from "./period_means.ts";
 * import assert from "node:assert/strict";
 * const m = periodMeansByKey({ time: [2001.01, 2001.02, 2001.2], value: [1, 3, 5] }, "monthly");
 * assert.deepEqual([...m.keys], [2001 * 12, 2001 * 12 + 2]);
 * assert.deepEqual([...m.mean], [2, 5]);
 * assert.deepEqual([...m.count], [2, 1]);
 * ```
 */
export function periodMeansByKey(
  series: { time: ArrayLike<number>; value: ArrayLike<number> },
  resolution: CalendarResolution,
  options: PeriodMeansOptions = {},
): PeriodMeansByKey {
  const minCount = options.minCount ?? 1;
  if (!Number.isInteger(minCount) || minCount < 1) {
    throw new InputError(
      `Cannot average into periods: minCount must be a positive integer, current value is ${minCount}`,
      { field: "minCount", reason: "out_of_range", value: minCount },
    );
  }
  const s = periodSums(series.time, series.value, resolution);
  let m = 0;
  for (let j = 0; j < s.count.length; j++) if (s.count[j] >= minCount) m++;
  const keys = new Int32Array(m), mean = new Float64Array(m), count = new Int32Array(m);
  let w = 0;
  for (let j = 0; j < s.count.length; j++) {
    if (s.count[j] < minCount) continue;
    keys[w] = s.firstKey + j;
    mean[w] = s.sum[j] / s.count[j];
    count[w] = s.count[j];
    w++;
  }
  return { resolution, keys, mean, count, minCount };
}

/**
 * Read period means at given keys: NaN where the period is not covered.
 *
 * @param means keyed means from {@link periodMeansByKey}
 * @param keys keys to read, any order
 * @returns values aligned with `keys`
 * @example
 * ```ts
 * import { meansAtPeriodKeys, periodMeansByKey } from "./period_means.ts";
 * import assert from "node:assert/strict";
 * const c = periodMeansByKey({ time: [2001.5, 2003.5], value: [1, 3] }, "annual");
 * const v = meansAtPeriodKeys(c, [2001, 2002, 2003]);
 * assert.equal(v[0], 1);
 * assert.ok(Number.isNaN(v[1]));
 * assert.equal(v[2], 3);
 * ```
 */
export function meansAtPeriodKeys(
  means: PeriodMeansByKey,
  keys: ArrayLike<number>,
): Float64Array {
  const out = new Float64Array(keys.length).fill(NaN);
  const n = means.keys.length;
  if (n === 0) return out;
  const lo = means.keys[0], hi = means.keys[n - 1];
  const span = hi - lo + 1;
  // a dense index when affordable, else binary search
  if (span <= 4 * n + 1024) {
    const idx = new Int32Array(span).fill(-1);
    for (let i = 0; i < n; i++) idx[means.keys[i] - lo] = i;
    for (let i = 0; i < keys.length; i++) {
      const k = keys[i];
      if (k >= lo && k <= hi) {
        const j = idx[k - lo];
        if (j >= 0) out[i] = means.mean[j];
      }
    }
    return out;
  }
  for (let i = 0; i < keys.length; i++) {
    let a = 0, b = n - 1;
    const k = keys[i];
    while (a <= b) {
      const mid = (a + b) >> 1;
      if (means.keys[mid] === k) {
        out[i] = means.mean[mid];
        break;
      }
      if (means.keys[mid] < k) a = mid + 1;
      else b = mid - 1;
    }
  }
  return out;
}

/**
 * Means of a series at given period keys in one call: {@link periodMeansByKey} then
 * {@link meansAtPeriodKeys}.
 *
 * @param series `{ time, value }` (NaN for missing)
 * @param resolution the period length of `keys`
 * @param keys keys to read
 * @param options coverage threshold
 * @returns means aligned with `keys`, NaN where a period is not covered
 * @throws {InputError} as {@link periodMeansByKey}
 * @example
 * ```ts
 * import { seriesAtPeriodKeys } from "./period_means.ts";
 * import assert from "node:assert/strict";
 * const v = seriesAtPeriodKeys({ time: [2001.1, 2001.9], value: [1, 3] }, "annual", [2001]);
 * assert.equal(v[0], 2);
 * ```
 */
export function seriesAtPeriodKeys(
  series: { time: ArrayLike<number>; value: ArrayLike<number> },
  resolution: CalendarResolution,
  keys: ArrayLike<number>,
  options: PeriodMeansOptions = {},
): Float64Array {
  return meansAtPeriodKeys(periodMeansByKey(series, resolution, options), keys);
}
