/**
 * Monte Carlo significance of a lagged correlation against surrogates of the solar series:
 * per-lag p-values and a family-wise p-value for the best lag over the whole window (the
 * observed max |r| compared with each surrogate's max |r| over the same window, so searching
 * many lags is paid for; Ebisuzaki 1997, J. Climate 10, 2147, §4).
 *
 * p-values are (1 + #{surrogates at least as extreme}) / (1 + M) for M surrogates (Davison &
 * Hinkley 1997, Bootstrap Methods and their Application, eq. 4.11; Phipson & Smyth 2010,
 * Stat. Appl. Genet. Mol. Biol. 9, 39), so a p-value is never 0.
 *
 * How the work is split: {@link planSurrogateLagTest} precomputes everything fixed (the
 * amplitude spectrum of the solar series, the climate series' spectrum and per-lag sums), and
 * {@link surrogateLagChunk} handles a range of surrogate indices; surrogate i always draws
 * from `randomStream(seed, i)`, so chunks can run on any number of workers and
 * {@link combineSurrogateChunks} gives the same answer.
 *
 * Fewest transforms: a phase-randomised surrogate is born in the frequency domain. With S its
 * spectrum and Y the climate spectrum, the circular cross-correlation c(k) = Σ_t s_t y_{t+k}
 * is IDFT(conj(S)·Y), and both s and c are real, so ONE complex inverse transform of
 * S + i·conj(S)·Y (length N, no zero padding; by Bluestein's algorithm when N is not a power
 * of two, see inverse_dft_plan.ts) gives s in its real part and c in its imaginary part. The linear (non-circular) overlap sums are c(k) minus the |k| wrapped pairs, O(|k|)
 * each, and overlap means and variances come from prefix sums of s. A polynomial detrend of
 * the surrogate is removed exactly by correcting with precomputed per-lag sums of the basis
 * times y. The AR(1) and high-pass variants are built in the time domain and need one
 * forward and one inverse transform each.
 *
 * @module
 */
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";
import { randomStream } from "../random/random_stream.ts";
import { inverseRealDft, realDft } from "../spectral/fft.ts";
import type { CorrelationNormalisation, LagWindow } from "./lagged_correlation.ts";
import { laggedCorrelation, overlapRange } from "./lagged_correlation.ts";
import type { PreprocessOptions } from "./preprocess_series.ts";
import { gaussianHighPass, polynomialBasis, removeProjection } from "./preprocess_series.ts";
import { lag1Autocorrelation } from "./lag1_autocorrelation.ts";
import { ar1Surrogate, dftAmplitudes, randomPhasors } from "./surrogates.ts";
import { type InverseDftPlan, inverseDftPlan } from "./inverse_dft_plan.ts";
import { InputError } from "../errors.ts";

/** Surrogate family. */
export type SurrogateMethod = "phase" | "ar1";

/** Options of {@link planSurrogateLagTest}. */
export interface SurrogateLagOptions extends LagWindow {
  /** @default "phase" */
  method?: SurrogateMethod;
  /** Statistic: overlap Pearson or R `ccf` normalisation. @default "overlap" */
  normalisation?: CorrelationNormalisation;
  /** Preprocessing already applied to x and y; applied again to every surrogate. */
  preprocess?: PreprocessOptions;
  /** Seed of the surrogate streams, integer in [0, 2^32). */
  seed: number;
  /**
   * The series the surrogates are built from, before the preprocessing is applied to them.
   * @default x. For the Gaussian high-pass, which is not idempotent, pass the solar series
   * before high-passing (e.g. only detrended), so that each surrogate is filtered once, as the
   * observations were.
   */
  surrogateSource?: Float64Array;
}

