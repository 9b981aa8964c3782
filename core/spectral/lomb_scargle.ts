/**
 * The Lomb–Scargle periodogram for unevenly sampled or gapped series.
 *
 * @module
 */

import { type StopOptions, throwIfStopped } from "../stop_signal.ts";

/** Normalisation of the Lomb–Scargle power. */
export type LombScargleNormalization = "horne_baliunas" | "psd" | "standard";

/** Options of {@link lombScargle}. */
export interface LombScargleOptions extends StopOptions {
  /**
   * - "horne_baliunas": P / σ² with σ² = Σ(y − ȳ)²/(N − 1) (Horne & Baliunas 1986, eq. 1):
   *   exponentially distributed for Gaussian white noise, so the false-alarm probability
   *   1 − (1 − e^−z)^M applies. Dimensionless.
   * - "psd": P = ½{...} (Scargle 1982, eq. 10), in squared value units (what
   *   scipy.signal.lombscargle returns for mean-removed data with normalize=False).
   * - "standard": 2P / Σ(y − ȳ)², in [0, 1] (the fraction of variance explained by the
   *   sinusoid; scipy's normalize=True on mean-removed data).
   * @default "horne_baliunas"
   */
  normalization?: LombScargleNormalization;
}

const TWO_PI = 2 * Math.PI;

/** True when f is evenly spaced (relative tolerance 1e-9 of the step). */
function isUniform(f: ArrayLike<number>): boolean {
  if (f.length < 3) return true;
  const d = (f[f.length - 1] - f[0]) / (f.length - 1);
  if (!(d > 0)) return false;
  for (let k = 1; k < f.length; k++) {
    if (Math.abs(f[k] - f[k - 1] - d) > 1e-9 * Math.abs(d) + 1e-15 * Math.abs(f[k])) return false;
  }
  return true;
}

/**
 * Lomb–Scargle periodogram (Lomb 1976, Astrophys. Space Sci. 39, 447; Scargle 1982, ApJ 263,
 * 835, eq. 10; normalisation of Horne & Baliunas 1986, ApJ 302, 757):
 *
 *   P(ω) = 1/(2σ²) { [Σ(y−ȳ)cos ω(t−τ)]² / Σcos² ω(t−τ) + [Σ(y−ȳ)sin ω(t−τ)]² / Σsin² ω(t−τ) },
 *   tan 2ωτ = Σ sin 2ωt / Σ cos 2ωt,  ω = 2πf.
 *
 * Implementation: the sums use Σcos² ω(t−τ) = (N + R)/2 and Σsin² ω(t−τ) = (N − R)/2 with
 * R = |Σ exp(2iωt)| (Press & Rybicki 1989, ApJ 338, 277, eq. 5). On an evenly spaced
 * frequency grid, cos ωt and sin ωt advance by a rotation per point (re-anchored to exact
 * values every 64 frequencies), so one grid of K frequencies costs O(N·K) multiplications
 * and only O(N·K/64) trigonometric calls; other grids evaluate the trigonometric functions
 * directly. Written by hand: no maintained npm package offers it over float64 arrays.
 *
 * Edge cases: where Σsin² ω(t−τ) vanishes (e.g. the Nyquist frequency of even sampling, where
 * every sin ω(t−τ) is 0) that term is 0, not NaN. A constant series has no power to
 * normalise: RangeError. `shouldStop` is polled every 64 frequencies.
 *
 * @param time sample times (e.g. decimal years), finite, any order, ≥ 3 points
 * @param value sample values, finite, same length
 * @param frequency frequencies, cycles per time unit, finite and > 0
 * @param options normalisation
 * @returns power at each frequency
 * @throws {RangeError} for fewer than 3 points, length mismatch, non-finite input, a constant
 *   series, or a non-positive frequency
 * @throws {StoppedError} when `options.shouldStop` answers true
 * @example
 * ```ts
 * import { lombScargle } from "./lomb_scargle.ts";
 * import assert from "node:assert/strict";
 * const t = Array.from({ length: 200 }, (_, i) => i + 0.3 * Math.sin(i)); // uneven
 * const y = t.map((x) => Math.sin(2 * Math.PI * x / 11));
 * const f = Array.from({ length: 400 }, (_, k) => 0.01 + k * 0.001);
 * const p = lombScargle(t, y, f, { normalization: "standard" });
 * const best = f[p.indexOf(Math.max(...p))];
 * assert.ok(Math.abs(1 / best - 11) < 0.1);
 * ```
 */
