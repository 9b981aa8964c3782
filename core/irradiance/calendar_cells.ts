/**
 * Calendar cells (days, months, years) as integer keys, for aligning series of different
 * resolutions and averaging to coarser ones. A daily key is the day number since 1970-01-01,
 * a monthly key is 12·year + month − 1, an annual key is the year.
 *
 * @module
 */
import { daysBeforeMonth, daysFromCivil, daysInMonth, daysInYear } from "../time/calendar.ts";

/** A calendar resolution for cells. */
export type CellResolution = "daily" | "monthly" | "annual";

/**
 * The key of the cell containing decimal year t (a 1e-6-day tolerance absorbs rounding, as in
 * the time model).
 *
 * @param t decimal year, finite
 * @param resolution "daily", "monthly" or "annual"
 * @returns integer key
 * @example
 * ```ts
 * import { cellKey } from "./calendar_cells.ts";
 * import assert from "node:assert/strict";
 * assert.equal(cellKey(1970 + 0.5 / 365, "daily"), 0);
 * assert.equal(cellKey(2001.04, "monthly"), 2001 * 12);
 * assert.equal(cellKey(2001.99, "annual"), 2001);
 * ```
 */
export function cellKey(t: number, resolution: CellResolution): number {
  const year = Math.floor(t);
  if (resolution === "annual") return year;
  const diy = daysInYear(year);
  const doy = Math.floor((t - year) * diy + 1e-6);
  if (doy >= diy) return resolution === "daily" ? daysFromCivil(year + 1, 1, 1) : (year + 1) * 12;
  if (resolution === "daily") return daysFromCivil(year, 1, 1) + doy;
  let m = 1;
  while (m < 12 && daysBeforeMonth(year, m + 1) <= doy) m++;
  return year * 12 + m - 1;
}

/**
 * Start, middle and end (decimal years, end exclusive) and length in days of a cell.
 *
 * @param key cell key from {@link cellKey}
 * @param resolution the key's resolution
 * @returns `{ start, middle, end, days }`
 * @example
 * ```ts
 * import { cellBounds } from "./calendar_cells.ts";
 * import assert from "node:assert/strict";
 * const feb = cellBounds(2023 * 12 + 1, "monthly");
 * assert.equal(feb.days, 28);
 * assert.equal(feb.middle, 2023 + 45 / 365);
 * assert.equal(cellBounds(2024, "annual").days, 366);
 * ```
 */
export function cellBounds(
  key: number,
  resolution: CellResolution,
): { start: number; middle: number; end: number; days: number } {
  if (resolution === "annual") {
    return { start: key, middle: key + 0.5, end: key + 1, days: daysInYear(key) };
  }
  if (resolution === "monthly") {
    const year = Math.floor(key / 12), month = key - year * 12 + 1;
    const diy = daysInYear(year), a = daysBeforeMonth(year, month), len = daysInMonth(year, month);
    return {
      start: year + a / diy,
      middle: year + (a + len / 2) / diy,
      end: month === 12 ? year + 1 : year + (a + len) / diy,
      days: len,
    };
  }
  // daily: find the year of day number `key`
  let year = 1970 + Math.floor(key / 365.2425);
  while (daysFromCivil(year, 1, 1) > key) year--;
  while (daysFromCivil(year + 1, 1, 1) <= key) year++;
  const diy = daysInYear(year), i = key - daysFromCivil(year, 1, 1);
  return {
    start: year + i / diy,
    middle: year + (i + 0.5) / diy,
    end: i + 1 === diy ? year + 1 : year + (i + 1) / diy,
    days: 1,
  };
}

/** Per-cell means of a series (result of {@link cellMeans}). */
export interface CellMeans {
  resolution: CellResolution;
  /** Sorted cell keys that hold at least one finite value. */
  keys: Int32Array;
  /** Mean of the finite values in each cell. */
  mean: Float64Array;
  /** Number of values averaged. */
  count: Int32Array;
}

/**
 * Average a series into calendar cells; NaN values are skipped. Runs in O(n + range of
 * keys) with typed arrays (no per-point allocation).
 *
 * @param time decimal years (any order)
 * @param value values, same length
 * @param resolution cell resolution
 * @returns {@link CellMeans} (empty when no finite value)
 * @throws {RangeError} when lengths differ or a time is not finite
 * @example
 * ```ts
 * import { cellMeans } from "./calendar_cells.ts";
 * import assert from "node:assert/strict";
 * const m = cellMeans([2001.01, 2001.02, 2001.2], [1, 3, 5], "monthly");
 * assert.deepEqual([...m.mean], [2, 5]);
 * assert.deepEqual([...m.count], [2, 1]);
 * ```
 */