/** Everything fixed for the test; structured-clonable (plain numbers and typed arrays). */
export interface SurrogateLagPlan {
  method: SurrogateMethod;
  normalisation: CorrelationNormalisation;
  n: number;
  minLag: number;
  maxLag: number;
  seed: number;
  /** 0, 1, 2 for polynomial preprocessing; −1 for high-pass. */
  degree: number;
  cutoffSamples: number;
  /** |X_f| of the preprocessed solar series, f = 0..floor(N/2). */
  amplitude: Float64Array;
  /** AR(1) coefficient and stationary sd of the preprocessed solar series. */
  phi: number;
  sigma: number;
  /** Preprocessed climate series. */
  y: Float64Array;
  /** Full-length spectrum of y (N values each). */
  yRe: Float64Array;
  yIm: Float64Array;
  /** Per lag: Σ y over the overlap, Σ(y − mean)² over the overlap. */
  ySum: Float64Array;
  yVar: Float64Array;
  /** Mean and Σ(y − ȳ)² of the whole y. */
  yMean: number;
  ySs: number;
  /** Polynomial basis (degree+1 rows of N) and G[j][lag] = Σ_overlap b_j(t) y_{t+k}. */
  basis: Float64Array[];
  g: Float64Array[];
  /** Observed |statistic| per lag and its maximum over the window. */
  observedAbs: Float64Array;
  observedMaxAbs: number;
}

/** Input of {@link surrogateLagChunk}: the plan and a range of surrogate indices. */
export interface SurrogateChunkInput {
  plan: SurrogateLagPlan;
  start: number;
  end: number;
}

/** Output of {@link surrogateLagChunk}. */
export interface SurrogateChunkOutput {
  start: number;
  /** Per lag: surrogates with |r| ≥ observed |r|. */
  exceed: Float64Array;
  /** Per surrogate in the chunk: max |r| over the window. */
  maxAbs: Float64Array;
  /** Per lag: Σ r and Σ r² over the chunk's surrogates (for the spread of the null). */
  sum: Float64Array;
  sumSq: Float64Array;
  /** Per lag, a histogram of |r| in {@link ABS_R_BINS} bins of [0, 1] (lag-major). */
  absHistogram: Uint32Array;
}

/** Bins of the per-lag |r| histograms: thresholds are resolved to 1/ABS_R_BINS = 0.001. */
export const ABS_R_BINS = 1000;

/**
 * Precompute the fixed parts of the surrogate test for preprocessed series x (solar) and y
 * (climate).
 *
 * @param x preprocessed solar series
 * @param y preprocessed climate series, same length
 * @param options lag window, method, normalisation, preprocessing and seed
 * @returns the plan
 * @throws {RangeError} as {@link laggedCorrelation}, or on a bad seed
 * @example
 * ```ts
 * import { planSurrogateLagTest } from "./surrogate_lag_test.ts";
 * import assert from "node:assert/strict";
 * const x = Float64Array.from({ length: 64 }, (_, i) => Math.sin(i / 4) + 0.3 * Math.cos(i));
 * const y = Float64Array.from({ length: 64 }, (_, i) => Math.sin((i - 3) / 4));
 * const plan = planSurrogateLagTest(x, y, { minLag: -5, maxLag: 5, seed: 1 });
 * assert.equal(plan.observedAbs.length, 11);
 * ```
 */
