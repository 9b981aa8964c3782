/**
 * False-alarm probabilities of periodogram peaks: the analytic formula with the
 * Horne & Baliunas (1986) number of independent frequencies, and a seeded Monte Carlo
 * alternative.
 *
 * @module
 */
import { randomStream } from "../random/random_stream.ts";
import { lombScargle, type LombScargleNormalization } from "./lomb_scargle.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";

/**
 * Number of independent frequencies of a Lomb–Scargle periodogram searched up to the Nyquist
 * frequency, from N points: M ≈ −6.362 + 1.193 N + 0.00098 N² (Horne & Baliunas 1986, ApJ 302,
 * 757, eq. 13; the coefficients are from memory). Their simulations used nearly even
 * sampling; for a grid covering only part of the band it overstates M (conservative FAP).
 *
 * @param n number of data points, integer ≥ 6 (below that the fit gives M < 1)
 * @returns M
 * @throws {RangeError} when n is not an integer ≥ 6
 * @example
 * ```ts
 * import { hornBaliunasFrequencies } from "./false_alarm.ts";
 * import assert from "node:assert/strict";
 * // derived from Horne & Baliunas 1986 eq. 13: N = 100 → M = 122.74
 * assert.ok(Math.abs(hornBaliunasFrequencies(100) - 122.738) < 1e-9); // 122.74 rounded
 * ```
 */
export function hornBaliunasFrequencies(n: number): number {
  if (!Number.isInteger(n) || n < 6) {
    throw new RangeError(
      `Cannot compute Horne-Baliunas frequency count: n must be an integer >= 6, current value is ${n}`,
    );
  }
  return -6.362 + 1.193 * n + 0.00098 * n * n;
}

/**
 * False-alarm probability of a peak of normalised power z among M independent frequencies,
 * FAP(z) = 1 − (1 − e^−z)^M (Scargle 1982, ApJ 263, 835, eq. 14; Horne & Baliunas 1986,
 * eq. 22), for power normalised by the variance ("horne_baliunas"). Computed as
 * −expm1(M · log1p(−e^−z)) so that small probabilities keep their precision.
 *
 * @param z normalised peak power, ≥ 0
 * @param m number of independent frequencies, > 0
 * @returns probability in [0, 1]
 * @throws {RangeError} when z is negative or not finite, or m is not positive
 * @example
 * ```ts
 * import { falseAlarmProbability } from "./false_alarm.ts";
 * import assert from "node:assert/strict";
 * // derived from FAP(z) = 1 − (1 − e^−z)^M (Horne & Baliunas 1986): M = 122.74, z = 9.410 → 0.01
 * assert.ok(Math.abs(falseAlarmProbability(9.410, 122.74) - 0.01) < 1e-4);
 * ```
 */
export function falseAlarmProbability(z: number, m: number): number {
  if (!(Number.isFinite(z) && z >= 0)) {
    throw new RangeError(
      `Cannot compute false-alarm probability: power must be finite and >= 0, current value is ${z}`,
    );
  }
  if (!(Number.isFinite(m) && m > 0)) {
    throw new RangeError(
      `Cannot compute false-alarm probability: M must be > 0, current value is ${m}`,
    );
  }
  const p = -Math.expm1(m * Math.log1p(-Math.exp(-z)));
  return Math.min(1, Math.max(0, p));
}

/**
 * Power level whose false-alarm probability is `fap`: z = −ln(1 − (1 − FAP)^(1/M)) (inverse
 * of {@link falseAlarmProbability}; Horne & Baliunas 1986, eq. 18).
 *
 * @param fap false-alarm probability in (0, 1)
 * @param m number of independent frequencies, > 0
 * @returns normalised power z
 * @throws {RangeError} when fap is outside (0, 1) or m is not positive
 * @example
 * ```ts
 * import { powerAtFalseAlarm } from "./false_alarm.ts";
 * import assert from "node:assert/strict";
 * // derived from the same formula: N = 100 (M = 122.74) → z(0.01) = 9.410, z(0.05) = 7.780
 * assert.ok(Math.abs(powerAtFalseAlarm(0.01, 122.74) - 9.410) < 5e-4);
 * assert.ok(Math.abs(powerAtFalseAlarm(0.05, 122.74) - 7.780) < 5e-4);
 * ```
 */
