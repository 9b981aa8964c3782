/**
 * The Waldmeier effect measured across cycles: rise time against amplitude.
 *
 * @module
 */
import { ordinaryLeastSquares } from "../stats/ordinary_least_squares.ts";
import { waldmeierRiseMonths } from "./hathaway_shape.ts";

/** One cycle's rise time and amplitude. */
export interface RiseAmplitude {
  /** Rise time from minimum to maximum, months. */
  riseMonths: number;
  /** Smoothed maximum, input units. */
  amplitude: number;
}

/** The fitted relation. */
export interface WaldmeierRelation {
  n: number;
  /** rise = intercept + slope / (amplitude × amplitudeScale), months. */
  intercept: { value: number; standardError: number };
  slope: { value: number; standardError: number };
  /** Pearson correlation of rise time with amplitude (negative for the Waldmeier effect). */
  correlation: number;
  /** Residual standard deviation, months. */
  sigma: number;
  /** The published relation on the same cycles: 35 + 1800 / amplitude(V1), months, with the
   * root-mean-square difference from the observed rise times. */
  published: { intercept: 35; slope: 1800; rmsDifference: number };
}

/**
 * Fit rise = α + β / A across cycles by ordinary least squares, the form of the Waldmeier
 * relation given by Hathaway 2010 (Living Rev. Sol. Phys. 7, 1, eq. 7: rise ≈ 35 + 1800 / A
 * months, A the smoothed maximum on the version 1 scale), and report
 * the correlation of rise time with amplitude and the published relation's fit to the same
 * cycles.
 *
 * @param cycles rise times (months) and amplitudes (input units, > 0)
 * @param amplitudeScale factor to the version 1 scale (0.6 for version 2 data), default 1
 * @returns the relation
 * @throws {RangeError} for fewer than 3 cycles, non-positive amplitudes, or non-finite values
 * @example
 * ```ts
 * import { waldmeierRelation } from "./waldmeier_relation.ts";
 * import assert from "node:assert/strict";
 * const cycles = [60, 100, 150, 200].map((A) => ({ amplitude: A, riseMonths: 35 + 1800 / A }));
 * const w = waldmeierRelation(cycles);
 * assert.ok(Math.abs(w.slope.value - 1800) < 1e-6 && Math.abs(w.intercept.value - 35) < 1e-8);
 * assert.ok(w.correlation < 0);
 * ```
 */
export function waldmeierRelation(
  cycles: readonly RiseAmplitude[],
  amplitudeScale = 1,
): WaldmeierRelation {
  const n = cycles.length;
  if (n < 3) {
    throw new RangeError(`Cannot fit Waldmeier relation: needs at least 3 cycles, got ${n}`);
  }
  for (const [i, c] of cycles.entries()) {
    if (!(Number.isFinite(c.riseMonths) && Number.isFinite(c.amplitude) && c.amplitude > 0)) {
      throw new RangeError(
        `Cannot fit Waldmeier relation: cycle ${i} needs a finite rise time and a positive amplitude, got ${c.riseMonths}, ${c.amplitude}`,
      );
    }
  }
  const inv = Float64Array.from(cycles, (c) => 1 / (c.amplitude * amplitudeScale));
  const rise = Float64Array.from(cycles, (c) => c.riseMonths);
  const fit = ordinaryLeastSquares([inv], rise);
  const amp = cycles.map((c) => c.amplitude);
  const ma = amp.reduce((a, b) => a + b, 0) / n, mr = rise.reduce((a, b) => a + b, 0) / n;
  let sab = 0, saa = 0, sbb = 0;
  for (let i = 0; i < n; i++) {
    sab += (amp[i] - ma) * (rise[i] - mr);
    saa += (amp[i] - ma) ** 2;
    sbb += (rise[i] - mr) ** 2;
  }
  let d2 = 0;
  for (let i = 0; i < n; i++) d2 += (rise[i] - waldmeierRiseMonths(amp[i] * amplitudeScale)) ** 2;
  return {
    n,
    intercept: { value: fit.coefficients[0], standardError: fit.standardErrors[0] },
    slope: { value: fit.coefficients[1], standardError: fit.standardErrors[1] },
    correlation: saa > 0 && sbb > 0 ? sab / Math.sqrt(saa * sbb) : 0,
    sigma: fit.sigma,
    published: { intercept: 35, slope: 1800, rmsDifference: Math.sqrt(d2 / n) },
  };
}