export function planSurrogateLagTest(
  x: Float64Array,
  y: Float64Array,
  options: SurrogateLagOptions,
): SurrogateLagPlan {
  const method = options.method ?? "phase";
  const normalisation = options.normalisation ?? "overlap";
  const pre = options.preprocess ?? { method: "mean" };
  const pm = pre.method ?? "mean";
  const degree = pm === "mean" ? 0 : pm === "linear" ? 1 : pm === "quadratic" ? 2 : -1;
  if (!Number.isInteger(options.seed) || options.seed < 0 || options.seed >= 2 ** 32) {
    throw new InputError(`Cannot plan surrogate test: seed must be an integer in [0, 2^32)`, {
      field: "seed",
      reason: "out_of_range",
      value: options.seed,
    });
  }
  const obs = laggedCorrelation(x, y, options);
  const src = options.surrogateSource ?? x;
  if (src.length !== x.length) {
    throw new InputError(
      `Cannot plan surrogate test: surrogateSource has ${src.length} values, x has ${x.length}`,
      { field: "surrogateSource", reason: "length_mismatch", value: src.length },
    );
  }
  for (let i = 0; i < src.length; i++) {
    if (!Number.isFinite(src[i])) {
      throw new InputError(`Cannot plan surrogate test: surrogateSource[${i}] is not finite`, {
        field: "surrogateSource",
        reason: "not_finite",
        index: i,
      });
    }
  }
  const stat = normalisation === "full" ? obs.rFull : obs.r;
  const n = x.length;
  const nl = obs.lags.length;
  const observedAbs = new Float64Array(nl);
  let observedMaxAbs = 0;
  for (let j = 0; j < nl; j++) {
    observedAbs[j] = Math.abs(stat[j]);
    observedMaxAbs = Math.max(observedMaxAbs, observedAbs[j]);
  }
  let yMean = 0;
  for (let i = 0; i < n; i++) yMean += y[i];
  yMean /= n;
  let ySs = 0;
  for (let i = 0; i < n; i++) ySs += (y[i] - yMean) ** 2;
  const ySum = new Float64Array(nl), yVar = new Float64Array(nl);
  const basis = degree >= 0 ? polynomialBasis(n, degree) : [];
  const g = basis.map(() => new Float64Array(nl));
  for (let j = 0; j < nl; j++) {
    const k = options.minLag + j;
    const [a, b] = overlapRange(n, k);
    let s = 0;
    for (let t = a; t < b; t++) s += y[t + k];
    const m = s / (b - a);
    let v = 0;
    for (let t = a; t < b; t++) v += (y[t + k] - m) ** 2;
    ySum[j] = s;
    yVar[j] = v;
    for (let q = 0; q < basis.length; q++) {
      let gs = 0;
      const bq = basis[q];
      for (let t = a; t < b; t++) gs += bq[t] * y[t + k];
      g[q][j] = gs;
    }
  }
  const ys = realDft(y);
  const yRe = new Float64Array(n), yIm = new Float64Array(n);
  for (let f = 0; f < ys.re.length; f++) {
    yRe[f] = ys.re[f];
    yIm[f] = ys.im[f];
    if (f > 0) {
      yRe[n - f] = ys.re[f];
      yIm[n - f] = -ys.im[f];
    }
  }
  let phi = 0, sigma = 1;
  if (method === "ar1") {
    phi = lag1Autocorrelation(src);
    let mx = 0;
    for (let i = 0; i < n; i++) mx += src[i];
    mx /= n;
    let vx = 0;
    for (let i = 0; i < n; i++) vx += (src[i] - mx) ** 2;
    sigma = Math.sqrt(vx / n);
  }
  return {
    method,
    normalisation,
    n,
    minLag: options.minLag,
    maxLag: options.maxLag,
    seed: options.seed,
    degree,
    cutoffSamples: pre.cutoffSamples ?? 0,
    amplitude: method === "phase" ? dftAmplitudes(src) : new Float64Array(0),
    phi,
    sigma,
    y: Float64Array.from(y),
    yRe,
    yIm,
    ySum,
    yVar,
    yMean,
    ySs,
    basis,
    g,
    observedAbs,
    observedMaxAbs,
  };
}

const planCache = new Map<number, InverseDftPlan>();
function idftPlan(n: number): InverseDftPlan {
  let f = planCache.get(n);
  if (!f) {
    if (planCache.size > 16) planCache.clear();
    f = inverseDftPlan(n);
    planCache.set(n, f);
  }
  return f;
}

/** Circular cross-correlation c(k) = Σ_t s_t y_{(t+k) mod N} of a time-domain series with y. */
function circularCorrelation(s: Float64Array, plan: SurrogateLagPlan): Float64Array {
  const { re, im } = realDft(s);
  const wr = new Float64Array(re.length), wi = new Float64Array(re.length);
  for (let f = 0; f < re.length; f++) {
    // conj(S)·Y
    wr[f] = re[f] * plan.yRe[f] + im[f] * plan.yIm[f];
    wi[f] = re[f] * plan.yIm[f] - im[f] * plan.yRe[f];
  }
  return inverseRealDft({ re: wr, im: wi }, plan.n);
}

