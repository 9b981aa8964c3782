/**
 * Discrete Fourier transforms of real series of any length, on the mixed-radix engine of
 * complex_dft_plan.ts.
 *
 * An even length N is transformed as N/2 complex points (even samples as real parts, odd
 * samples as imaginary parts) followed by one O(N) split into the spectrum of the real series
 * (Cooley, Lewis & Welch 1970, J. Sound Vib. 12, 315, "two for one" for real data); an odd
 * length goes through the complex transform of length N.
 *
 * Convention (as numpy.fft): X[k] = Σ_{n=0}^{N−1} x[n] exp(−2πi k n / N), and the inverse
 * carries the 1/N factor.
 *
 * @module
 */
import { complexDftPlan } from "./complex_dft_plan.ts";

/** The non-negative-frequency half of a real signal's DFT (k = 0 .. floor(N/2)). */
export interface RealSpectrum {
  /** Real parts, length floor(N/2) + 1. */
  re: Float64Array;
  /** Imaginary parts, length floor(N/2) + 1. */
  im: Float64Array;
}

/** Per even N: cos/sin(2πk/N) for k = 0..N/2 (the split) and two work buffers of N numbers. */
interface RealPlan {
  twiddle: Float64Array;
  a: Float64Array;
  b: Float64Array;
}
const realPlans = new Map<number, RealPlan>();
function realPlan(n: number): RealPlan {
  let p = realPlans.get(n);
  if (!p) {
    const h = n / 2;
    const twiddle = new Float64Array(2 * (h + 1));
    for (let k = 0; k <= h; k++) {
      twiddle[2 * k] = Math.cos((2 * Math.PI * k) / n);
      twiddle[2 * k + 1] = Math.sin((2 * Math.PI * k) / n);
    }
    p = { twiddle, a: new Float64Array(n), b: new Float64Array(n) };
    if (realPlans.size >= 32) realPlans.delete(realPlans.keys().next().value!);
    realPlans.set(n, p);
  }
  return p;
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
  let bad = -1;
  for (let i = 0; i < n; i++) if (!Number.isFinite(x[i])) bad = i;
  if (bad >= 0) {
    throw new RangeError(`Cannot compute DFT: sample ${bad} is not finite (${x[bad]})`);
  }
  const h = Math.floor(n / 2) + 1;
  const re = new Float64Array(h), im = new Float64Array(h);
  if (n % 2 === 1) {
    const data = new Float64Array(2 * n), out = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) data[2 * i] = x[i];
    complexDftPlan(n).forward(data, out);
    for (let k = 0; k < h; k++) {
      re[k] = out[2 * k];
      im[k] = out[2 * k + 1];
    }
    return { re, im };
  }
  // z_j = x_2j + i x_2j+1, Z = DFT_{N/2}(z); X_k = E_k + e^{−2πik/N} O_k with
  // E_k = (Z_k + conj Z_{N/2−k})/2 and O_k = (Z_k − conj Z_{N/2−k})/(2i)
  const m = n / 2;
  const { twiddle: tw, a: z, b: Z } = realPlan(n);
  for (let i = 0; i < n; i++) z[i] = x[i];
  complexDftPlan(m).forward(z, Z);
  // k = 0 and k = N/2 from Z_0 alone: X_0 = Re Z_0 + Im Z_0, X_{N/2} = Re Z_0 − Im Z_0
  re[0] = Z[0] + Z[1];
  re[m] = Z[0] - Z[1];
  for (let k = 1; k < m; k++) {
    const b = 2 * (m - k);
    const zr = Z[2 * k], zi = Z[2 * k + 1], cr = Z[b], ci = -Z[b + 1];
    const er = 0.5 * (zr + cr), ei = 0.5 * (zi + ci);
    const or = 0.5 * (zi - ci), oi = -0.5 * (zr - cr);
    const wr = tw[2 * k], wi = -tw[2 * k + 1];
    re[k] = er + or * wr - oi * wi;
    im[k] = ei + or * wi + oi * wr;
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
  const { re, im } = spectrum;
  const y = new Float64Array(n);
  if (n % 2 === 1 || n === 2) {
    const data = new Float64Array(2 * n), out = new Float64Array(2 * n);
    for (let k = 0; k < h; k++) {
      data[2 * k] = re[k];
      data[2 * k + 1] = im[k];
    }
    data[1] = 0;
    if (n % 2 === 0) data[2 * (h - 1) + 1] = 0;
    for (let k = h; k < n; k++) {
      data[2 * k] = re[n - k];
      data[2 * k + 1] = -im[n - k];
    }
    complexDftPlan(n).inverse(data, out);
    for (let i = 0; i < n; i++) y[i] = out[2 * i] / n;
    return y;
  }
  // the split run backwards: E_k = (X_k + conj X_{N/2−k})/2,
  // O_k = (X_k − conj X_{N/2−k}) e^{2πik/N}/2, z = IDFT_{N/2}(E + iO) = (x_even + i x_odd)·N/2
  const m = n / 2;
  const { twiddle: tw, a: Z, b: z } = realPlan(n);
  for (let k = 0; k < m; k++) {
    const xr = re[k], xi = k === 0 ? 0 : im[k];
    const cr = re[m - k], ci = m - k === m || m - k === 0 ? 0 : -im[m - k];
    const er = 0.5 * (xr + cr), ei = 0.5 * (xi + ci);
    const dr = 0.5 * (xr - cr), di = 0.5 * (xi - ci);
    const wr = tw[2 * k], wi = tw[2 * k + 1];
    const or = dr * wr - di * wi, oi = dr * wi + di * wr;
    Z[2 * k] = er - oi;
    Z[2 * k + 1] = ei + or;
  }
  complexDftPlan(m).inverse(Z, z);
  for (let i = 0; i < n; i++) y[i] = z[i] / m;
  return y;
}