export function powerAtFalseAlarm(fap: number, m: number): number {
  if (!(fap > 0 && fap < 1)) {
    throw new RangeError(
      `Cannot compute power level: false-alarm probability must be in (0, 1), current value is ${fap}`,
    );
  }
  if (!(Number.isFinite(m) && m > 0)) {
    throw new RangeError(`Cannot compute power level: M must be > 0, current value is ${m}`);
  }
  // 1 − (1 − fap)^(1/M) = −expm1(log1p(−fap)/M)
  return -Math.log(-Math.expm1(Math.log1p(-fap) / m));
}

/** Options of {@link monteCarloPeakMaxima}. */
export interface MonteCarloFapOptions extends StopOptions {
  /** Seed of the random streams (replicate r uses stream (seed, r)). */
  seed: number;
  /** Number of replicates, integer ≥ 1. */
  replicates: number;
  /**
   * First replicate index, so that chunks computed apart join into one result.
   * @default 0
   */
  firstReplicate?: number;
  /** @default "horne_baliunas" */
  normalization?: LombScargleNormalization;
  /**
   * Null hypothesis: "permutation" (white noise: the values shuffled over the sample times)
   * or "ar1" (red noise: a Gaussian AR(1) process on the actual, possibly uneven, times with
   * the data's variance and persistence; see {@link ar1Persistence}).
   * @default "permutation"
   */
  null?: "permutation" | "ar1";
}

/**
 * Persistence time τ of a first-order autoregressive (red-noise) model of a series:
 * τ = −d / ln ρ, with ρ the lag-1 autocorrelation of consecutive (mean-removed) values and d
 * their median spacing. This is the simple moment estimator for near-even sampling; Mudelsee
 * (2002, Comput. Geosci. 28, 69) gives a least-squares estimator for strongly uneven times.
 * The red-noise model x_i = a_i x_{i−1} + σ√(1 − a_i²) ε_i with a_i = exp(−(t_i − t_{i−1})/τ)
 * is the one used for uneven spectra by Schulz & Mudelsee (2002, Comput. Geosci. 28, 421).
 *
 * @param time sample times, increasing
 * @param value values, finite
 * @returns τ in time units, 0 when ρ ≤ 0 (white noise), Infinity never (ρ is capped at
 *   0.9999)
 * @example
 * ```ts
 * import { ar1Persistence } from "./false_alarm.ts";
 * import assert from "node:assert/strict";
 * // alternating values: negative lag-1 autocorrelation, white-noise model
 * assert.equal(ar1Persistence([0, 1, 2, 3, 4], [1, -1, 1, -1, 1]), 0);
 * ```
 */
export function ar1Persistence(time: ArrayLike<number>, value: ArrayLike<number>): number {
  const n = value.length;
  let m = 0;
  for (let i = 0; i < n; i++) m += value[i];
  m /= n;
  let c0 = 0, c1 = 0;
  for (let i = 0; i < n; i++) {
    c0 += (value[i] - m) ** 2;
    if (i > 0) c1 += (value[i] - m) * (value[i - 1] - m);
  }
  const rho = c0 > 0 ? Math.min(0.9999, c1 / c0) : 0;
  if (!(rho > 0)) return 0;
  const d: number[] = [];
  for (let i = 1; i < n; i++) d.push(time[i] - time[i - 1]);
  d.sort((a, b) => a - b);
  const med = d.length % 2 ? d[(d.length - 1) / 2] : (d[d.length / 2 - 1] + d[d.length / 2]) / 2;
  return -med / Math.log(rho);
}