/**
 * Monte Carlo tallies for surrogates `start..end−1` of a plan (a pure function: the worker
 * task `climate.surrogateLagChunk`).
 *
 * @param input plan and index range
 * @param control `shouldStop`, polled before each surrogate (not part of the input: a worker
 *   passes its own)
 * @returns per-lag exceedance counts, per-surrogate max |r|, per-lag Σr and Σr²
 * @throws {StoppedError} when `control.shouldStop` answers true
 * @example
 * ```ts
 * import { planSurrogateLagTest, surrogateLagChunk } from "./surrogate_lag_test.ts";
 * import assert from "node:assert/strict";
 * const x = Float64Array.from({ length: 64 }, (_, i) => Math.sin(i / 4) + 0.3 * Math.cos(i));
 * const y = Float64Array.from({ length: 64 }, (_, i) => Math.sin((i - 3) / 4));
 * const plan = planSurrogateLagTest(x, y, { minLag: -5, maxLag: 5, seed: 1 });
 * const whole = surrogateLagChunk({ plan, start: 0, end: 20 });
 * const a = surrogateLagChunk({ plan, start: 0, end: 7 });
 * const b = surrogateLagChunk({ plan, start: 7, end: 20 });
 * assert.deepEqual([...whole.maxAbs], [...a.maxAbs, ...b.maxAbs]);
 * ```
 */
