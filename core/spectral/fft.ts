/**
 * Discrete Fourier transforms of real series of any length, on top of the maintained `fft.js`
 * package (radix-4 complex FFT, float64).
 *
 * `fft.js` only handles power-of-two sizes; for any other length the transform is computed
 * with Bluestein's chirp-z algorithm (Bluestein 1970, IEEE Trans. Audio Electroacoust. 18,
 * 451), which rewrites a length-N DFT as a circular convolution of length M ≥ 2N − 1 (a power
 * of two) done with three `fft.js` transforms. No maintained float64 npm package offers
 * arbitrary-length transforms, hence this small wrapper.
 *
 * Convention (as numpy.fft): X[k] = Σ_{n=0}^{N−1} x[n] exp(−2πi k n / N), and the inverse
 * carries the 1/N factor.
 *
 * @module
 */
import FFT from "fft.js";

/** The non-negative-frequency half of a real signal's DFT (k = 0 .. floor(N/2)). */
export interface RealSpectrum {
  /** Real parts, length floor(N/2) + 1. */
  re: Float64Array;
  /** Imaginary parts, length floor(N/2) + 1. */
  im: Float64Array;
}

const planCache = new Map<number, FFT>();

function plan(size: number): FFT {
  let p = planCache.get(size);
  if (!p) {
    p = new FFT(size);
    if (planCache.size > 32) planCache.clear();
    planCache.set(size, p);
  }
  return p;
}

function isPowerOfTwo(n: number): boolean {
  return n >= 2 && (n & (n - 1)) === 0;
}

/**
 * Complex DFT of any length N ≥ 1 (forward, or inverse without the 1/N factor).
 * Input and output are interleaved [re0, im0, re1, im1, ...].
 */
function complexDft(data: Float64Array, inverse: boolean): Float64Array {
  const n = data.length / 2;
  if (n === 1) return Float64Array.from(data);
  if (isPowerOfTwo(n)) {
    const f = plan(n);
    const out = new Float64Array(2 * n);
    if (inverse) {
      // fft.js's inverseTransform divides by N; undo that here, the caller scales.
      f.inverseTransform(out, data);
      for (let i = 0; i < out.length; i++) out[i] *= n;
    } else {
      f.transform(out, data);
    }
    return out;
  }
  // Bluestein: X[k] = conj(w[k]) Σ_n (x[n] conj(w[n])) w[k−n], w[m] = exp(iπ m²/N) (forward).
  const sign = inverse ? -1 : 1;
  let m = 1;
  while (m < 2 * n - 1) m <<= 1;
  const f = plan(m);
  const wr = new Float64Array(n), wi = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    // k² mod 2N keeps the angle small and exact for large k
    const k2 = (k * k) % (2 * n);
    const ang = (Math.PI * k2) / n;
    wr[k] = Math.cos(ang);
    wi[k] = sign * Math.sin(ang);
  }
  const a = new Float64Array(2 * m), b = new Float64Array(2 * m);
  for (let k = 0; k < n; k++) {
    const xr = data[2 * k], xi = data[2 * k + 1];
    // x · conj(w)
    a[2 * k] = xr * wr[k] + xi * wi[k];
    a[2 * k + 1] = xi * wr[k] - xr * wi[k];
  }
  b[0] = wr[0];
  b[1] = wi[0];
  for (let k = 1; k < n; k++) {
    b[2 * k] = b[2 * (m - k)] = wr[k];
    b[2 * k + 1] = b[2 * (m - k) + 1] = wi[k];
  }
  const fa = new Float64Array(2 * m), fb = new Float64Array(2 * m);
  f.transform(fa, a);
  f.transform(fb, b);
  for (let k = 0; k < m; k++) {
    const ar = fa[2 * k], ai = fa[2 * k + 1], br = fb[2 * k], bi = fb[2 * k + 1];
    a[2 * k] = ar * br - ai * bi;
    a[2 * k + 1] = ar * bi + ai * br;
  }
  f.inverseTransform(fa, a); // includes the 1/m of the convolution
  const out = new Float64Array(2 * n);
  for (let k = 0; k < n; k++) {
    const cr = fa[2 * k], ci = fa[2 * k + 1];
    out[2 * k] = cr * wr[k] + ci * wi[k];
    out[2 * k + 1] = ci * wr[k] - cr * wi[k];
  }
  return out;
}