/**
 * The null distribution of the largest periodogram peak by Monte Carlo: each replicate
 * permutes the values over the fixed sample times (Fisher–Yates shuffle, Durstenfeld 1964),
 * which keeps the data's distribution and sampling pattern but destroys any periodicity
 * (a white-noise null), and records the highest Lomb–Scargle power over the same grid.
 * Replicate r draws from `randomStream(seed, firstReplicate + r)`, so the result does not
 * depend on how replicates are split over workers.
 *
 * With `null: "ar1"` each replicate is instead red noise: a Gaussian AR(1) process on the
 * same times with the data's variance and persistence ({@link ar1Persistence}), the usual null
 * for climate spectra (Gilman, Fuglister & Mitchell 1963; Schulz & Mudelsee 2002). A
 * white-noise null overstates the significance of long-period peaks in red series.
 *
 * @param time sample times
 * @param value sample values
 * @param frequency the grid searched
 * @param options seed, replicate count, normalisation, `shouldStop` (polled before each
 *   replicate and inside its periodogram)
 * @returns the maximum power of each replicate, in replicate order
 * @throws {RangeError} as {@link lombScargle}, or when replicates is not an integer ≥ 1
 * @throws {StoppedError} when `options.shouldStop` answers true
 * @example
 * ```ts
 * import { monteCarloPeakMaxima } from "./false_alarm.ts";
 * import assert from "node:assert/strict";
 * const t = Array.from({ length: 50 }, (_, i) => i);
 * const y = t.map((x) => Math.sin(x / 3) + (x % 7) / 7);
 * const f = Array.from({ length: 20 }, (_, k) => 0.02 + k * 0.02);
 * const a = monteCarloPeakMaxima(t, y, f, { seed: 1, replicates: 4 });
 * const b = monteCarloPeakMaxima(t, y, f, { seed: 1, replicates: 2, firstReplicate: 2 });
 * assert.deepEqual([...a.slice(2)], [...b]);
 * ```
 */
export function monteCarloPeakMaxima(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  frequency: ArrayLike<number>,
  options: MonteCarloFapOptions,
): Float64Array {
  return monteCarloPeriodogramNull(time, value, frequency, options).maxima;
}

/** Result of {@link monteCarloPeriodogramNull}. */
export interface MonteCarloNull {
  /** Largest power of each replicate over the whole grid. */
  maxima: Float64Array;
  /** Power of each replicate at the probed grid indices: replicate r, probe j at r·P + j. */
  probed: Float64Array;
}

/**
 * As {@link monteCarloPeakMaxima}, also recording each replicate's power at chosen grid
 * indices (e.g. the observed peaks), for a local, single-frequency test beside the
 * family-wise test over the whole grid.
 *
 * @param time sample times
 * @param value sample values
 * @param frequency the grid searched
 * @param options seed, replicates, normalisation, null, and `probe` (grid indices)
 * @returns replicate maxima and probed powers
 * @throws {RangeError} as {@link monteCarloPeakMaxima}, or for a probe index off the grid
 * @example
 * ```ts
 * import { monteCarloPeriodogramNull } from "./false_alarm.ts";
 * import assert from "node:assert/strict";
 * const t = [0, 1, 2, 3, 4, 5, 6, 7], y = [1, 3, 2, 5, 4, 6, 5, 8];
 * const r = monteCarloPeriodogramNull(t, y, [0.1, 0.2, 0.3], { seed: 2, replicates: 4, probe: [1] });
 * assert.equal(r.probed.length, 4);
 * assert.ok(r.probed.every((p, i) => p <= r.maxima[i]));
 * ```
 */
