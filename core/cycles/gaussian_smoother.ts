/**
 * Gaussian kernel smoother on a regular grid.
 *
 * @module
 */
import { weightedMovingAverage, type WindowGapOptions } from "./weighted_moving_average.ts";

/** Options of {@link gaussianSmooth}. */
export interface GaussianSmoothOptions extends WindowGapOptions {
  /**
   * Kernel truncation, in standard deviations: weights beyond ±truncate·σ are dropped.
   * @default 3
   */
  truncate?: number;
}

/**
 * Gaussian kernel smoother (Nadaraya 1964; Watson 1964, with a Gaussian kernel on a regular
 * grid): y[i] = Σ_k K(k) x[i + k] / Σ_k K(k), K(k) = exp(−k² / (2σ²)), |k| ≤ ceil(truncate·σ).
 *
 * Ends and gaps follow the window policy: with the default (complete windows only) the first
 * and last ceil(truncate·σ) samples are NaN rather than values biased by a one-sided kernel.
 *
 * @param values samples on a regular grid (NaN = missing), any units
 * @param sigma kernel standard deviation in samples (e.g. months), finite and > 0
 * @param options truncation and missing-data policy
 * @returns smoothed values, same length and units, NaN where undefined
 * @throws {RangeError} when sigma or truncate is not a positive finite number
 * @example
 * ```ts
 * import { gaussianSmooth } from "./gaussian_smoother.ts";
 * import assert from "node:assert/strict";
 * // a straight line is unchanged by any symmetric kernel
 * const y = gaussianSmooth(Float64Array.from({ length: 30 }, (_, i) => 2 * i), 3);
 * assert.ok(Math.abs(y[15] - 30) < 1e-12);
 * assert.ok(Number.isNaN(y[0]));
 * ```
 */
export function gaussianSmooth(
  values: ArrayLike<number>,
  sigma: number,
  options: GaussianSmoothOptions = {},
): Float64Array {
  const truncate = options.truncate ?? 3;
  if (!(Number.isFinite(sigma) && sigma > 0)) {
    throw new RangeError(
      `Cannot apply Gaussian smoother: sigma must be a finite positive number of samples, current value is ${sigma}`,
    );
  }
  if (!(Number.isFinite(truncate) && truncate > 0)) {
    throw new RangeError(
      `Cannot apply Gaussian smoother: truncate must be a finite positive number, current value is ${truncate}`,
    );
  }
  const h = Math.ceil(truncate * sigma);
  if (h > 1e6) {
    throw new RangeError(
      `Cannot apply Gaussian smoother: kernel half-width ${h} samples is too large`,
    );
  }
  const w = Array.from(
    { length: 2 * h + 1 },
    (_, k) => Math.exp(-((k - h) ** 2) / (2 * sigma ** 2)),
  );
  return weightedMovingAverage(values, w, options);
}

/**
 * The truncated Gaussian kernel of {@link gaussianSmooth} (unnormalised weights
 * exp(−k²/(2σ²)), |k| ≤ ceil(truncate·σ)).
 *
 * @param sigma standard deviation in samples, > 0
 * @param truncate truncation in standard deviations, default 3
 * @returns the kernel, odd length
 * @throws {RangeError} for a non-positive sigma or truncate
 * @example
 * ```ts
 * import { gaussianWeights } from "./gaussian_smoother.ts";
 * import assert from "node:assert/strict";
 * const w = gaussianWeights(1);
 * assert.equal(w.length, 7);
 * assert.equal(w[3], 1);
 * ```
 */
export function gaussianWeights(sigma: number, truncate = 3): number[] {
  if (!(Number.isFinite(sigma) && sigma > 0 && Number.isFinite(truncate) && truncate > 0)) {
    throw new RangeError(
      `Cannot build Gaussian kernel: sigma and truncate must be positive, got ${sigma}, ${truncate}`,
    );
  }
  const h = Math.ceil(truncate * sigma);
  return Array.from({ length: 2 * h + 1 }, (_, k) => Math.exp(-((k - h) ** 2) / (2 * sigma ** 2)));
}
