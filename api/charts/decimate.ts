/**
 * Display decimation for long series: per pixel column keep the first, minimum, maximum and
 * last point (the "M4" aggregation of Jugel et al. 2014, Proc. VLDB Endow. 7(10), 797), so a
 * polyline through the kept points is pixel-identical to the full one while a 100 000-point
 * daily record becomes a few thousand points. Gaps (null values) are kept as gaps.
 *
 * Written by hand: the charting libraries on the registry either need a DOM or decimate by
 * dropping points (which hides spikes such as sunspot dips in TSI).
 *
 * @module
 */

export interface XY {
  x: number[];
  y: (number | null)[];
}

/**
 * M4 decimation of (x, y) into `columns` equal bins over [x0, x1]. Points outside the range
 * are dropped except the nearest one on each side (so a clipped line runs to the edge).
 * Returns the input (copied as arrays) when it has no more than 4 points per column.
 *
 * @example
 * ```ts
 * import { decimateM4 } from "./decimate.ts";
 * import assert from "node:assert/strict";
 * const x = Array.from({ length: 1000 }, (_, i) => i / 999);
 * const y = x.map((v, i) => (i === 500 ? 10 : Math.sin(v)));
 * const d = decimateM4(x, y, 0, 1, 10);
 * assert.ok(d.x.length <= 40);
 * assert.ok(d.y.includes(10)); // the spike survives
 * ```
 */
export function decimateM4(
  x: ArrayLike<number>,
  y: ArrayLike<number | null>,
  x0: number,
  x1: number,
  columns: number,
): XY {
  const n = Math.min(x.length, y.length);
  // Visible index range, widened by one point each side.
  let a = 0, b = n - 1;
  while (a < n && x[a] < x0) a++;
  while (b >= 0 && x[b] > x1) b--;
  a = Math.max(0, a - 1);
  b = Math.min(n - 1, b + 1);
  if (b < a) return { x: [], y: [] };
  const count = b - a + 1;
  if (count <= 4 * columns || !(x1 > x0)) {
    return {
      x: Array.from({ length: count }, (_, i) => x[a + i]),
      y: Array.from({ length: count }, (_, i) => y[a + i]),
    };
  }
  const outX: number[] = [];
  const outY: (number | null)[] = [];
  const w = (x1 - x0) / columns;
  let col = NaN;
  let fi = -1, li = -1, mini = -1, maxi = -1;
  const flush = () => {
    if (fi < 0) return;
    const idx = [...new Set([fi, mini, maxi, li])].sort((p, q) => p - q);
    for (const i of idx) {
      outX.push(x[i]);
      outY.push(y[i]);
    }
    fi =
      li =
      mini =
      maxi =
        -1;
  };
  for (let i = a; i <= b; i++) {
    const v = y[i];
    if (v === null || !Number.isFinite(v)) {
      flush();
      if (outY.length === 0 || outY[outY.length - 1] !== null) {
        outX.push(x[i]);
        outY.push(null);
      }
      col = NaN;
      continue;
    }
    const c = Math.floor((x[i] - x0) / w);
    if (c !== col) {
      flush();
      col = c;
    }
    if (fi < 0) fi = mini = maxi = i;
    li = i;
    if (v < (y[mini] as number)) mini = i;
    if (v > (y[maxi] as number)) maxi = i;
  }
  flush();
  return { x: outX, y: outY };
}

/**
 * Decimation of a band (lower, upper): per pixel column the lowest lower and the highest
 * upper bound, at the column's first and last x, so the drawn envelope never shrinks.
 */
export function decimateBand(
  x: ArrayLike<number>,
  lower: ArrayLike<number | null>,
  upper: ArrayLike<number | null>,
  x0: number,
  x1: number,
  columns: number,
): { x: number[]; lower: (number | null)[]; upper: (number | null)[] } {
  const n = Math.min(x.length, lower.length, upper.length);
  let a = 0, b = n - 1;
  while (a < n && x[a] < x0) a++;
  while (b >= 0 && x[b] > x1) b--;
  a = Math.max(0, a - 1);
  b = Math.min(n - 1, b + 1);
  const ox: number[] = [], ol: (number | null)[] = [], ou: (number | null)[] = [];
  if (b < a) return { x: ox, lower: ol, upper: ou };
  const count = b - a + 1;
  if (count <= 2 * columns || !(x1 > x0)) {
    for (let i = a; i <= b; i++) ox.push(x[i]), ol.push(lower[i]), ou.push(upper[i]);
    return { x: ox, lower: ol, upper: ou };
  }
  const w = (x1 - x0) / columns;
  let col = NaN, first = -1, last = -1, lo = Infinity, hi = -Infinity;
  const flush = () => {
    if (first < 0) return;
    ox.push(x[first], x[last]);
    ol.push(lo, lo);
    ou.push(hi, hi);
    first = last = -1;
    lo = Infinity;
    hi = -Infinity;
  };
  for (let i = a; i <= b; i++) {
    const l = lower[i], u = upper[i];
    if (l === null || u === null || !Number.isFinite(l) || !Number.isFinite(u)) {
      flush();
      if (ol.length === 0 || ol[ol.length - 1] !== null) {
        ox.push(x[i]), ol.push(null), ou.push(null);
      }
      col = NaN;
      continue;
    }
    const c = Math.floor((x[i] - x0) / w);
    if (c !== col) {
      flush();
      col = c;
    }
    if (first < 0) first = i;
    last = i;
    lo = Math.min(lo, l);
    hi = Math.max(hi, u);
  }
  flush();
  return { x: ox, lower: ol, upper: ou };
}