export function lombScargle(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  frequency: ArrayLike<number>,
  options: LombScargleOptions = {},
): Float64Array {
  const n = time.length;
  if (value.length !== n) {
    throw new RangeError(
      `Cannot compute Lomb-Scargle periodogram: time has ${n} points but value has ${value.length}`,
    );
  }
  if (n < 3) {
    throw new RangeError(
      `Cannot compute Lomb-Scargle periodogram: needs at least 3 points, got ${n}`,
    );
  }
  let tMean = 0, yMean = 0;
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(time[i]) || !Number.isFinite(value[i])) {
      throw new RangeError(
        `Cannot compute Lomb-Scargle periodogram: point ${i} is not finite (t = ${time[i]}, y = ${
          value[i]
        })`,
      );
    }
    tMean += time[i];
    yMean += value[i];
  }
  tMean /= n;
  yMean /= n;
  // centre times (numerically kinder phases) and values
  const t = new Float64Array(n), y = new Float64Array(n);
  let ss = 0;
  for (let i = 0; i < n; i++) {
    t[i] = time[i] - tMean;
    y[i] = value[i] - yMean;
    ss += y[i] * y[i];
  }
  if (!(ss > 0)) {
    throw new RangeError(
      "Cannot compute Lomb-Scargle periodogram: the series is constant (zero variance)",
    );
  }
  const K = frequency.length;
  for (let k = 0; k < K; k++) {
    if (!(Number.isFinite(frequency[k]) && frequency[k] > 0)) {
      throw new RangeError(
        `Cannot compute Lomb-Scargle periodogram: frequency ${k} must be finite and > 0, got ${
          frequency[k]
        }`,
      );
    }
  }
  const norm = options.normalization ?? "horne_baliunas";
  const scale = norm === "psd" ? 0.5 : norm === "standard" ? 1 / ss : 0.5 * (n - 1) / ss;
  const power = new Float64Array(K);
  const c = new Float64Array(n), s = new Float64Array(n);
  const uniform = isUniform(frequency) && K >= 3;
  const df = uniform ? (frequency[K - 1] - frequency[0]) / (K - 1) : 0;
  const dc = new Float64Array(uniform ? n : 0), ds = new Float64Array(uniform ? n : 0);
  if (uniform) {
    for (let i = 0; i < n; i++) {
      dc[i] = Math.cos(TWO_PI * df * t[i]);
      ds[i] = Math.sin(TWO_PI * df * t[i]);
    }
  }
  for (let k = 0; k < K; k++) {
    if (k % 64 === 0) throwIfStopped(options, "compute Lomb-Scargle periodogram");
    if (!uniform || k % 64 === 0) {
      const w = TWO_PI * (uniform ? frequency[0] + k * df : frequency[k]);
      for (let i = 0; i < n; i++) {
        c[i] = Math.cos(w * t[i]);
        s[i] = Math.sin(w * t[i]);
      }
    } else {
      for (let i = 0; i < n; i++) {
        const ci = c[i], si = s[i];
        c[i] = ci * dc[i] - si * ds[i];
        s[i] = si * dc[i] + ci * ds[i];
      }
    }
    let yc = 0, ys = 0, c2 = 0, s2 = 0;
    for (let i = 0; i < n; i++) {
      const ci = c[i], si = s[i], yi = y[i];
      yc += yi * ci;
      ys += yi * si;
      c2 += ci * ci - si * si;
      s2 += 2 * ci * si;
    }
    const r = Math.hypot(c2, s2);
    // cos 2ωτ, sin 2ωτ → cos ωτ, sin ωτ by the half-angle formulas
    let cosT = 1, sinT = 0;
    if (r > 0) {
      const cos2 = c2 / r, sin2 = s2 / r;
      cosT = Math.sqrt(Math.max(0, (1 + cos2) / 2));
      sinT = Math.sqrt(Math.max(0, (1 - cos2) / 2)) * (sin2 < 0 ? -1 : 1);
    }
    const yct = yc * cosT + ys * sinT; // Σ y cos ω(t−τ)
    const yst = ys * cosT - yc * sinT; // Σ y sin ω(t−τ)
    const cct = (n + r) / 2, sst = (n - r) / 2;
    const tol = 1e-10 * n;
    const pc = cct > tol ? (yct * yct) / cct : 0;
    const ps = sst > tol ? (yst * yst) / sst : 0;
    power[k] = scale * (pc + ps);
  }
  return power;
}

/** Input of {@link lombScargleChunk}. */
export interface LombScargleChunkInput extends LombScargleOptions {
  time: ArrayLike<number>;
  value: ArrayLike<number>;
  /** The part of the frequency grid this chunk covers. */
  frequency: ArrayLike<number>;
}

/**
 * {@link lombScargle} with its arguments in one structured-clonable object, the shape a worker
 * task takes; a grid split into fixed chunks gives the same numbers whatever the number of
 * workers.
 *
 * @param input data, frequencies of the chunk, normalisation
 * @param control `shouldStop`, polled as {@link lombScargle} does (not part of the input: a
 *   worker passes its own)
 * @returns power at the chunk's frequencies
 * @example
 * ```ts
 * import { lombScargle, lombScargleChunk } from "./lomb_scargle.ts";
 * import assert from "node:assert/strict";
 * const time = [0, 1, 2.5, 3, 4.2, 5], value = [1, 0, -1, 0, 1, 0];
 * const frequency = [0.1, 0.2, 0.3];
 * assert.deepEqual(lombScargleChunk({ time, value, frequency }), lombScargle(time, value, frequency));
 * ```
 */
export function lombScargleChunk(
  input: LombScargleChunkInput,
  control: StopOptions = {},
): Float64Array {
  return lombScargle(input.time, input.value, input.frequency, {
    normalization: input.normalization,
    shouldStop: control.shouldStop,
  });
}
