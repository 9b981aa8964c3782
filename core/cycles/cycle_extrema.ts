/**
 * Minima and maxima of a smoothed activity series, the turning points from which solar cycles
 * are defined (each cycle runs from one smoothed minimum to the next; Hathaway 2010, Living
 * Rev. Sol. Phys. 7, 1, §4).
 *
 * @module
 */

import { InputError } from "../errors.ts";

/** One turning point of the smoothed series. */
export interface Extremum {
  kind: "minimum" | "maximum";
  /** Index into the input arrays. */
  index: number;
  /** Decimal year. */
  time: number;
  /** Smoothed value, input units. */
  value: number;
  /**
   * Topographic prominence, input units: for a minimum, how far the series must rise before a
   * lower point is reached on either side (the smaller of the two climbs); for a maximum,
   * how far it falls from the maximum to the lowest point after it (or before it, for a
   * maximum preceding the first minimum).
   */
  prominence: number;
  /**
   * True for a maximum not yet confirmed: the latest, or earliest, maximum that the series has
   * not yet fallen from by at least the prominence threshold (e.g. a cycle still rising).
   */
  provisional: boolean;
}

/** Options of {@link findCycleExtrema}. */
export interface CycleExtremaOptions {
  /**
   * Shortest time between two minima, years; of two candidates closer than this, the lower
   * one is kept.
   * @default 7 (solar cycles last about 9 to 14 years: Hathaway 2010, Living Rev. Sol. Phys. 7, 1)
   */
  minSeparation?: number;
  /**
   * Smallest prominence of a minimum (and fall after a maximum), input units.
   * @default 0.1 × (max − min of the smoothed series)
   */
  prominence?: number;
}

/**
 * The default prominence threshold of {@link findCycleExtrema}: a tenth of the range of the
 * finite values (common practice).
 *
 * @param value smoothed values (NaN = missing), input units
 * @returns 0.1 × (max − min), input units (−Infinity without finite values)
 * @example
 * ```ts
 * import { defaultCycleProminence } from "./cycle_extrema.ts";
 * import assert from "node:assert/strict";
 * assert.equal(defaultCycleProminence([NaN, 20, 220, 120]), 20);
 * ```
 */
export function defaultCycleProminence(value: ArrayLike<number>): number {
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < value.length; i++) {
    const x = value[i];
    if (x < lo) lo = x;
    if (x > hi) hi = x;
  }
  return 0.1 * (hi - lo);
}

/**
 * Find cycle minima and maxima of a smoothed series.
 *
 * Method (common practice, the peak-finding rules of e.g. scipy.signal.find_peaks applied to
 * the negated series): every local minimum (the middle of a flat bottom) is a candidate; its
 * prominence is min(highest point to the left before a lower point, same to the right) −
 * value; candidates below the prominence threshold are dropped; then, lowest first, any
 * candidate within `minSeparation` of a kept minimum is dropped. Between two consecutive
 * minima the maximum is the highest smoothed value (the first, if tied). Before the first and
 * after the last minimum a maximum is reported only if it is an interior local maximum; it is
 * provisional unless the series has fallen from it by the prominence threshold.
 *
 * Edge cases: NaN values (undefined ends of a smoothing, gaps) are skipped; a minimum at the
 * first or last defined point is never reported (the series may continue to fall). Fewer than
 * 3 defined points give no extrema. Cost O(N): both climbs of every point come from one
 * monotone-stack pass each way ({@link climbHeights}).
 *
 * @param time decimal years, increasing, same length as value
 * @param value smoothed values (NaN = undefined)
 * @param options separation and prominence rules
 * @returns extrema in time order (minima and maxima alternate)
 * @throws {InputError} when lengths differ or an option is not a positive finite number
 * @example
 * ```ts
 * import { findCycleExtrema } from "./cycle_extrema.ts";
 * import assert from "node:assert/strict";
 * // an 11-year cosine sampled yearly with minima at years 5 and 16
 * const t = Array.from({ length: 25 }, (_, i) => i);
 * const v = t.map((x) => 50 - 50 * Math.cos(2 * Math.PI * (x - 5) / 11));
 * const ex = findCycleExtrema(t, v, { minSeparation: 7 });
 * const minima = ex.filter((e) => e.kind === "minimum").map((e) => e.time);
 * assert.deepEqual(minima, [5, 16]);
 * ```
 */
