/**
 * Lagged cross-correlation of a solar series x and a climate series y on one evenly spaced
 * axis, with both normalisations in use.
 *
 * Sign convention: at lag k the pairs are (x_t, y_{t+k}), so **k > 0 means the climate series
 * lags (follows) the solar series by k steps**. R's `ccf(x, y)` estimates cor(x_{t+h}, y_t) at
 * lag h, so r(k) here equals R's `ccf(x, y)` at lag −k, i.e. R's `ccf(y, x)` at lag +k.
 *
 * Normalisations:
 * - `overlap` (default): Pearson's r over the n_k = N − |k| overlapping pairs, each segment
 *   with its own mean and variance.
 * - `full`: the estimator of R's `ccf`/`acf` (Box & Jenkins 1976, eq. 11.1.5):
 *   c(k) = (1/N) Σ (x_t − x̄)(y_{t+k} − ȳ) / (s_x s_y), full-series means and variances with
 *   divisor N; biased toward 0 by about n_k/N.
 *
 * @module
 */
import { lag1Autocorrelation } from "./lag1_autocorrelation.ts";
import { brethertonEffectiveSampleSize } from "./effective_sample_size.ts";
import { correlationTTest, fisherZInterval } from "./correlation_tests.ts";
import { InputError } from "../errors.ts";

/** Which estimator of the lagged correlation. */
export type CorrelationNormalisation = "overlap" | "full";

/** Lag window of {@link laggedCorrelation}. */
export interface LagWindow {
  /** Smallest lag (may be negative: the climate series leads). */
  minLag: number;
  /** Largest lag. */
  maxLag: number;
}

/** Result of {@link laggedCorrelation}. */
export interface LaggedCorrelation {
  lags: number[];
  /** Pearson r over the overlapping pairs. */
  r: Float64Array;
  /** R `ccf` normalisation. */
  rFull: Float64Array;
  /** Number of overlapping pairs n_k = N − |k|. */
  n: Int32Array;
}

function checkInputs(fn: string, x: ArrayLike<number>, y: ArrayLike<number>, w: LagWindow) {
  if (x.length !== y.length) {
    throw new InputError(`Cannot ${fn}: x has ${x.length} values, y has ${y.length}`, {
      field: "y",
      reason: "length_mismatch",
      value: y.length,
    });
  }
  for (const [name, s] of [["x", x], ["y", y]] as const) {
    for (let i = 0; i < s.length; i++) {
      if (!Number.isFinite(s[i])) {
        throw new InputError(`Cannot ${fn}: ${name}[${i}] is not finite (${s[i]})`, {
          field: name,
          reason: "not_finite",
          index: i,
          value: s[i],
        });
      }
    }
  }
  if (!Number.isInteger(w.minLag) || !Number.isInteger(w.maxLag) || w.minLag > w.maxLag) {
    throw new InputError(
      `Cannot ${fn}: lags must be integers with minLag ≤ maxLag, got ${w.minLag}..${w.maxLag}`,
      { field: "window", reason: "invalid", value: [w.minLag, w.maxLag] },
    );
  }
  const big = Math.max(Math.abs(w.minLag), Math.abs(w.maxLag));
  if (x.length - big < 3) {
    throw new InputError(
      `Cannot ${fn}: lag ${big} leaves ${x.length - big} overlapping pairs, needs at least 3`,
      { field: "window", reason: "too_few_points", value: big },
    );
  }
}

/**
 * Index range [start, end) of x paired with y_{t+k} at lag k, for series of length n.
 *
 * @param n series length
 * @param k lag (k > 0: y follows x)
 * @returns [start, end) of the x indices in the overlap
 * @example
 * ```ts
 * import { overlapRange } from "./lagged_correlation.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(overlapRange(10, 3), [0, 7]);
 * assert.deepEqual(overlapRange(10, -3), [3, 10]);
 * ```
 */
export function overlapRange(n: number, k: number): [number, number] {
  return k >= 0 ? [0, n - k] : [-k, n];
}