export function monteCarloPeriodogramNull(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  frequency: ArrayLike<number>,
  options: MonteCarloFapOptions & { probe?: readonly number[] },
): MonteCarloNull {
  const probe = options.probe ?? [];
  for (const j of probe) {
    if (!Number.isInteger(j) || j < 0 || j >= frequency.length) {
      throw new RangeError(
        `Cannot run Monte Carlo false-alarm test: probe index ${j} is off the grid of ${frequency.length}`,
      );
    }
  }
  const { seed, replicates } = options;
  const first = options.firstReplicate ?? 0;
  if (!Number.isInteger(replicates) || replicates < 1) {
    throw new RangeError(
      `Cannot run Monte Carlo false-alarm test: replicates must be an integer >= 1, current value is ${replicates}`,
    );
  }
  const n = value.length;
  const y = new Float64Array(n);
  const out = new Float64Array(replicates);
  const probed = new Float64Array(replicates * probe.length);
  const red = options.null === "ar1";
  // red noise: generated along increasing time with the data's variance and persistence
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => time[a] - time[b]);
  let tau = 0, sd = 0;
  if (red) {
    const ts = order.map((i) => time[i]), vs = order.map((i) => value[i]);
    tau = ar1Persistence(ts, vs);
    let m = 0;
    for (const v of vs) m += v;
    m /= n;
    for (const v of vs) sd += (v - m) ** 2;
    sd = Math.sqrt(sd / (n - 1));
  }
  for (let r = 0; r < replicates; r++) {
    throwIfStopped(options, "run Monte Carlo false-alarm test");
    const rng = randomStream(seed, first + r);
    if (red) {
      let prev = 0;
      for (let q = 0; q < n; q++) {
        const i = order[q];
        const a = q === 0 || tau === 0 ? 0 : Math.exp(-(time[i] - time[order[q - 1]]) / tau);
        prev = q === 0 ? sd * rng.normal() : a * prev + sd * Math.sqrt(1 - a * a) * rng.normal();
        y[i] = prev;
      }
    } else {
      for (let i = 0; i < n; i++) y[i] = value[i];
      for (let i = n - 1; i > 0; i--) {
        const j = rng.int(0, i);
        const tmp = y[i];
        y[i] = y[j];
        y[j] = tmp;
      }
    }
    const p = lombScargle(time, y, frequency, {
      normalization: options.normalization,
      shouldStop: options.shouldStop,
    });
    let m = 0;
    for (let k = 0; k < p.length; k++) if (p[k] > m) m = p[k];
    out[r] = m;
    for (let j = 0; j < probe.length; j++) probed[r * probe.length + j] = p[probe[j]];
  }
  return { maxima: out, probed };
}

/**
 * Monte Carlo false-alarm probability of an observed peak power: (1 + #{maxima ≥ z}) / (1 + R)
 * over R replicate maxima (Davison & Hinkley 1997, "Bootstrap Methods and their Application",
 * eq. 4.11: the observed value counts as one of the R + 1 samples, so the estimate is never 0).
 *
 * @param z observed peak power (same normalisation as the maxima)
 * @param maxima replicate maxima from {@link monteCarloPeakMaxima}
 * @returns probability in (0, 1]
 * @throws {RangeError} when maxima is empty
 * @example
 * ```ts
 * import { monteCarloFalseAlarm } from "./false_alarm.ts";
 * import assert from "node:assert/strict";
 * assert.equal(monteCarloFalseAlarm(5, [1, 2, 6, 7]), 3 / 5);
 * ```
 */
export function monteCarloFalseAlarm(z: number, maxima: ArrayLike<number>): number {
  if (maxima.length === 0) {
    throw new RangeError("Cannot compute Monte Carlo false-alarm probability: no replicates");
  }
  let c = 0;
  for (let r = 0; r < maxima.length; r++) if (maxima[r] >= z) c++;
  return (1 + c) / (1 + maxima.length);
}

/** Input of {@link monteCarloMaximaChunk}: the data, the grid and the replicate range. */
export interface MonteCarloMaximaInput extends MonteCarloFapOptions {
  /** Grid indices whose replicate powers are returned too. */
  probe?: number[];
  time: ArrayLike<number>;
  value: ArrayLike<number>;
  frequency: ArrayLike<number>;
}

/**
 * {@link monteCarloPeriodogramNull} with all arguments in one structured-clonable object, the
 * shape a worker task takes (replicates split into chunks by `firstReplicate`).
 *
 * @param input data, grid, seed, replicate range and probed indices
 * @param control `shouldStop` (not part of the input: a worker passes its own)
 * @returns maxima (and probed powers) of the chunk's replicates
 * @example
 * ```ts
 * import { monteCarloMaximaChunk } from "./false_alarm.ts";
 * import assert from "node:assert/strict";
 * const m = monteCarloMaximaChunk({
 *   time: [1, 2, 3, 4, 5, 6], value: [1, 3, 2, 5, 4, 6], frequency: [0.1, 0.2],
 *   seed: 1, replicates: 3,
 * });
 * assert.equal(m.maxima.length, 3);
 * ```
 */
export function monteCarloMaximaChunk(
  input: MonteCarloMaximaInput,
  control: StopOptions = {},
): MonteCarloNull {
  return monteCarloPeriodogramNull(input.time, input.value, input.frequency, {
    ...input,
    shouldStop: control.shouldStop,
  });
}
