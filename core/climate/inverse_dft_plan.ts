/**
 * A reusable inverse complex DFT of one fixed length N (any N ≥ 1), for loops that transform
 * many spectra of the same length (the surrogate engine).
 *
 * x_t = (1/N) Σ_f Z_f e^{2πi f t/N}. Powers of two go straight to `fft.js`; any other N uses
 * Bluestein's chirp-z algorithm (Bluestein 1970, IEEE Trans. Audio Electroacoust. 18, 451):
 * with c_m = e^{iπ m²/N}, x_t = (1/N) c_t Σ_f (Z_f c_f) conj(c_{t−f}), a circular convolution
 * of length M ≥ 2N − 1 (a power of two). The chirp's spectrum is computed once per plan, so
 * each transform costs one forward and one inverse `fft.js` transform of length M.
 *
 * Written here rather than using core/spectral/fft.ts because that module's general
 * transforms rebuild the chirp and its spectrum on every call and split real/imaginary
 * halves; the surrogate loop needs the packed complex transform with everything reused.
 *
 * @module
 */
import FFT from "fft.js";
import { InputError } from "../errors.ts";

/** Inverse DFT of interleaved complex data [re0, im0, re1, im1, ...] of length N. */
export interface InverseDftPlan {
  readonly n: number;
  /** Transform `input` (2N numbers) into `output` (2N numbers); 1/N included. */
  inverse(input: Float64Array, output: Float64Array): void;
}

/**
 * Build the inverse DFT plan of length n.
 *
 * @param n transform length, integer ≥ 1
 * @returns the plan
 * @throws {RangeError} when n is not a positive integer
 * @example
 * ```ts
 * import { inverseDftPlan } from "./inverse_dft_plan.ts";
 * import assert from "node:assert/strict";
 * // the inverse DFT of a unit impulse at frequency 1 is e^{2πi t/N}/N
 * const n = 6, z = new Float64Array(2 * n), x = new Float64Array(2 * n);
 * z[2] = 1;
 * inverseDftPlan(n).inverse(z, x);
 * for (let t = 0; t < n; t++) {
 *   assert.ok(Math.abs(x[2 * t] - Math.cos((2 * Math.PI * t) / n) / n) < 1e-15);
 *   assert.ok(Math.abs(x[2 * t + 1] - Math.sin((2 * Math.PI * t) / n) / n) < 1e-15);
 * }
 * ```
 */
export function inverseDftPlan(n: number): InverseDftPlan {
  if (!Number.isInteger(n) || n < 1) {
    throw new InputError(`Cannot plan inverse DFT: length must be a positive integer, got ${n}`, {
      field: "n",
      reason: "out_of_range",
      value: n,
    });
  }
  if (n === 1) {
    return { n, inverse: (i, o) => o.set(i.subarray(0, 2)) };
  }
  if ((n & (n - 1)) === 0) {
    const f = new FFT(n);
    return { n, inverse: (i, o) => f.inverseTransform(o, i) };
  }
  let m = 1;
  while (m < 2 * n - 1) m <<= 1;
  const f = new FFT(m);
  const cr = new Float64Array(n), ci = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const ang = (Math.PI * ((k * k) % (2 * n))) / n; // k² mod 2N keeps the angle exact
    cr[k] = Math.cos(ang);
    ci[k] = Math.sin(ang);
  }
  // b_m = conj(c_m) for m in (−N, N), laid out circularly over M
  const b = new Float64Array(2 * m);
  b[0] = cr[0];
  b[1] = -ci[0];
  for (let k = 1; k < n; k++) {
    b[2 * k] = b[2 * (m - k)] = cr[k];
    b[2 * k + 1] = b[2 * (m - k) + 1] = -ci[k];
  }
  const bf = new Float64Array(2 * m);
  f.transform(bf, b);
  const a = new Float64Array(2 * m), af = new Float64Array(2 * m), y = new Float64Array(2 * m);
  return {
    n,
    inverse(input: Float64Array, output: Float64Array) {
      a.fill(0);
      for (let k = 0; k < n; k++) {
        const zr = input[2 * k], zi = input[2 * k + 1];
        a[2 * k] = zr * cr[k] - zi * ci[k];
        a[2 * k + 1] = zr * ci[k] + zi * cr[k];
      }
      f.transform(af, a);
      for (let k = 0; k < m; k++) {
        const ar = af[2 * k], ai = af[2 * k + 1], br = bf[2 * k], bi = bf[2 * k + 1];
        af[2 * k] = ar * br - ai * bi;
        af[2 * k + 1] = ar * bi + ai * br;
      }
      f.inverseTransform(y, af); // includes 1/M
      for (let t = 0; t < n; t++) {
        const yr = y[2 * t], yi = y[2 * t + 1];
        output[2 * t] = (yr * cr[t] - yi * ci[t]) / n;
        output[2 * t + 1] = (yr * ci[t] + yi * cr[t]) / n;
      }
    },
  };
}