/**
 * Lagged correlation r(k) = cor(x_t, y_{t+k}) for k in [minLag, maxLag], both normalisations.
 *
 * Two-pass sums (means first), cost O(N · number of lags).
 *
 * @param x solar series, evenly spaced, finite
 * @param y climate series on the same axis, same length
 * @param window lag window
 * @returns lags, overlap-Pearson r, R-style rFull and overlap counts
 * @throws {InputError} (field `x`, `y` or `window`) on different lengths, non-finite values, a
 *   bad window, fewer than 3 overlapping pairs, or a constant series or segment
 * @example
 * ```ts
 * import { laggedCorrelation } from "./lagged_correlation.ts";
 * import assert from "node:assert/strict";
 * const x = new Float64Array([0, 1, 0, -1, 0, 1, 0, -1, 0, 1]);
 * const y = new Float64Array([9, 0, 1, 0, -1, 0, 1, 0, -1, 0]); // x delayed by one step
 * const c = laggedCorrelation(x, y, { minLag: -1, maxLag: 1 });
 * assert.ok(Math.abs(c.r[2] - 1) < 1e-12); // lag +1: y follows x
 * assert.equal(c.n[2], 9);
 * ```
 */
export function laggedCorrelation(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  window: LagWindow,
): LaggedCorrelation {
  checkInputs("compute lagged correlation", x, y, window);
  const n = x.length;
  let mx = 0, my = 0;
  for (let i = 0; i < n; i++) {
    mx += x[i];
    my += y[i];
  }
  mx /= n;
  my /= n;
  let sxx = 0, syy = 0;
  for (let i = 0; i < n; i++) {
    sxx += (x[i] - mx) ** 2;
    syy += (y[i] - my) ** 2;
  }
  if (!(sxx > 0) || !(syy > 0)) {
    throw new InputError(
      `Cannot compute lagged correlation: the ${sxx > 0 ? "climate" : "solar"} series is constant`,
      { field: sxx > 0 ? "y" : "x", reason: "constant" },
    );
  }
  const lags: number[] = [];
  const count = window.maxLag - window.minLag + 1;
  const r = new Float64Array(count), rFull = new Float64Array(count), nn = new Int32Array(count);
  for (let j = 0; j < count; j++) {
    const k = window.minLag + j;
    lags.push(k);
    const [a, b] = overlapRange(n, k);
    const m = b - a;
    let ax = 0, ay = 0;
    for (let t = a; t < b; t++) {
      ax += x[t];
      ay += y[t + k];
    }
    ax /= m;
    ay /= m;
    let cxy = 0, cxx = 0, cyy = 0, fxy = 0;
    for (let t = a; t < b; t++) {
      const dx = x[t] - ax, dy = y[t + k] - ay;
      cxy += dx * dy;
      cxx += dx * dx;
      cyy += dy * dy;
      fxy += (x[t] - mx) * (y[t + k] - my);
    }
    if (!(cxx > 0) || !(cyy > 0)) {
      throw new InputError(
        `Cannot compute lagged correlation: at lag ${k} the overlapping ${
          cxx > 0 ? "climate" : "solar"
        } segment is constant`,
        { field: cxx > 0 ? "y" : "x", reason: "constant", value: k },
      );
    }
    r[j] = Math.max(-1, Math.min(1, cxy / Math.sqrt(cxx * cyy)));
    rFull[j] = Math.max(-1, Math.min(1, fxy / Math.sqrt(sxx * syy)));
    nn[j] = m;
  }
  return { lags, r, rFull, n: nn };
}

