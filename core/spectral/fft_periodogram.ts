/**
 * Periodogram of an evenly sampled series by the FFT, with a taper.
 *
 * @module
 */
import { realDft } from "./fft.ts";

/** Data taper (window) applied before the transform. */
export type Taper = "hann" | "none" | "tukey";

/** Options of {@link fftPeriodogram}. */
export interface FftPeriodogramOptions {
  /**
   * Taper: "hann" (periodic Hann window w[n] = ½ − ½cos(2πn/N), as scipy.signal.get_window),
   * "tukey" (cosine-tapered ends over `tukeyFraction` of the record, the split cosine bell of
   * Bloomfield 1976, §5.2; periodic form as scipy.signal.get_window), or "none" (boxcar).
   * @default "hann"
   */
  taper?: Taper;
  /** Share of the record tapered by the Tukey window (half at each end), in (0, 1]. @default 0.1 */
  tukeyFraction?: number;
  /** Remove the mean ("constant"), a least-squares line ("linear"), or nothing. @default "constant" */
  detrend?: "constant" | "linear" | "none";
}

/** A one-sided periodogram. */
export interface Periodogram {
  /** Frequencies k/(N·Δt), cycles per time unit, k = 0 .. floor(N/2). */
  frequency: Float64Array;
  /** One-sided power spectral density, value units² × time unit. */
  power: Float64Array;
}

/**
 * Tapered one-sided periodogram (power spectral density) of an evenly sampled series
 * (Bloomfield 1976, "Fourier Analysis of Time Series", ch. 5; the same scaling as
 * scipy.signal.periodogram(scaling="density")):
 *
 *   S(f_k) = 2 Δt |Σ_n w[n] x[n] e^{−2πikn/N}|² / Σ_n w[n]²,  f_k = k/(N Δt),
 *
 * with the factor 2 omitted at f = 0 and, for even N, at the Nyquist frequency. Dividing by
 * Σw² makes the integral of S equal the variance for any taper. Any N works (transforms by
 * {@link realDft}).
 *
 * @param values evenly sampled values, finite, ≥ 4 points (a gap-free record: use
 *   {@link lombScargle} for gapped or uneven series)
 * @param spacing sampling interval Δt, time units (e.g. 1/12 year), > 0
 * @param options taper and detrending
 * @returns frequencies and power
 * @throws {RangeError} for fewer than 4 points, a non-finite value, or a bad spacing or taper
 * @example
 * ```ts
 * import { fftPeriodogram } from "./fft_periodogram.ts";
 * import assert from "node:assert/strict";
 * // a 10-sample period in 200 samples peaks at f = 0.1
 * const x = Array.from({ length: 200 }, (_, n) => Math.cos(2 * Math.PI * n / 10));
 * const { frequency, power } = fftPeriodogram(x, 1);
 * const k = power.indexOf(Math.max(...power));
 * assert.equal(frequency[k], 0.1);
 * ```
 */
export function fftPeriodogram(
  values: ArrayLike<number>,
  spacing: number,
  options: FftPeriodogramOptions = {},
): Periodogram {
  const n = values.length;
  if (n < 4) {
    throw new RangeError(`Cannot compute FFT periodogram: needs at least 4 points, got ${n}`);
  }
  if (!(Number.isFinite(spacing) && spacing > 0)) {
    throw new RangeError(
      `Cannot compute FFT periodogram: spacing must be finite and > 0, current value is ${spacing}`,
    );
  }
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(values[i])) {
      throw new RangeError(
        `Cannot compute FFT periodogram: value ${i} is not finite (${
          values[i]
        }); the FFT needs a gap-free record`,
      );
    }
    x[i] = values[i];
  }
  const detrend = options.detrend ?? "constant";
  if (detrend === "constant") {
    let m = 0;
    for (let i = 0; i < n; i++) m += x[i];
    m /= n;
    for (let i = 0; i < n; i++) x[i] -= m;
  } else if (detrend === "linear") {
    const tm = (n - 1) / 2;
    let sx = 0, sxx = 0, sxy = 0;
    for (let i = 0; i < n; i++) sx += x[i];
    const ym = sx / n;
    for (let i = 0; i < n; i++) {
      sxx += (i - tm) ** 2;
      sxy += (i - tm) * (x[i] - ym);
    }
    const b = sxy / sxx;
    for (let i = 0; i < n; i++) x[i] -= ym + b * (i - tm);
  }
  const taper = options.taper ?? "hann";
  const w = new Float64Array(n).fill(1);
  if (taper === "hann") {
    for (let i = 0; i < n; i++) w[i] = 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / n);
  } else if (taper === "tukey") {
    const a = options.tukeyFraction ?? 0.1;
    if (!(a > 0 && a <= 1)) {
      throw new RangeError(
        `Cannot compute FFT periodogram: tukeyFraction must be in (0, 1], current value is ${a}`,
      );
    }
    // periodic Tukey window (the symmetric one over n + 1 points, last dropped), as
    // scipy.signal.get_window(("tukey", a), n) gives for spectral analysis
    const width = a * n / 2;
    for (let i = 0; i < n; i++) {
      const d = Math.min(i, n - i);
      if (d < width) w[i] = 0.5 * (1 - Math.cos((Math.PI * d) / width));
    }
  } else if (taper !== "none") {
    throw new RangeError(`Cannot compute FFT periodogram: unknown taper "${taper}"`);
  }
  let sw2 = 0;
  for (let i = 0; i < n; i++) {
    x[i] *= w[i];
    sw2 += w[i] * w[i];
  }
  const { re, im } = realDft(x);
  const h = re.length;
  const frequency = new Float64Array(h), power = new Float64Array(h);
  for (let k = 0; k < h; k++) {
    frequency[k] = k / (n * spacing);
    const two = k === 0 || (n % 2 === 0 && k === h - 1) ? 1 : 2;
    power[k] = (two * spacing * (re[k] * re[k] + im[k] * im[k])) / sw2;
  }
  return { frequency, power };
}
