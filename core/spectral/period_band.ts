/**
 * The part of a periodogram between two periods.
 *
 * @module
 */

/**
 * The grid points of a periodogram whose period 1/f lies between
 * `minPeriod` and `maxPeriod`, both included. The bounds are widened by 1e-12 time units so
 * that a bound equal to a grid period in exact arithmetic (e.g. the record length N·Δt of an
 * FFT grid k/(N·Δt)) is not lost to rounding of 1/f.
 *
 * @param frequency grid, cycles per time unit; index 0 (the zero frequency of an FFT grid) is
 *   skipped
 * @param power periodogram values on the grid
 * @param minPeriod shortest period kept, time units
 * @param maxPeriod longest period kept, time units
 * @returns the kept frequencies and powers, in grid order
 * @example
 * ```ts
 * import { periodBand } from "./period_band.ts";
 * import assert from "node:assert/strict";
 * const b = periodBand([0, 0.1, 0.2, 0.3, 0.4], [9, 1, 2, 3, 4], 3, 5);
 * assert.deepEqual(b, { frequency: [0.2, 0.3], power: [2, 3] });
 * ```
 */
export function periodBand(
  frequency: ArrayLike<number>,
  power: ArrayLike<number>,
  minPeriod: number,
  maxPeriod: number,
): { frequency: number[]; power: number[] } {
  const f: number[] = [], p: number[] = [];
  for (let k = 1; k < frequency.length; k++) {
    const per = 1 / frequency[k];
    if (per >= minPeriod - 1e-12 && per <= maxPeriod + 1e-12) {
      f.push(frequency[k]);
      p.push(power[k]);
    }
  }
  return { frequency: f, power: p };
}