/** One row of {@link laggedCorrelationTable}: every analytic quantity at one lag. */
export interface LagRow {
  lag: number;
  /** Overlapping pairs. */
  n: number;
  /** Pearson r over the overlap. */
  r: number;
  /** R `ccf` normalisation. */
  r_full: number;
  /** Lag-1 autocorrelation of the solar segment used at this lag. */
  r1_solar: number;
  /** Lag-1 autocorrelation of the climate segment used at this lag. */
  r1_climate: number;
  /** Bretherton et al. (1999) effective sample size. */
  n_eff: number;
  /** t statistic with N_eff − 2 degrees of freedom (null when N_eff ≤ 2). */
  t: number | null;
  df: number | null;
  /** Two-sided analytic p-value with N_eff − 2 df (null when N_eff ≤ 2). */
  p_analytic: number | null;
  /** Two-sided p-value of the naive test with n − 2 df (ignores autocorrelation). */
  p_naive: number | null;
  /** Fisher-z 95 % interval with N_eff (null when N_eff ≤ 3 or |r| = 1). */
  ci_lower: number | null;
  ci_upper: number | null;
}

/**
 * Lagged correlation with, at every lag, the overlap count, the lag-1 autocorrelations of both
 * overlapping segments, N_eff (Bretherton et al. 1999), the t test with N_eff − 2 df and the
 * Fisher-z interval with N_eff. The statistic tested is `r` (overlap Pearson) or `r_full`
 * according to `normalisation`.
 *
 * @param x solar series, evenly spaced
 * @param y climate series on the same axis
 * @param window lag window
 * @param normalisation which r the t test and interval use @default "overlap"
 * @param level interval confidence level @default 0.95
 * @returns one row per lag
 * @throws {InputError} as {@link laggedCorrelation}; also when a segment's lag-1
 *   autocorrelation is ±1 (a degenerate series)
 * @example
 * ```ts
 * import { laggedCorrelationTable } from "./lagged_correlation.ts";
 * import assert from "node:assert/strict";
 * const x = Float64Array.from({ length: 60 }, (_, i) => Math.sin(i / 3));
 * const y = Float64Array.from({ length: 60 }, (_, i) => Math.sin((i - 2) / 3) + 0.1 * Math.cos(7 * i));
 * const rows = laggedCorrelationTable(x, y, { minLag: 0, maxLag: 4 });
 * const best = rows.reduce((a, b) => (Math.abs(b.r) > Math.abs(a.r) ? b : a));
 * assert.equal(best.lag, 2);
 * assert.ok(best.n_eff < best.n); // smooth series: fewer independent pairs
 * ```
 */
export function laggedCorrelationTable(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  window: LagWindow,
  normalisation: CorrelationNormalisation = "overlap",
  level = 0.95,
): LagRow[] {
  const c = laggedCorrelation(x, y, window);
  const n = x.length;
  return c.lags.map((k, j) => {
    const [a, b] = overlapRange(n, k);
    const r1x = lag1Autocorrelation(x, a, b);
    const r1y = lag1Autocorrelation(y, a + k, b + k);
    if (!(Math.abs(r1x) < 1) || !(Math.abs(r1y) < 1)) {
      throw new InputError(
        `Cannot compute effective sample size at lag ${k}: a lag-1 autocorrelation is ±1`,
        { field: Math.abs(r1x) < 1 ? "y" : "x", reason: "invalid", value: k },
      );
    }
    const m = c.n[j];
    const neff = brethertonEffectiveSampleSize(m, r1x, r1y);
    const stat = normalisation === "full" ? c.rFull[j] : c.r[j];
    const tt = neff > 2 ? correlationTTest(stat, neff) : null;
    const naive = m > 2 ? correlationTTest(stat, m) : null;
    const ci = neff > 3 && Math.abs(stat) < 1 ? fisherZInterval(stat, neff, level) : null;
    return {
      lag: k,
      n: m,
      r: c.r[j],
      r_full: c.rFull[j],
      r1_solar: r1x,
      r1_climate: r1y,
      n_eff: neff,
      t: tt ? tt.t : null,
      df: tt ? tt.df : null,
      p_analytic: tt ? tt.p : null,
      p_naive: naive ? naive.p : null,
      ci_lower: ci ? ci[0] : null,
      ci_upper: ci ? ci[1] : null,
    };
  });
}
