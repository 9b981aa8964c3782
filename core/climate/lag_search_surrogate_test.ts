/**
 * A p-value for a regression coefficient whose lag was chosen by searching: a Monte Carlo over
 * the same search with phase-randomised surrogates of the tested regressor (Ebisuzaki 1997,
 * J. Climate 10, 2147), and the Šidák bound as a cheap alternative that pays for the number of
 * lags only.
 *
 * Choosing the lag that fits best (here by AIC, attribution_regression.ts) and then testing
 * the coefficient at that lag as if it had been fixed overstates significance: under the null,
 * the best of many lags looks better than a fixed one. The surrogate test repeats the search
 * on each surrogate (the regressors' lag ranges as given, the same sample, the same error
 * model) and compares the observed p-value with the surrogates' p-values at their own chosen
 * lags. Given the other regressors at their chosen lags as fixed ranges (and `firstIndex` to
 * keep the sample), only the tested regressor's lag is searched again: the search whose cost
 * the test pays for, at one fit per lag per surrogate. The p-value is
 * p = (1 + #{surrogates with p* ≤ p}) / (1 + M) (Davison & Hinkley 1997, Bootstrap Methods
 * and their Application, eq. 4.11; Phipson & Smyth 2010, Stat. Appl. Genet. Mol. Biol. 9, 39).
 * The surrogates keep the regressor's autocorrelation (its amplitude spectrum), so the test
 * also pays for the autocorrelation a t test with AR(1) errors may miss.
 *
 * Work split as in surrogate_lag_test.ts: surrogate i draws from `randomStream(seed, i)`, so a
 * chunk of indices can run on any worker and {@link combineLagSearchChunks} gives the same
 * answer for any split.
 *
 * @module
 */
import { randomStream } from "../random/random_stream.ts";
import { inverseRealDft } from "../spectral/fft.ts";
import { InputError } from "../errors.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";
import {
  type AttributionOptions,
  type AttributionRegressor,
  pValueAfterLagSearch,
} from "./attribution_regression.ts";
import { dftAmplitudes, phaseRandomisedSpectrum } from "./surrogates.ts";

/** Everything a chunk of the test needs (structured-clonable). */
export interface LagSearchTestPlan {
  y: Float64Array;
  regressors: AttributionRegressor[];
  /** Index of the tested regressor in `regressors`. */
  tested: number;
  options: Pick<AttributionOptions, "errors" | "hacLags" | "exhaustiveLimit" | "firstIndex">;
  seed: number;
  /** DFT amplitudes of the tested regressor (its surrogates' spectrum). */
  amplitudes: Float64Array;
  /** Mean of the tested regressor, added back to each (zero-mean) surrogate. */
  mean: number;
}

/** One chunk: surrogate indices [start, end). */
export interface LagSearchChunkInput {
  plan: LagSearchTestPlan;
  start: number;
  end: number;
}

/** The p-value (at its own chosen lag) of each surrogate of the chunk, in index order. */
export interface LagSearchChunkOutput {
  pValues: Float64Array;
}

/**
 * Prepare the surrogate test of regressor `tested` after the lag search.
 *
 * @param y climate series
 * @param regressors regressors with their lag ranges (as given to attributionRegression)
 * @param tested index of the regressor whose surrogates are drawn
 * @param options error model and search options of the regression, and the seed
 * @returns the plan for {@link lagSearchSurrogateChunk}
 * @throws {InputError} when `tested` is out of range (`tested`) or the seed is not an integer
 *   in [0, 2^32) (`seed`)
 * @example
 * ```ts
 * import { planLagSearchTest } from "./lag_search_surrogate_test.ts";
 * import assert from "node:assert/strict";
 * const x = Float64Array.from({ length: 60 }, (_, i) => 5 + Math.sin(i / 3));
 * const plan = planLagSearchTest(x, [{ name: "x", values: x, minLag: 0, maxLag: 2 }], 0, {
 *   seed: 1,
 * });
 * assert.equal(plan.amplitudes.length, 31);
 * assert.ok(Math.abs(plan.mean - 5) < 0.1);
 * ```
 */
