/**
 * Preprocessing applied before correlating a solar and a climate series: removal of the mean,
 * of a linear or quadratic trend, or of the slow part of the series by a Gaussian high-pass
 * filter. The same linear operator is applied to observations and to every surrogate, so a
 * significance test compares like with like (common practice; Ebisuzaki 1997, J. Climate 10,
 * 2147, §2, applies the test to the series as analysed).
 *
 * Polynomial trends are removed by least squares on an orthonormal polynomial basis over the
 * sample index (Gram–Schmidt on 1, t, t²; equivalent to regressing on the monomials).
 *
 * @module
 */

import { inverseRealDft, realDft, type RealSpectrum } from "../spectral/fft.ts";
import { InputError } from "../errors.ts";

/** Preprocessing applied identically to observations and surrogates. */
export type DetrendMethod = "mean" | "linear" | "quadratic" | "high_pass";

/** Options of {@link preprocessSeries}. */
export interface PreprocessOptions {
  /** What to remove. @default "mean" */
  method?: DetrendMethod;
  /**
   * For `high_pass`: the cutoff period in samples, where the filter passes half the power
   * (−3 dB). Variations slower than this are removed. Must be ≥ 2.
   */
  cutoffSamples?: number;
}

/** The last basis built by {@link sharedPolynomialBasis}, read only. */
let lastBasis: { n: number; degree: number; basis: Float64Array[] } | null = null;

/**
 * polynomialBasis(n, degree), built once for a run of calls with the same n and degree (a map
 * preprocesses thousands of cells, and a Monte Carlo test thousands of surrogates, of one
 * length). The arrays are shared: callers only read them.
 */
function sharedPolynomialBasis(n: number, degree: number): Float64Array[] {
  if (lastBasis === null || lastBasis.n !== n || lastBasis.degree !== degree) {
    lastBasis = { n, degree, basis: polynomialBasis(n, degree) };
  }
  return lastBasis.basis;
}

/**
 * Orthonormal basis of polynomials of degree 0..`degree` on the sample index 0..n−1
 * (modified Gram–Schmidt on centred, scaled monomials).
 *
 * @param n number of samples, > degree
 * @param degree 0 (mean), 1 (linear) or 2 (quadratic)
 * @returns `degree + 1` vectors of length n, orthonormal under the plain dot product
 * @throws {InputError} when n ≤ degree (field `n`) or degree is not 0, 1 or 2 (`degree`)
 * @example
 * ```ts
 * import { polynomialBasis } from "./preprocess_series.ts";
 * import assert from "node:assert/strict";
 * const [b0, b1] = polynomialBasis(4, 1);
 * assert.ok(Math.abs(b0[0] - 0.5) < 1e-15);
 * assert.ok(Math.abs(b0.reduce((s, v, i) => s + v * b1[i], 0)) < 1e-15);
 * ```
 */
export function polynomialBasis(n: number, degree: number): Float64Array[] {
  if (![0, 1, 2].includes(degree)) {
    throw new InputError(
      `Cannot build polynomial basis: degree must be 0, 1 or 2, got ${degree}`,
      { field: "degree", reason: "unsupported", value: degree },
    );
  }
  if (!Number.isInteger(n) || n <= degree) {
    throw new InputError(
      `Cannot build polynomial basis: needs more than ${degree} samples, got ${n}`,
      { field: "n", reason: "too_few_points", value: n },
    );
  }
  const mid = (n - 1) / 2, half = Math.max(mid, 1);
  const basis: Float64Array[] = [];
  for (let d = 0; d <= degree; d++) {
    const v = new Float64Array(n);
    for (let i = 0; i < n; i++) v[i] = ((i - mid) / half) ** d;
    for (const b of basis) {
      let dot = 0;
      for (let i = 0; i < n; i++) dot += v[i] * b[i];
      for (let i = 0; i < n; i++) v[i] -= dot * b[i];
    }
    let norm = 0;
    for (let i = 0; i < n; i++) norm += v[i] * v[i];
    norm = Math.sqrt(norm);
    for (let i = 0; i < n; i++) v[i] /= norm;
    basis.push(v);
  }
  return basis;
}