export function surrogateLagChunk(
  input: SurrogateChunkInput,
  control: StopOptions = {},
): SurrogateChunkOutput {
  const { plan, start, end } = input;
  const n = plan.n, nl = plan.maxLag - plan.minLag + 1;
  const exceed = new Float64Array(nl), sum = new Float64Array(nl), sumSq = new Float64Array(nl);
  const absHistogram = new Uint32Array(nl * ABS_R_BINS);
  const maxAbs = new Float64Array(Math.max(0, end - start));
  const y = plan.y;
  const h = Math.floor(n / 2) + 1;
  const even = n % 2 === 0;
  const inner = even ? h - 2 : h - 1;
  const pr = new Float64Array(inner), pi = new Float64Array(inner);
  const idft = idftPlan(n);
  const z = new Float64Array(2 * n), out = new Float64Array(2 * n);
  const s = new Float64Array(n), c = new Float64Array(n);
  // s before projection: the wrapped pairs of the circular sum c are pairs of this series
  const raw = new Float64Array(n);
  const p1 = new Float64Array(n + 1), p2 = new Float64Array(n + 1);
  const coef = new Float64Array(plan.basis.length);
  // the basis padded to three vectors with zeros, so the fused loops need no branches
  const nb = plan.basis.length;
  const zero = new Float64Array(n);
  const b0 = nb > 0 ? plan.basis[0] : zero, b1 = nb > 1 ? plan.basis[1] : zero;
  const b2 = nb > 2 ? plan.basis[2] : zero;
  const tol = 1e-12;
  const amp = plan.amplitude;
  for (let idx = start; idx < end; idx++) {
    throwIfStopped(control, "run surrogate lag test");
    const stream = randomStream(plan.seed, idx);
    let spectral = false; // true when c already holds the correlation of s (before projection)
    if (plan.method === "phase") {
      randomPhasors(stream, inner, pr, pi);
      const nyq = even ? Math.SQRT2 * amp[h - 1] * Math.cos(2 * Math.PI * stream.uniform()) : 0;
      if (plan.degree >= 0) {
        // one complex inverse transform of Z = S + i·conj(S)·Y gives s + i·c
        z[0] = 0;
        z[1] = 0;
        const yRe = plan.yRe, yIm = plan.yIm;
        for (let f = 1; f <= inner; f++) {
          const a = amp[f];
          const sr = a * pr[f - 1], si = a * pi[f - 1];
          const yr = yRe[f], yi = yIm[f];
          const wr = sr * yr + si * yi, wi = sr * yi - si * yr;
          z[2 * f] = sr - wi;
          z[2 * f + 1] = si + wr;
          const m = 2 * (n - f);
          z[m] = sr + wi;
          z[m + 1] = wr - si;
        }
        if (even) {
          z[n] = nyq;
          z[n + 1] = nyq * yRe[n / 2];
        }
        idft.inverse(z, out);
        // unpack s (real part) and c (imaginary part) and take the projection coefficients of
        // s on the polynomial basis in the same pass
        let q0 = 0, q1 = 0, q2 = 0;
        for (let t = 0; t < n; t++) {
          const v = out[2 * t];
          raw[t] = v;
          c[t] = out[2 * t + 1];
          q0 += v * b0[t];
          q1 += v * b1[t];
          q2 += v * b2[t];
        }
        coef[0] = q0;
        if (nb > 1) coef[1] = q1;
        if (nb > 2) coef[2] = q2;
        // the preprocessed surrogate and its prefix sums, in one pass
        let a1 = 0, a2 = 0;
        for (let t = 0; t < n; t++) {
          const v = raw[t] - q0 * b0[t] - q1 * b1[t] - q2 * b2[t];
          s[t] = v;
          a1 += v;
          a2 += v * v;
          p1[t + 1] = a1;
          p2[t + 1] = a2;
        }
        spectral = true;
      } else {
        const re = new Float64Array(h), im = new Float64Array(h);
        for (let f = 1; f <= inner; f++) {
          re[f] = amp[f] * pr[f - 1];
          im[f] = amp[f] * pi[f - 1];
        }
        if (even) re[h - 1] = nyq;
        s.set(inverseRealDft({ re, im }, n));
      }
    } else {
      s.set(ar1Surrogate(n, plan.phi, plan.sigma, stream));
    }
    if (!spectral) {
      // preprocessing of the surrogate, identical to the observations'
      if (plan.degree >= 0) {
        removeProjection(s, plan.basis);
      } else {
        const hp = gaussianHighPass(s, plan.cutoffSamples);
        let m = 0;
        for (let t = 0; t < n; t++) m += hp[t];
        m /= n;
        for (let t = 0; t < n; t++) s[t] = hp[t] - m;
      }
      c.set(circularCorrelation(s, plan));
      coef.fill(0);
      raw.set(s);
      // prefix sums of the preprocessed surrogate
      for (let t = 0; t < n; t++) {
        p1[t + 1] = p1[t] + s[t];
        p2[t + 1] = p2[t] + s[t] * s[t];
      }
    }
    const sMean = p1[n] / n;
    const sSs = p2[n] - p1[n] * sMean;
    let best = 0;
    for (let j = 0; j < nl; j++) {
      const k = plan.minLag + j;
      // linear overlap sum Σ s_t y_{t+k}: circular sum minus the |k| wrapped pairs (pairs of
      // the series c came from), minus the projection's share Σ coef_q·G_q(k).
      let sxy = c[((k % n) + n) % n];
      let wrap = 0;
      if (k > 0) {
        for (let t = n - k; t < n; t++) wrap += raw[t] * y[t + k - n];
      } else if (k < 0) {
        for (let t = 0; t < -k; t++) wrap += raw[t] * y[t + k + n];
      }
      sxy -= wrap;
      for (let q = 0; q < coef.length; q++) sxy -= coef[q] * plan.g[q][j];
      const [a, b] = k >= 0 ? [0, n - k] : [-k, n];
      const m = b - a;
      let r: number;
      if (plan.normalisation === "overlap") {
        const s1 = p1[b] - p1[a], s2 = p2[b] - p2[a];
        const vs = s2 - (s1 * s1) / m;
        const cov = sxy - (s1 * plan.ySum[j]) / m;
        r = vs > 0 ? cov / Math.sqrt(vs * plan.yVar[j]) : 0;
      } else {
        const s1 = p1[b] - p1[a];
        const cov = sxy - plan.yMean * s1 - sMean * plan.ySum[j] + m * sMean * plan.yMean;
        r = sSs > 0 ? cov / Math.sqrt(sSs * plan.ySs) : 0;
      }
      const ar = Math.abs(r);
      if (ar >= plan.observedAbs[j] - tol) exceed[j]++;
      if (ar > best) best = ar;
      sum[j] += r;
      sumSq[j] += r * r;
      absHistogram[j * ABS_R_BINS + Math.min(ABS_R_BINS - 1, Math.floor(ar * ABS_R_BINS))]++;
    }
    maxAbs[idx - start] = best;
  }
  return { start, exceed, maxAbs, sum, sumSq, absHistogram };
}