export function planLagSearchTest(
  y: Float64Array,
  regressors: readonly AttributionRegressor[],
  tested: number,
  options: LagSearchTestPlan["options"] & { seed: number },
): LagSearchTestPlan {
  if (!Number.isInteger(tested) || tested < 0 || tested >= regressors.length) {
    throw new InputError(
      `Cannot plan lag-search test: tested must be in 0..${regressors.length - 1}, got ${tested}`,
      { field: "tested", reason: "out_of_range", value: tested },
    );
  }
  const { seed } = options;
  if (!Number.isInteger(seed) || seed < 0 || seed >= 2 ** 32) {
    throw new InputError(
      `Cannot plan lag-search test: seed must be an integer in [0, 2^32), got ${seed}`,
      { field: "seed", reason: "out_of_range", value: seed },
    );
  }
  const x = regressors[tested].values;
  let mean = 0;
  for (let i = 0; i < x.length; i++) mean += x[i];
  mean /= x.length;
  return {
    y,
    regressors: regressors.map((r) => ({ ...r })),
    tested,
    options: {
      errors: options.errors,
      hacLags: options.hacLags,
      exhaustiveLimit: options.exhaustiveLimit,
      firstIndex: options.firstIndex,
    },
    seed,
    amplitudes: dftAmplitudes(x),
    mean,
  };
}

/**
 * Surrogates `start` to `end − 1`: each replaces the tested regressor by a phase-randomised
 * copy (plus its mean), repeats the AIC lag search and records the tested coefficient's
 * p-value at the chosen lags. A surrogate for which the regressors are collinear at every lag
 * (no fit) records p = 1 (never as extreme as an observation).
 *
 * @param input the plan and the index range
 * @param control `shouldStop`, polled before each surrogate and each fit of its lag search
 *   (not part of the input: a worker passes its own)
 * @returns the surrogates' p-values in index order
 * @throws {StoppedError} when `control.shouldStop` answers true
 * @example
 * ```ts
 * import { lagSearchSurrogateChunk, planLagSearchTest } from "./lag_search_surrogate_test.ts";
 * import assert from "node:assert/strict";
 * const n = 120;
 * const x = Float64Array.from({ length: n }, (_, i) => Math.sin(i / 5) + 0.3 * Math.cos(i * 1.9));
 * const y = Float64Array.from({ length: n }, (_, i) => Math.cos(i * 0.7) + 0.1 * Math.sin(i * 2.9));
 * const regs = [{ name: "x", values: x, minLag: 0, maxLag: 4 }];
 * const plan = planLagSearchTest(y, regs, 0, { errors: "ols_hac", seed: 3 });
 * const all = lagSearchSurrogateChunk({ plan, start: 0, end: 4 }).pValues;
 * const tail = lagSearchSurrogateChunk({ plan, start: 2, end: 4 }).pValues;
 * assert.deepEqual(Array.from(tail), Array.from(all.subarray(2)));
 * assert.ok(all.every((p) => p > 0 && p <= 1));
 * ```
 */
export function lagSearchSurrogateChunk(
  input: LagSearchChunkInput,
  control: StopOptions = {},
): LagSearchChunkOutput {
  const { plan, start, end } = input;
  const n = plan.y.length;
  const out = new Float64Array(Math.max(0, end - start));
  const regressors = plan.regressors.slice();
  const options = { ...plan.options, shouldStop: control.shouldStop };
  for (let i = start; i < end; i++) {
    throwIfStopped(control, "run lag-search surrogate test");
    const spec = phaseRandomisedSpectrum(plan.amplitudes, n, randomStream(plan.seed, i));
    const s = inverseRealDft(spec, n);
    for (let t = 0; t < n; t++) s[t] += plan.mean;
    regressors[plan.tested] = { ...plan.regressors[plan.tested], values: s };
    let p = 1;
    try {
      p = pValueAfterLagSearch(plan.y, regressors, plan.tested, options).pValue;
    } catch (e) {
      if (!(e instanceof InputError && e.reason === "collinear")) throw e;
    }
    out[i - start] = p;
  }
  return { pValues: out };
}