/**
 * Remove the least-squares projection of x on an orthonormal basis, in place.
 *
 * @param x series, modified in place
 * @param basis orthonormal vectors of x's length (from {@link polynomialBasis})
 * @returns the projection coefficients, one per basis vector
 * @example
 * ```ts
 * import { polynomialBasis, removeProjection } from "./preprocess_series.ts";
 * import assert from "node:assert/strict";
 * const x = new Float64Array([1, 3, 5, 7]);
 * removeProjection(x, polynomialBasis(4, 1));
 * assert.ok(x.every((v) => Math.abs(v) < 1e-12));
 * ```
 */
export function removeProjection(x: Float64Array, basis: readonly Float64Array[]): number[] {
  const n = x.length;
  const coef: number[] = [];
  for (const b of basis) {
    let dot = 0;
    for (let i = 0; i < n; i++) dot += x[i] * b[i];
    for (let i = 0; i < n; i++) x[i] -= dot * b[i];
    coef.push(dot);
  }
  return coef;
}

/**
 * Standard deviation σ (in samples) of the Gaussian smoother whose complement, the high-pass
 * filter 1 − exp(−2π²σ²f²), passes half the power at the cutoff period P:
 * (1 − H)² = 1/2 ⇒ σ = P · √(ln(1/(1 − 1/√2)) / (2π²)) ≈ 0.2494 P (derived).
 *
 * @param cutoffSamples cutoff period in samples, ≥ 2
 * @returns σ in samples
 * @example
 * ```ts
 * import { gaussianSigmaForCutoff } from "./preprocess_series.ts";
 * import assert from "node:assert/strict";
 * assert.ok(Math.abs(gaussianSigmaForCutoff(100) - 24.94) < 0.01);
 * ```
 */
export function gaussianSigmaForCutoff(cutoffSamples: number): number {
  if (!(cutoffSamples >= 2) || !Number.isFinite(cutoffSamples)) {
    throw new InputError(
      `Cannot build high-pass filter: cutoff must be a finite period of at least 2 samples, got ${cutoffSamples}`,
      { field: "cutoffSamples", reason: "out_of_range", value: cutoffSamples },
    );
  }
  return cutoffSamples * Math.sqrt(Math.log(1 / (1 - Math.SQRT1_2)) / (2 * Math.PI * Math.PI));
}

/**
 * Gaussian high-pass filter: x minus its Gaussian-weighted running mean (kernel truncated at
 * ±4σ; near the ends the weights are renormalised over the samples that exist, so the ends
 * are not pulled toward zero). A linear operator, so surrogates get exactly the same one.
 *
 * Cost O(n · σ) for narrow kernels; above 48 samples of half-width the same convolution is
 * done with a zero-padded FFT (O(m log m), m ≥ n + 4σ a power of two), equal to rounding.
 *
 * @param x series (finite values)
 * @param cutoffSamples half-power cutoff period in samples, ≥ 2
 * @returns the high-passed series
 * @throws {InputError} (field `cutoffSamples`) when the cutoff is below 2 samples or not finite
 * @example
 * ```ts
 * import { gaussianHighPass } from "./preprocess_series.ts";
 * import assert from "node:assert/strict";
 * // a straight line is slow: nothing but end effects remain, and in the middle nothing
 * const x = Float64Array.from({ length: 200 }, (_, i) => 5 + 0.1 * i);
 * const h = gaussianHighPass(x, 20);
 * assert.ok(Math.abs(h[100]) < 1e-9);
 * ```
 */
export function gaussianHighPass(x: Float64Array, cutoffSamples: number): Float64Array {
  const sigma = gaussianSigmaForCutoff(cutoffSamples);
  const n = x.length;
  const h = Math.min(Math.ceil(4 * sigma), n - 1);
  const w = new Float64Array(h + 1);
  for (let j = 0; j <= h; j++) w[j] = Math.exp(-0.5 * (j / sigma) ** 2);
  if (h > 48) return highPassByFft(x, w);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = w[0] * x[i], ws = w[0];
    const lo = Math.min(h, i), hi = Math.min(h, n - 1 - i);
    for (let j = 1; j <= lo; j++) {
      s += w[j] * x[i - j];
      ws += w[j];
    }
    for (let j = 1; j <= hi; j++) {
      s += w[j] * x[i + j];
      ws += w[j];
    }
    out[i] = x[i] - s / ws;
  }
  return out;
}

