/**
 * Surrogate series for significance tests of correlations with autocorrelated data.
 *
 * - Phase randomisation (Ebisuzaki 1997, J. Climate 10, 2147): keep the DFT amplitudes of the
 *   series, draw every phase uniformly in [0, 2π), transform back. The zero-frequency term is
 *   set to zero (surrogates have zero mean); for even N the Nyquist term must stay real and is
 *   multiplied by √2 cos θ (Ebisuzaki 1997, from memory: M), which keeps its expected power.
 *   Works for any N.
 * - AR(1) surrogates: x_t = φ x_{t−1} + ε_t with ε ~ N(0, σ²(1 − φ²)) started from the
 *   stationary distribution, φ the fitted lag-1 autocorrelation and σ² the series variance
 *   (common practice; e.g. Wilks 2011, §9.3).
 *
 * Each surrogate draws from its own stream `randomStream(seed, index)`, so a surrogate's
 * values never depend on how many were made before it or on which worker made it.
 *
 * @module
 */
import type { RandomStream } from "../random/random_stream.ts";
import { inverseRealDft, realDft } from "../spectral/fft.ts";
import { InputError } from "../errors.ts";

const TABLE_BITS = 10;
const TABLE_SIZE = 1 << TABLE_BITS;
const COS_TABLE = new Float64Array(TABLE_SIZE);
const SIN_TABLE = new Float64Array(TABLE_SIZE);
for (let j = 0; j < TABLE_SIZE; j++) {
  COS_TABLE[j] = Math.cos((2 * Math.PI * j) / TABLE_SIZE);
  SIN_TABLE[j] = Math.sin((2 * Math.PI * j) / TABLE_SIZE);
}
const STEP = (2 * Math.PI) / TABLE_SIZE;
// reciprocals of the Taylor denominators: a product costs far less than a division
const I6 = 1 / 6, I12 = 1 / 12, I20 = 1 / 20, I30 = 1 / 30, I42 = 1 / 42;

/**
 * Fill `re[i], im[i]` (i in [0, count)) with cos θ, sin θ for θ = 2π u, u uniform from the
 * stream: one uniform per phase.
 *
 * Written by hand because Math.cos + Math.sin cost more than the FFT itself in the surrogate
 * loop: θ is split into a table angle 2πj/1024 and a remainder δ < 2π/1024, with cos δ and
 * sin δ from their Taylor series to the δ⁷ term (truncation error below 1e-22) and the angle
 * addition formulas; accuracy about 1e-16, the same in every JavaScript engine.
 *
 * @param stream source of uniforms
 * @param count number of phases
 * @param re receives cos θ
 * @param im receives sin θ
 * @example
 * ```ts
 * import { randomPhasors } from "./surrogates.ts";
 * import { randomStream } from "../random/random_stream.ts";
 * import assert from "node:assert/strict";
 * const re = new Float64Array(5), im = new Float64Array(5);
 * randomPhasors(randomStream(1, 0), 5, re, im);
 * for (let i = 0; i < 5; i++) assert.ok(Math.abs(re[i] ** 2 + im[i] ** 2 - 1) < 1e-15);
 * ```
 */
export function randomPhasors(
  stream: RandomStream,
  count: number,
  re: Float64Array,
  im: Float64Array,
): void {
  stream.fill(re, count);
  for (let i = 0; i < count; i++) {
    const u = re[i] * TABLE_SIZE;
    const j = u | 0;
    const d = (u - j) * STEP, d2 = d * d;
    const cd = 1 - d2 * 0.5 * (1 - d2 * I12 * (1 - d2 * I30));
    const sd = d * (1 - d2 * I6 * (1 - d2 * I20 * (1 - d2 * I42)));
    const cj = COS_TABLE[j], sj = SIN_TABLE[j];
    re[i] = cj * cd - sj * sd;
    im[i] = sj * cd + cj * sd;
  }
}

/**
 * Amplitudes |X_f| of the DFT of x for f = 0..floor(N/2) (the input of
 * {@link phaseRandomisedSpectrum}).
 *
 * @param x real series, finite, length ≥ 2
 * @returns amplitudes, length floor(N/2) + 1
 * @example
 * ```ts
 * import { dftAmplitudes } from "./surrogates.ts";
 * import assert from "node:assert/strict";
 * const a = dftAmplitudes(new Float64Array([1, 0, -1, 0]));
 * assert.ok(Math.abs(a[1] - 2) < 1e-12 && Math.abs(a[0]) < 1e-12);
 * ```
 */
export function dftAmplitudes(x: ArrayLike<number>): Float64Array {
  const { re, im } = realDft(x);
  const a = new Float64Array(re.length);
  for (let f = 0; f < re.length; f++) a[f] = Math.hypot(re[f], im[f]);
  return a;
}

/**
 * Draw one phase-randomised spectrum (Ebisuzaki 1997) from fixed amplitudes: S_0 = 0,
 * S_f = A_f e^{iθ_f} for 0 < f < N/2, and for even N S_{N/2} = √2 A_{N/2} cos θ. Phases are
 * drawn in the order f = 1, 2, ..., then the Nyquist one.
 *
 * @param amplitudes |X_f|, f = 0..floor(N/2)
 * @param n series length N ≥ 2 (decides whether a Nyquist term exists)
 * @param stream random stream of this surrogate
 * @returns re/im of S_f, f = 0..floor(N/2)
 * @throws {RangeError} when the amplitude count does not match n
 * @example
 * ```ts
 * import { phaseRandomisedSpectrum } from "./surrogates.ts";
 * import { randomStream } from "../random/random_stream.ts";
 * import assert from "node:assert/strict";
 * const s = phaseRandomisedSpectrum(new Float64Array([5, 2, 1]), 4, randomStream(3, 0));
 * assert.equal(s.re[0], 0);
 * assert.ok(Math.abs(Math.hypot(s.re[1], s.im[1]) - 2) < 1e-15);
 * assert.equal(s.im[2], 0);
 * ```
 */