/** Combined result of a surrogate test. */
export interface SurrogateLagResult {
  /** Number of surrogates M. */
  surrogates: number;
  /** Per lag: (1 + #{|r_s(k)| ≥ |r(k)|}) / (1 + M). */
  pPerLag: number[];
  /** Family-wise: (1 + #{max_k |r_s(k)| ≥ max_k |r(k)|}) / (1 + M). */
  pFamilyWise: number;
  /** Observed max |r| over the window. */
  observedMaxAbs: number;
  /** 95th percentile of the surrogates' max |r| (family-wise 5 % threshold). */
  maxAbs95: number;
  /** Per lag: standard deviation of surrogate r (the null spread). */
  nullSd: number[];
  /**
   * Per lag: the |r| that 95 % of the surrogates stay below at that lag (pointwise 5 %
   * threshold), read from the histogram as the upper edge of the bin where the count reaches
   * 95 %, so it is conservative by at most 0.001.
   */
  threshold95PerLag: number[];
}

/**
 * Combine chunk outputs (any split of 0..M−1) into p-values.
 *
 * @param plan the plan the chunks were computed from
 * @param chunks outputs of {@link surrogateLagChunk} covering 0..M−1 once each
 * @returns per-lag and family-wise p-values
 * @throws {RangeError} when no surrogate was computed
 * @example
 * ```ts
 * import {
 *   combineSurrogateChunks,
 *   planSurrogateLagTest,
 *   surrogateLagChunk,
 * } from "./surrogate_lag_test.ts";
 * import assert from "node:assert/strict";
 * const x = Float64Array.from({ length: 64 }, (_, i) => Math.sin(i / 4) + 0.3 * Math.cos(i));
 * const y = Float64Array.from({ length: 64 }, (_, i) => Math.sin((i - 3) / 4));
 * const plan = planSurrogateLagTest(x, y, { minLag: -5, maxLag: 5, seed: 1 });
 * const res = combineSurrogateChunks(plan, [surrogateLagChunk({ plan, start: 0, end: 99 })]);
 * assert.ok(res.pFamilyWise > 0 && res.pFamilyWise <= 1);
 * ```
 */
export function combineSurrogateChunks(
  plan: SurrogateLagPlan,
  chunks: SurrogateChunkOutput[],
): SurrogateLagResult {
  const nl = plan.maxLag - plan.minLag + 1;
  const exceed = new Float64Array(nl), sum = new Float64Array(nl), sumSq = new Float64Array(nl);
  const hist = new Float64Array(nl * ABS_R_BINS);
  const sorted = [...chunks].sort((a, b) => a.start - b.start);
  const maxima: number[] = [];
  for (const ch of sorted) {
    for (let j = 0; j < nl; j++) {
      exceed[j] += ch.exceed[j];
      sum[j] += ch.sum[j];
      sumSq[j] += ch.sumSq[j];
    }
    for (let i = 0; i < hist.length; i++) hist[i] += ch.absHistogram[i];
    for (const v of ch.maxAbs) maxima.push(v);
  }
  const m = maxima.length;
  if (m === 0) {
    throw new InputError("Cannot combine surrogate tallies: no surrogates", {
      field: "chunks",
      reason: "empty",
    });
  }
  let famEx = 0;
  for (const v of maxima) if (v >= plan.observedMaxAbs - 1e-12) famEx++;
  const srt = Float64Array.from(maxima).sort();
  // type-7 quantile (R default)
  const hq = (m - 1) * 0.95, lo = Math.floor(hq);
  const q95 = srt[lo] + (hq - lo) * ((srt[Math.min(lo + 1, m - 1)] ?? srt[lo]) - srt[lo]);
  return {
    surrogates: m,
    pPerLag: Array.from(exceed, (e) => (1 + e) / (1 + m)),
    pFamilyWise: (1 + famEx) / (1 + m),
    observedMaxAbs: plan.observedMaxAbs,
    maxAbs95: q95,
    nullSd: Array.from(sum, (sj, j) => Math.sqrt(Math.max(0, sumSq[j] / m - (sj / m) ** 2))),
    threshold95PerLag: Array.from({ length: nl }, (_, j) => {
      const need = Math.ceil(0.95 * m);
      let c = 0;
      for (let b = 0; b < ABS_R_BINS; b++) {
        c += hist[j * ABS_R_BINS + b];
        if (c >= need) return (b + 1) / ABS_R_BINS;
      }
      return 1;
    }),
  };
}