interface FftSmoother {
  key: string;
  m: number;
  kernel: RealSpectrum;
  /** Σ of the weights that fall inside the series, per sample (the edge renormalisation). */
  norm: Float64Array;
}
let lastSmoother: FftSmoother | null = null;

/** Linear convolution of a zero-padded series with the symmetric kernel, via one real DFT
 * pair of a power-of-two length m ≥ n + h (no wrap-around reaches the series). */
function convolve(x: Float64Array, m: number, kernel: RealSpectrum): Float64Array {
  const pad = new Float64Array(m);
  pad.set(x);
  const X = realDft(pad);
  for (let f = 0; f < X.re.length; f++) {
    // the kernel is real and even, so its spectrum is real
    X.re[f] *= kernel.re[f];
    X.im[f] *= kernel.re[f];
  }
  return inverseRealDft(X, m);
}

/** The FFT form of the same filter for wide kernels (cost O(m log m) instead of O(n·h)). */
function highPassByFft(x: Float64Array, w: Float64Array): Float64Array {
  const n = x.length, h = w.length - 1;
  const key = `${n}:${h}:${w[1]}`;
  let sm = lastSmoother;
  if (!sm || sm.key !== key) {
    let m = 1;
    while (m < n + h) m <<= 1;
    const k = new Float64Array(m);
    k[0] = w[0];
    for (let j = 1; j <= h; j++) k[j] = k[m - j] = w[j];
    const kernel = realDft(k);
    const norm = convolve(new Float64Array(n).fill(1), m, kernel);
    sm = { key, m, kernel, norm };
    lastSmoother = sm;
  }
  const low = convolve(x, sm.m, sm.kernel);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = x[i] - low[i] / sm.norm[i];
  return out;
}

/**
 * Apply one of the preprocessing methods to an evenly spaced series.
 *
 * - `mean`: subtract the mean.
 * - `linear`, `quadratic`: subtract the least-squares polynomial of that degree in time.
 * - `high_pass`: {@link gaussianHighPass} with the stated cutoff, then subtract the mean.
 *
 * @param x evenly spaced values, all finite
 * @param options method (default `mean`) and cutoff for `high_pass`
 * @returns a new array, the preprocessed series
 * @throws {InputError} when a value is not finite (field `x`, with the index), the series is too
 *   short for the method (`x`), or the cutoff is missing or below 2 samples for `high_pass`
 *   (`cutoffSamples`)
 * @example
 * ```ts
 * import { preprocessSeries } from "./preprocess_series.ts";
 * import assert from "node:assert/strict";
 * const y = preprocessSeries(new Float64Array([1, 2, 4, 7]), { method: "quadratic" });
 * assert.ok(y.every((v) => Math.abs(v) < 1e-12));
 * ```
 */
export function preprocessSeries(x: Float64Array, options: PreprocessOptions = {}): Float64Array {
  const method = options.method ?? "mean";
  for (let i = 0; i < x.length; i++) {
    if (!Number.isFinite(x[i])) {
      throw new InputError(`Cannot preprocess series: value ${i} is not finite (${x[i]})`, {
        field: "x",
        reason: "not_finite",
        index: i,
        value: x[i],
      });
    }
  }
  if (method === "high_pass") {
    if (options.cutoffSamples === undefined) {
      throw new InputError("Cannot preprocess series: high_pass needs cutoffSamples", {
        field: "cutoffSamples",
        reason: "invalid",
      });
    }
    if (x.length < 2) {
      throw new InputError(`Cannot preprocess series: needs at least 2 samples, got ${x.length}`, {
        field: "x",
        reason: "too_few_points",
        value: x.length,
      });
    }
    const out = gaussianHighPass(x, options.cutoffSamples);
    removeProjection(out, sharedPolynomialBasis(out.length, 0));
    return out;
  }
  const degree = method === "mean" ? 0 : method === "linear" ? 1 : method === "quadratic" ? 2 : -1;
  if (degree < 0) {
    throw new InputError(`Cannot preprocess series: unknown method ${method}`, {
      field: "method",
      reason: "unsupported",
      value: method,
    });
  }
  const out = Float64Array.from(x);
  removeProjection(out, sharedPolynomialBasis(out.length, degree));
  return out;
}