/** Result of {@link combineLagSearchChunks}. */
export interface LagSearchTestResult {
  /** (1 + #{p* ≤ observed}) / (1 + M). */
  pValue: number;
  surrogates: number;
  /** 5th percentile of the surrogates' p-values: the naive p-value a result needs for 5 %. */
  naiveThreshold05: number;
}

/**
 * Combine the chunks (in index order) into the search-adjusted p-value.
 *
 * @param observed the observed p-value at the chosen lag (the naive one)
 * @param chunks outputs of {@link lagSearchSurrogateChunk}
 * @returns the p-value that pays for the lag search, and the naive p-value a 5 % result needs
 * @throws {InputError} when there are no surrogates (`chunks`)
 * @example
 * ```ts
 * import { combineLagSearchChunks } from "./lag_search_surrogate_test.ts";
 * import assert from "node:assert/strict";
 * const r = combineLagSearchChunks(0.02, [{ pValues: new Float64Array([0.01, 0.5, 0.03]) }]);
 * assert.equal(r.pValue, 0.5); // (1 + 1) / (1 + 3)
 * ```
 */
export function combineLagSearchChunks(
  observed: number,
  chunks: readonly LagSearchChunkOutput[],
): LagSearchTestResult {
  const all = chunks.flatMap((c) => Array.from(c.pValues));
  if (all.length === 0) {
    throw new InputError("Cannot combine lag-search test: no surrogates", {
      field: "chunks",
      reason: "empty",
    });
  }
  const extreme = all.filter((p) => p <= observed).length;
  const sorted = all.slice().sort((a, b) => a - b);
  // type-7 quantile (R's default) of the surrogates' p-values at 0.05
  const h = (sorted.length - 1) * 0.05, lo = Math.floor(h);
  const q = sorted[lo] + (h - lo) * ((sorted[Math.min(lo + 1, sorted.length - 1)]) - sorted[lo]);
  return { pValue: (1 + extreme) / (1 + all.length), surrogates: all.length, naiveThreshold05: q };
}

/**
 * Šidák bound for the smallest of m p-values: 1 − (1 − p)^m (Šidák 1967, J. Amer. Statist.
 * Assoc. 62, 626), exact for m independent tests; tests at neighbouring lags are strongly
 * correlated, so for a lag search it is conservative (too large) about the search; it keeps
 * whatever the p-values assume about the noise. Computed as
 * −expm1(m · log1p(−p)) to keep precision for small p.
 *
 * @param p the smallest p-value, in [0, 1]
 * @param m number of tests (lags searched), integer ≥ 1
 * @returns the adjusted p-value in [p, 1]
 * @throws {InputError} for p outside [0, 1] (`p`) or m not a positive integer (`m`)
 * @example
 * ```ts
 * import { sidakAdjusted } from "./lag_search_surrogate_test.ts";
 * import assert from "node:assert/strict";
 * assert.ok(Math.abs(sidakAdjusted(0.05, 2) - 0.0975) < 1e-12);
 * assert.equal(sidakAdjusted(0.2, 1), 0.2);
 * ```
 */
export function sidakAdjusted(p: number, m: number): number {
  if (!(p >= 0 && p <= 1)) {
    throw new InputError(`Cannot adjust p-value: p must be in [0, 1], got ${p}`, {
      field: "p",
      reason: "out_of_range",
      value: p,
    });
  }
  if (!Number.isInteger(m) || m < 1) {
    throw new InputError(`Cannot adjust p-value: m must be a positive integer, got ${m}`, {
      field: "m",
      reason: "out_of_range",
      value: m,
    });
  }
  if (m === 1) return p;
  return Math.min(1, Math.max(p, -Math.expm1(m * Math.log1p(-p))));
}
