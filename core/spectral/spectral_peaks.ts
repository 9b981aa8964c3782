/**
 * Peaks of a periodogram, with a period uncertainty from each peak's width.
 *
 * @module
 */

/** One periodogram peak. */
export interface SpectralPeak {
  /** Index into the grid. */
  index: number;
  /** Frequency of the highest grid point, cycles per time unit. */
  frequency: number;
  /** 1 / frequency, time units. */
  period: number;
  /** Power at the peak (the periodogram's normalisation). */
  power: number;
  /**
   * Frequencies where the power falls to half the peak on each side (linear interpolation
   * between grid points); null when the grid ends before the power halves.
   */
  halfPowerFrequencies: [number | null, number | null];
  /** Half-width at half maximum in frequency (mean of the two sides, or the one side known). */
  halfWidth: number | null;
  /**
   * Period uncertainty from the peak width: σ_P = HWHM_f / f² (first-order propagation of the
   * frequency half-width to period; common practice). null when the peak is not resolved.
   */
  periodUncertainty: number | null;
  /** Periods at the half-power points: [shorter, longer]; null where unresolved. */
  periodInterval: [number | null, number | null];
}

/** Options of {@link findSpectralPeaks}. */
export interface SpectralPeakOptions {
  /** Largest number of peaks returned, highest first. @default 5 */
  maxPeaks?: number;
  /**
   * Smallest peak power relative to the highest one, in [0, 1].
   * @default 0 (every local maximum)
   */
  minRelativePower?: number;
}

/**
 * Local maxima of a periodogram, highest first, each with its half-power width.
 *
 * The width of a periodogram peak reflects the frequency resolution ≈ 1/T of a record of
 * span T; its half-width at half maximum is used as the one-sigma frequency uncertainty
 * (common practice; for a sinusoid in noise the formal error is smaller when the
 * signal-to-noise ratio is high, Kovacs 1981, Astrophys. Space Sci. 78, 175, so this is the
 * cautious choice). A peak at an end of the grid is reported only if higher than its one
 * neighbour and is flagged by a null half-power frequency on the open side.
 *
 * @param frequency grid, increasing, cycles per time unit, > 0
 * @param power periodogram values, finite
 * @param options how many peaks
 * @returns peaks in decreasing power
 * A grid of one frequency (a periodogram asked at one period) has one unresolved peak when
 * its power is positive.
 *
 * @throws {RangeError} when lengths differ or are 0, or an option is out of range
 * @example
 * ```ts
 * import { findSpectralPeaks } from "./spectral_peaks.ts";
 * import assert from "node:assert/strict";
 * const f = Array.from({ length: 101 }, (_, k) => 0.05 + k * 0.001);
 * const p = f.map((x) => 1 / (1 + ((x - 0.1) / 0.004) ** 2)); // Lorentzian, HWHM 0.004
 * const [top] = findSpectralPeaks(f, p);
 * assert.ok(Math.abs(top.period - 10) < 1e-9);
 * assert.ok(Math.abs(top.halfWidth! - 0.004) < 1e-4);
 * ```
 */
export function findSpectralPeaks(
  frequency: ArrayLike<number>,
  power: ArrayLike<number>,
  options: SpectralPeakOptions = {},
): SpectralPeak[] {
  const n = frequency.length;
  if (power.length !== n || n < 1) {
    throw new RangeError(
      `Cannot find spectral peaks: need equal lengths >= 1, got ${n} frequencies and ${power.length} powers`,
    );
  }
  const maxPeaks = options.maxPeaks ?? 5;
  const minRel = options.minRelativePower ?? 0;
  if (!Number.isInteger(maxPeaks) || maxPeaks < 1) {
    throw new RangeError(
      `Cannot find spectral peaks: maxPeaks must be an integer >= 1, current value is ${maxPeaks}`,
    );
  }
  if (!(minRel >= 0 && minRel <= 1)) {
    throw new RangeError(
      `Cannot find spectral peaks: minRelativePower must be in [0, 1], current value is ${minRel}`,
    );
  }
  const cand: number[] = [];
  for (let k = 0; k < n; k++) {
    const left = k === 0 ? -Infinity : power[k - 1];
    const right = k === n - 1 ? -Infinity : power[k + 1];
    if (power[k] > left && power[k] >= right && power[k] > 0) cand.push(k);
  }
  if (cand.length === 0) return [];
  cand.sort((a, b) => power[b] - power[a] || a - b);
  const top = power[cand[0]];
  const out: SpectralPeak[] = [];
  for (const k of cand) {
    if (out.length >= maxPeaks || power[k] < minRel * top) break;
    const half = power[k] / 2;
    let lo: number | null = null, hi: number | null = null;
    for (let j = k - 1; j >= 0; j--) {
      if (power[j] <= half) {
        const f0 = frequency[j], f1 = frequency[j + 1], p0 = power[j], p1 = power[j + 1];
        lo = f0 + ((half - p0) / (p1 - p0)) * (f1 - f0);
        break;
      }
    }
    for (let j = k + 1; j < n; j++) {
      if (power[j] <= half) {
        const f0 = frequency[j - 1], f1 = frequency[j], p0 = power[j - 1], p1 = power[j];
        hi = f0 + ((p0 - half) / (p0 - p1)) * (f1 - f0);
        break;
      }
    }
    const f = frequency[k];
    const sides = [lo === null ? null : f - lo, hi === null ? null : hi - f].filter(
      (x): x is number => x !== null,
    );
    const hw = sides.length ? sides.reduce((a, b) => a + b, 0) / sides.length : null;
    out.push({
      index: k,
      frequency: f,
      period: 1 / f,
      power: power[k],
      halfPowerFrequencies: [lo, hi],
      halfWidth: hw,
      periodUncertainty: hw === null ? null : hw / (f * f),
      periodInterval: [hi === null ? null : 1 / hi, lo === null || lo <= 0 ? null : 1 / lo],
    });
  }
  return out;
}
