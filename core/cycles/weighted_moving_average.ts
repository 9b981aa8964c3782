/**
 * Centred weighted moving average over a regular grid with an explicit missing-data policy;
 * the building block of the 13-month smoothing, the running mean and the Gaussian smoother.
 *
 * @module
 */

/** Missing-data policy shared by the window smoothers. */
export interface WindowGapOptions {
  /**
   * Largest share of the window's total weight that may fall on missing (NaN) samples or
   * beyond the ends of the series; above it the output is NaN (no value), never a value
   * biased by the gap. Below it the present samples' weights are renormalised to sum to 1.
   * 0 demands complete windows (the standard definition of every smoother here).
   * @default 0
   */
  maxMissingWeight?: number;
}

/**
 * Centred weighted moving average: y[i] = Σ_k w[k] x[i + k − h] / Σ_k w[k] over a window of
 * odd length 2h + 1 (convolution with a symmetric kernel; common practice).
 *
 * Gaps and ends: samples that are NaN or outside the series count as missing; if their share
 * of the kernel weight exceeds `maxMissingWeight`, y[i] is NaN; otherwise the present samples
 * are averaged with renormalised weights. With the default 0 the first and last h outputs are
 * NaN and any window touching a gap is NaN. Cost O(N·(2h + 1)).
 *
 * @param values samples on a regular grid; NaN marks a missing sample
 * @param weights non-negative kernel of odd length, centre at index (length − 1)/2
 * @param options missing-data policy
 * @returns smoothed values, same length as `values`, NaN where undefined
 * @throws {RangeError} when the kernel has even length, a negative or non-finite weight, or
 *   zero total weight, or when maxMissingWeight is outside [0, 1)
 * @example
 * ```ts
 * import { weightedMovingAverage } from "./weighted_moving_average.ts";
 * import assert from "node:assert/strict";
 * const y = weightedMovingAverage(Float64Array.from([1, 2, 3, 4]), [1, 1, 1]);
 * assert.deepEqual([...y].map((v) => Number.isNaN(v) ? null : v), [null, 2, 3, null]);
 * ```
 */
export function weightedMovingAverage(
  values: ArrayLike<number>,
  weights: ArrayLike<number>,
  options: WindowGapOptions = {},
): Float64Array {
  const maxMissing = options.maxMissingWeight ?? 0;
  if (!(maxMissing >= 0 && maxMissing < 1)) {
    throw new RangeError(
      `Cannot smooth: maxMissingWeight must be in [0, 1), current value is ${maxMissing}`,
    );
  }
  const m = weights.length;
  if (m % 2 !== 1) {
    throw new RangeError(`Cannot smooth: kernel length must be odd, current value is ${m}`);
  }
  let total = 0;
  for (let k = 0; k < m; k++) {
    const w = weights[k];
    if (!(Number.isFinite(w) && w >= 0)) {
      throw new RangeError(`Cannot smooth: kernel weight ${k} must be finite and >= 0, got ${w}`);
    }
    total += w;
  }
  if (!(total > 0)) throw new RangeError("Cannot smooth: kernel weights sum to zero");
  const h = (m - 1) / 2, n = values.length;
  const out = new Float64Array(n);
  // a tiny tolerance so that "exactly the allowed share" passes despite rounding
  const allowedMissing = maxMissing * total + 1e-12 * total;
  for (let i = 0; i < n; i++) {
    let sw = 0, swx = 0;
    const lo = Math.max(0, i - h), hi = Math.min(n - 1, i + h);
    for (let j = lo; j <= hi; j++) {
      const x = values[j];
      if (x === x) { // not NaN
        const w = weights[j - i + h];
        sw += w;
        swx += w * x;
      }
    }
    out[i] = total - sw <= allowedMissing && sw > 0 ? swx / sw : NaN;
  }
  return out;
}