export function findCycleExtrema(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  options: CycleExtremaOptions = {},
): Extremum[] {
  if (time.length !== value.length) {
    throw new InputError(
      `Cannot find cycle extrema: time has ${time.length} points but value has ${value.length}`,
      { field: "value", reason: "length_mismatch", value: value.length },
    );
  }
  const sep = options.minSeparation ?? 7;
  if (!(Number.isFinite(sep) && sep > 0)) {
    throw new InputError(
      `Cannot find cycle extrema: minSeparation must be a positive number of years, current value is ${sep}`,
      { field: "minSeparation", reason: "out_of_range", value: sep },
    );
  }
  // defined points only (typed arrays: no per-point objects), their range, and their turning
  // points: the ends and every point not strictly inside a monotone run (turning points and
  // plateau samples; every local minimum's first sample is one), found as the next point comes
  const idx = new Int32Array(value.length);
  const v = new Float64Array(value.length);
  const turn = new Int32Array(value.length);
  let n = 0, m = 0, lo = Infinity, hi = -Infinity;
  for (let i = 0; i < value.length; i++) {
    const x = value[i];
    if (!Number.isFinite(x)) continue;
    idx[n] = i;
    v[n] = x;
    if (x < lo) lo = x;
    if (x > hi) hi = x;
    if (n === 0) turn[m++] = 0;
    else if (n >= 2) {
      const a = v[n - 2], b = v[n - 1];
      if (!((a < b && b < x) || (a > b && b > x))) turn[m++] = n - 1;
    }
    n++;
  }
  if (n > 1) turn[m++] = n - 1;
  if (n < 3) return [];
  const prom = options.prominence ?? 0.1 * (hi - lo); // defaultCycleProminence(v)
  if (options.prominence !== undefined && !(Number.isFinite(prom) && prom > 0)) {
    throw new InputError(
      `Cannot find cycle extrema: prominence must be a positive finite number, current value is ${prom}`,
      { field: "prominence", reason: "out_of_range", value: prom },
    );
  }
  if (!(hi > lo)) return [];

  // local minima candidates (plateaus: the middle sample), with their prominence from the
  // two climbs of {@link climbHeights}; every candidate's first sample is a turning point
  const turns = turn.subarray(0, m);
  const { left, right } = climbHeights(v, turns);
  const cands: { k: number; prom: number }[] = [];
  for (let t = 0; t < turns.length; t++) {
    const k = turns[t];
    if (k < 1 || k >= n - 1 || !(v[k] < v[k - 1])) continue;
    let e = k;
    while (e + 1 < n && v[e + 1] === v[k]) e++;
    if (e + 1 < n && v[e + 1] > v[k]) {
      cands.push({ k: (k + e) >> 1, prom: Math.min(left[t], right[t]) - v[k] });
    }
  }
  const strong = cands.filter((c) => c.prom >= prom);
  strong.sort((a, b) => v[a.k] - v[b.k] || a.k - b.k);
  const kept: { k: number; prom: number }[] = [];
  for (const c of strong) {
    const tc = time[idx[c.k]];
    if (kept.every((q) => Math.abs(time[idx[q.k]] - tc) >= sep)) kept.push(c);
  }
  kept.sort((a, b) => a.k - b.k);

  const out: Extremum[] = [];
  const at = (k: number) => ({ index: idx[k], time: time[idx[k]], value: v[k] });
  const argmax = (from: number, to: number) => { // inclusive range of defined positions
    let best = from;
    for (let j = from + 1; j <= to; j++) if (v[j] > v[best]) best = j;
    return best;
  };
  const minOf = (from: number, to: number) => {
    let m = Infinity;
    for (let j = from; j <= to; j++) if (v[j] < m) m = v[j];
    return m;
  };
  if (kept.length === 0) return out;
  // maximum before the first minimum
  const first = kept[0].k;
  if (first >= 2) {
    const m = argmax(0, first - 1);
    if (m > 0) {
      const fall = v[m] - minOf(0, m);
      out.push({ kind: "maximum", ...at(m), prominence: fall, provisional: fall < prom });
    }
  }
  for (let q = 0; q < kept.length; q++) {
    out.push({ kind: "minimum", ...at(kept[q].k), prominence: kept[q].prom, provisional: false });
    if (q + 1 < kept.length) {
      const m = argmax(kept[q].k + 1, kept[q + 1].k - 1);
      const fall = v[m] - v[kept[q + 1].k];
      out.push({ kind: "maximum", ...at(m), prominence: fall, provisional: false });
    }
  }
  const last = kept[kept.length - 1].k;
  if (last <= n - 3) {
    const m = argmax(last + 1, n - 1);
    if (m < n - 1) {
      const fall = v[m] - minOf(m, n - 1);
      out.push({ kind: "maximum", ...at(m), prominence: fall, provisional: fall < prom });
    }
  }
  return out;
}

/**
 * The two climbs of the points of a series that matter for prominences, the turning points
 * (the ends, and every point not strictly inside a monotone run): `left[t]` = max v[j0 + 1 .. k] for k = turns[t], where j0 is the
 * nearest index before k with v[j0] < v[k] (−1 when there is none), and `right[t]` =
 * max v[k .. j1 − 1], where j1 is the nearest index after k with v[j1] < v[k] (n when there is
 * none). A point strictly inside a monotone run never bounds or tops such a climb (its lower
 * neighbour is nearer, its higher neighbour is higher), so the turning points suffice: a tenth
 * of the points of a smoothed monthly record.
 *
 * Method: the "all nearest smaller values" stack (Berkman, Schieber & Vishkin 1993, J.
 * Algorithms 14, 344), the same monotone-wedge idea as Lemire's streaming maximum–minimum
 * filter (Lemire 2006, Nordic J. Computing 13, 328): the stack holds the points whose value is
 * below everything after them, each with the maximum of the stretch it closes; a new point
 * pops the entries not strictly below it and takes the largest of their maxima. Each point is
 * pushed and popped once per direction: O(N) where climbing from each candidate is O(N·K).
 * Written by hand: no maintained JS library offers it over typed arrays.
 *
 * @param v finite values
 * @param turns indices into v of its turning points, increasing
 * @returns the left and right climbs at each turning point, same units as v
 */
function climbHeights(
  v: Float64Array,
  turns: Int32Array,
): { left: Float64Array; right: Float64Array } {
  const m = turns.length;
  const left = new Float64Array(m), right = new Float64Array(m);
  const stack = new Int32Array(m); // positions in turns
  let top = 0;
  for (let t = 0; t < m; t++) {
    const x = v[turns[t]];
    let h = x;
    while (top > 0 && v[turns[stack[top - 1]]] >= x) {
      const s = left[stack[--top]];
      if (s > h) h = s;
    }
    left[t] = h;
    stack[top++] = t;
  }
  top = 0;
  for (let t = m - 1; t >= 0; t--) {
    const x = v[turns[t]];
    let h = x;
    while (top > 0 && v[turns[stack[top - 1]]] >= x) {
      const s = right[stack[--top]];
      if (s > h) h = s;
    }
    right[t] = h;
    stack[top++] = t;
  }
  return { left, right };
}