export function cellMeans(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  resolution: CellResolution,
): CellMeans {
  const n = time.length;
  if (value.length !== n) {
    throw new RangeError(`Cannot average into cells: ${n} times but ${value.length} values`);
  }
  const keys = new Int32Array(n);
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(time[i])) {
      throw new RangeError(`Cannot average into cells: time at index ${i} is ${time[i]}`);
    }
    const k = cellKey(time[i], resolution);
    keys[i] = k;
    if (Number.isFinite(value[i])) {
      if (k < lo) lo = k;
      if (k > hi) hi = k;
    }
  }
  if (lo > hi) {
    return {
      resolution,
      keys: new Int32Array(0),
      mean: new Float64Array(0),
      count: new Int32Array(0),
    };
  }
  const span = hi - lo + 1;
  const sum = new Float64Array(span);
  const cnt = new Int32Array(span);
  for (let i = 0; i < n; i++) {
    const v = value[i];
    if (!Number.isFinite(v)) continue;
    const j = keys[i] - lo;
    sum[j] += v;
    cnt[j]++;
  }
  let m = 0;
  for (let j = 0; j < span; j++) if (cnt[j] > 0) m++;
  const outK = new Int32Array(m), outM = new Float64Array(m), outC = new Int32Array(m);
  let w = 0;
  for (let j = 0; j < span; j++) {
    if (cnt[j] > 0) {
      outK[w] = lo + j;
      outM[w] = sum[j] / cnt[j];
      outC[w] = cnt[j];
      w++;
    }
  }
  return { resolution, keys: outK, mean: outM, count: outC };
}

/**
 * Look up cell means at given keys: NaN where the cell has no value.
 *
 * @param cells per-cell means
 * @param keys sorted or unsorted keys to look up
 * @returns values aligned with `keys`
 * @example
 * ```ts
 * import { cellMeans, valuesAtKeys } from "./calendar_cells.ts";
 * import assert from "node:assert/strict";
 * const c = cellMeans([2001.5, 2003.5], [1, 3], "annual");
 * const v = valuesAtKeys(c, Int32Array.from([2001, 2002, 2003]));
 * assert.equal(v[0], 1);
 * assert.ok(Number.isNaN(v[1]));
 * assert.equal(v[2], 3);
 * ```
 */
export function valuesAtKeys(cells: CellMeans, keys: ArrayLike<number>): Float64Array {
  const out = new Float64Array(keys.length).fill(NaN);
  const n = cells.keys.length;
  if (n === 0) return out;
  const lo = cells.keys[0], hi = cells.keys[n - 1];
  const span = hi - lo + 1;
  // dense index when affordable, else binary search
  if (span <= 4 * n + 1024) {
    const idx = new Int32Array(span).fill(-1);
    for (let i = 0; i < n; i++) idx[cells.keys[i] - lo] = i;
    for (let i = 0; i < keys.length; i++) {
      const k = keys[i];
      if (k >= lo && k <= hi) {
        const j = idx[k - lo];
        if (j >= 0) out[i] = cells.mean[j];
      }
    }
    return out;
  }
  for (let i = 0; i < keys.length; i++) {
    let a = 0, b = n - 1;
    const k = keys[i];
    while (a <= b) {
      const mid = (a + b) >> 1;
      if (cells.keys[mid] === k) {
        out[i] = cells.mean[mid];
        break;
      }
      if (cells.keys[mid] < k) a = mid + 1;
      else b = mid - 1;
    }
  }
  return out;
}

/**
 * Middles and lengths (days) of the consecutive cells with keys k0..k1, computed
 * incrementally (no per-cell calendar search), for building long target axes fast.
 *
 * @param k0 first key
 * @param k1 last key (≥ k0)
 * @param resolution cell resolution
 * @returns `{ middle, days }` of length k1 − k0 + 1
 * @throws {RangeError} when k1 < k0
 * @example
 * ```ts
 * import { cellBounds, cellSequence } from "./calendar_cells.ts";
 * import assert from "node:assert/strict";
 * const s = cellSequence(0, 400, "daily");
 * assert.equal(s.middle[399], cellBounds(399, "daily").middle);
 * assert.equal(s.days[0], 1);
 * ```
 */
export function cellSequence(
  k0: number,
  k1: number,
  resolution: CellResolution,
): { middle: Float64Array; days: Float64Array } {
  if (!(k1 >= k0)) {
    throw new RangeError(`Cannot build cell sequence: last key ${k1} is before first key ${k0}`);
  }
  const n = k1 - k0 + 1;
  const middle = new Float64Array(n), days = new Float64Array(n);
  if (resolution !== "daily") {
    for (let i = 0; i < n; i++) {
      const b = cellBounds(k0 + i, resolution);
      middle[i] = b.middle;
      days[i] = b.days;
    }
    return { middle, days };
  }
  const first = cellBounds(k0, "daily");
  let year = Math.floor(first.start + 1e-9);
  let yearStart = daysFromCivil(year, 1, 1), diy = daysInYear(year);
  for (let i = 0; i < n; i++) {
    const k = k0 + i;
    if (k - yearStart >= diy) {
      year++;
      yearStart = daysFromCivil(year, 1, 1);
      diy = daysInYear(year);
    }
    middle[i] = year + (k - yearStart + 0.5) / diy;
    days[i] = 1;
  }
  return { middle, days };
}