/**
 * Forward DFT of a real series of any length, non-negative frequencies only (like
 * `numpy.fft.rfft`).
 *
 * @param x real samples, length N ≥ 1, all finite
 * @returns re/im of X[k] for k = 0 .. floor(N/2); frequency k corresponds to k/(N·Δt)
 * @throws {RangeError} when x is empty or holds a non-finite value
 * @example
 * ```ts
 * import { realDft } from "./fft.ts";
 * import assert from "node:assert/strict";
 * // x[n] = cos(2π n / 5), N = 5 (not a power of two): X[1] = N/2
 * const x = Float64Array.from({ length: 5 }, (_, n) => Math.cos(2 * Math.PI * n / 5));
 * const { re, im } = realDft(x);
 * assert.ok(Math.abs(re[1] - 2.5) < 1e-12 && Math.abs(im[1]) < 1e-12);
 * assert.ok(Math.abs(re[0]) < 1e-12);
 * ```
 */
export function realDft(x: ArrayLike<number>): RealSpectrum {
  const n = x.length;
  if (n < 1) throw new RangeError("Cannot compute DFT: needs at least 1 sample, got 0");
  const data = new Float64Array(2 * n);
  for (let i = 0; i < n; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) {
      throw new RangeError(`Cannot compute DFT: sample ${i} is not finite (${v})`);
    }
    data[2 * i] = v;
  }
  const out = complexDft(data, false);
  const h = Math.floor(n / 2) + 1;
  const re = new Float64Array(h), im = new Float64Array(h);
  for (let k = 0; k < h; k++) {
    re[k] = out[2 * k];
    im[k] = out[2 * k + 1];
  }
  return { re, im };
}

/**
 * Inverse of {@link realDft}: the real series of length `n` whose non-negative-frequency DFT is
 * (re, im), Hermitian symmetry assumed (like `numpy.fft.irfft`). The imaginary parts of the
 * zero-frequency term (and of the Nyquist term when n is even) are ignored.
 *
 * @param spectrum re/im of length floor(n/2) + 1
 * @param n length of the output series
 * @throws {RangeError} when the spectrum length does not match n
 * @example
 * ```ts
 * import { inverseRealDft, realDft } from "./fft.ts";
 * import assert from "node:assert/strict";
 * const x = Float64Array.from([3, 1, 4, 1, 5, 9, 2]);
 * const y = inverseRealDft(realDft(x), x.length);
 * for (let i = 0; i < x.length; i++) assert.ok(Math.abs(x[i] - y[i]) < 1e-12);
 * ```
 */
export function inverseRealDft(spectrum: RealSpectrum, n: number): Float64Array {
  const h = Math.floor(n / 2) + 1;
  if (!Number.isInteger(n) || n < 1 || spectrum.re.length !== h || spectrum.im.length !== h) {
    throw new RangeError(
      `Cannot invert DFT: spectrum length must be floor(n/2)+1 = ${h} for n = ${n}, got ${spectrum.re.length}`,
    );
  }
  const data = new Float64Array(2 * n);
  for (let k = 0; k < h; k++) {
    data[2 * k] = spectrum.re[k];
    data[2 * k + 1] = spectrum.im[k];
  }
  data[1] = 0;
  if (n % 2 === 0) data[2 * (h - 1) + 1] = 0;
  for (let k = h; k < n; k++) {
    data[2 * k] = spectrum.re[n - k];
    data[2 * k + 1] = -spectrum.im[n - k];
  }
  const out = complexDft(data, true);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) y[i] = out[2 * i] / n;
  return y;
}