export function phaseRandomisedSpectrum(
  amplitudes: Float64Array,
  n: number,
  stream: RandomStream,
): { re: Float64Array; im: Float64Array } {
  const h = Math.floor(n / 2) + 1;
  if (!Number.isInteger(n) || n < 2 || amplitudes.length !== h) {
    throw new InputError(
      `Cannot randomise phases: needs floor(n/2)+1 = ${h} amplitudes for n = ${n}, got ${amplitudes.length}`,
      { field: "amplitudes", reason: "length_mismatch", value: amplitudes.length },
    );
  }
  const re = new Float64Array(h), im = new Float64Array(h);
  const inner = n % 2 === 0 ? h - 2 : h - 1; // f = 1..inner get a full random phase
  const cr = new Float64Array(inner), ci = new Float64Array(inner);
  randomPhasors(stream, inner, cr, ci);
  for (let f = 1; f <= inner; f++) {
    re[f] = amplitudes[f] * cr[f - 1];
    im[f] = amplitudes[f] * ci[f - 1];
  }
  if (n % 2 === 0) {
    re[h - 1] = Math.SQRT2 * amplitudes[h - 1] * Math.cos(2 * Math.PI * stream.uniform());
  }
  return { re, im };
}

/**
 * One phase-randomised surrogate of x (Ebisuzaki 1997), in the time domain.
 *
 * @param x real series, finite, length ≥ 2
 * @param stream random stream of this surrogate (e.g. `randomStream(seed, index)`)
 * @returns a zero-mean series of x's length with (for odd N exactly, for even N in
 *   expectation) the same periodogram as x minus its mean
 * @example
 * ```ts
 * import { ebisuzakiSurrogate } from "./surrogates.ts";
 * import { randomStream } from "../random/random_stream.ts";
 * import assert from "node:assert/strict";
 * const x = new Float64Array([3, 1, 4, 1, 5, 9, 2]);
 * const s = ebisuzakiSurrogate(x, randomStream(7, 0));
 * const ss = (v: Float64Array) => v.reduce((a, b) => a + b * b, 0);
 * const m = x.reduce((a, b) => a + b) / 7;
 * assert.ok(Math.abs(ss(s) - ss(x.map((v) => v - m))) < 1e-9); // odd N: same variance
 * ```
 */
export function ebisuzakiSurrogate(x: ArrayLike<number>, stream: RandomStream): Float64Array {
  if (x.length < 2) {
    throw new InputError(`Cannot make surrogate: needs at least 2 values, got ${x.length}`, {
      field: "x",
      reason: "too_few_points",
      value: x.length,
    });
  }
  const spec = phaseRandomisedSpectrum(dftAmplitudes(x), x.length, stream);
  return inverseRealDft(spec, x.length);
}

/**
 * One AR(1) surrogate x_t = φ x_{t−1} + ε_t, ε ~ N(0, σ²(1 − φ²)), x_0 ~ N(0, σ²).
 *
 * @param n length
 * @param phi AR(1) coefficient in (−1, 1)
 * @param sigma stationary standard deviation σ > 0
 * @param stream random stream of this surrogate
 * @returns the series
 * @throws {RangeError} when φ is outside (−1, 1), σ ≤ 0 or n < 1
 * @example
 * ```ts
 * import { ar1Surrogate } from "./surrogates.ts";
 * import { randomStream } from "../random/random_stream.ts";
 * import assert from "node:assert/strict";
 * const s = ar1Surrogate(20000, 0.9, 2, randomStream(1, 0));
 * const v = s.reduce((a, b) => a + b * b, 0) / s.length;
 * assert.ok(Math.abs(Math.sqrt(v) - 2) < 0.2);
 * ```
 */
export function ar1Surrogate(
  n: number,
  phi: number,
  sigma: number,
  stream: RandomStream,
): Float64Array {
  if (!(phi > -1 && phi < 1)) {
    throw new InputError(`Cannot make AR(1) surrogate: phi must be in (−1, 1), got ${phi}`, {
      field: "phi",
      reason: "out_of_range",
      value: phi,
    });
  }
  if (!(sigma > 0) || !Number.isFinite(sigma)) {
    throw new InputError(`Cannot make AR(1) surrogate: sigma must be positive, got ${sigma}`, {
      field: "sigma",
      reason: "out_of_range",
      value: sigma,
    });
  }
  if (!Number.isInteger(n) || n < 1) {
    throw new InputError(`Cannot make AR(1) surrogate: length must be ≥ 1, got ${n}`, {
      field: "n",
      reason: "out_of_range",
      value: n,
    });
  }
  const out = new Float64Array(n);
  const e = sigma * Math.sqrt(1 - phi * phi);
  out[0] = sigma * stream.normal();
  for (let t = 1; t < n; t++) out[t] = phi * out[t - 1] + e * stream.normal();
  return out;
}
