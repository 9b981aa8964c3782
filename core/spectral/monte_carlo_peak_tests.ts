/**
 * Monte Carlo tests of periodogram peaks from replicate nulls computed in chunks: the
 * family-wise null distribution of the largest power over the grid, each peak's local p-value
 * at its own frequency, and the power levels of given false-alarm probabilities.
 *
 * @module
 */
import { quantileSorted } from "d3-array";
import type { MonteCarloNull } from "./false_alarm.ts";

/** What {@link combineMonteCarloNull} gives. */
export interface MonteCarloPeakTests {
  /** Every replicate's largest power over the grid, in increasing order. */
  maxima: Float64Array;
  /**
   * Per peak, the local Monte Carlo p-value (1 + #{replicate power at the peak's frequency ≥
   * the peak's power}) / (1 + R) (Davison & Hinkley 1997, "Bootstrap Methods and their
   * Application", eq. 4.11).
   */
  localP: number[];
}

/**
 * Combine the chunks of a Monte Carlo periodogram null (from {@link monteCarloMaximaChunk},
 * in replicate order, each probed at the peaks' grid indices) into the sorted replicate
 * maxima and the peaks' local p-values.
 *
 * @param parts replicate chunks, probed at the peaks' indices in peak order
 * @param peakPower observed power of each probed peak
 * @returns sorted maxima and local p-values
 * @throws {RangeError} when the chunks hold no replicate
 * @example
 * ```ts
 * import { combineMonteCarloNull } from "./monte_carlo_peak_tests.ts";
 * import assert from "node:assert/strict";
 * const parts = [
 *   { maxima: Float64Array.of(5, 2), probed: Float64Array.of(4, 1) },
 *   { maxima: Float64Array.of(3), probed: Float64Array.of(3) },
 * ];
 * const t = combineMonteCarloNull(parts, [3]);
 * assert.deepEqual([...t.maxima], [2, 3, 5]);
 * assert.deepEqual(t.localP, [(1 + 2) / (1 + 3)]);
 * ```
 */
export function combineMonteCarloNull(
  parts: readonly MonteCarloNull[],
  peakPower: readonly number[],
): MonteCarloPeakTests {
  const R = parts.reduce((s, a) => s + a.maxima.length, 0);
  if (R === 0) throw new RangeError("Cannot combine Monte Carlo null: no replicates");
  const P = peakPower.length;
  const maxima = new Float64Array(R);
  const above = new Array<number>(P).fill(0);
  let o = 0;
  for (const a of parts) {
    for (let r = 0; r < a.maxima.length; r++) {
      maxima[o++] = a.maxima[r];
      for (let j = 0; j < P; j++) if (a.probed[r * P + j] >= peakPower[j]) above[j]++;
    }
  }
  maxima.sort();
  return { maxima, localP: above.map((c) => (1 + c) / (1 + R)) };
}

/**
 * The power a replicate maximum exceeds with probability `fap`: the (1 − fap) quantile (R-7,
 * d3-array `quantileSorted`) of the sorted replicate maxima, the Monte Carlo counterpart of the
 * analytic level of Horne & Baliunas (1986).
 *
 * @param fap false-alarm probability in (0, 1)
 * @param sortedMaxima replicate maxima in increasing order (from {@link combineMonteCarloNull})
 * @returns the power level (the periodogram's normalisation)
 * @throws {RangeError} when there are no maxima or fap is outside (0, 1)
 * @example
 * ```ts
 * import { monteCarloPowerLevel } from "./monte_carlo_peak_tests.ts";
 * import assert from "node:assert/strict";
 * assert.equal(monteCarloPowerLevel(0.5, [1, 2, 3]), 2);
 * ```
 */
export function monteCarloPowerLevel(fap: number, sortedMaxima: ArrayLike<number>): number {
  if (sortedMaxima.length === 0 || !(fap > 0 && fap < 1)) {
    throw new RangeError(
      `Cannot compute Monte Carlo power level: needs maxima and fap in (0, 1), got ${sortedMaxima.length} maxima and fap ${fap}`,
    );
  }
  return quantileSorted(Array.from(sortedMaxima), 1 - fap)!;
}
