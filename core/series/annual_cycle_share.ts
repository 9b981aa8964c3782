/**
 * How strong the annual (seasonal) cycle of a monthly series is: the share of its variance
 * that the twelve calendar-month means explain.
 *
 * @module
 */
import { calendarInstant } from "../time/mod.ts";
import { InputError } from "../errors.ts";

/**
 * Share of variance at or above which an annual cycle counts as strong (whatever the length of
 * the series): a tenth of the variance. The solar-cycle signal sought in monthly climate
 * series is of order 0.1 K (Lean & Rind 2008, GRL 35, L18701), a small fraction of monthly
 * variance; an annual cycle carrying a tenth of it or more dominates correlations with any
 * other series and the surrogate tests built on them. Anomaly series from a nearby base period
 * keep a few percent at most (common practice), absolute monthly temperatures outside the
 * tropics most of their variance.
 */
export const STRONG_ANNUAL_CYCLE_SHARE = 0.1;

/** Result of {@link annualCycleShare}. */
export interface AnnualCycleShare {
  /**
   * η² = Σ_m n_m (x̄_m − x̄)² / Σ (x − x̄)²: the share of the variance explained by the
   * calendar-month means (0 for a constant series).
   */
  share: number;
  /** Values used (finite ones). */
  n: number;
  /** Calendar months present. */
  months: number;
  /** Mean and standard deviation of η² for independent values with no annual cycle. */
  nullMean: number;
  nullSd: number;
  /** The share that counts as strong: max(STRONG_ANNUAL_CYCLE_SHARE, nullMean + 3 nullSd). */
  threshold: number;
  /** share ≥ threshold. */
  strong: boolean;
}

/**
 * Strength of the annual cycle of a series: Pearson's correlation ratio η² of the values on
 * their calendar month (the between-month sum of squares over the total one: one-way analysis
 * of variance, Fisher 1925, Statistical Methods for Research Workers), i.e. the R² of a
 * regression on twelve month indicators.
 *
 * "Strong" is stated once: η² ≥ {@link STRONG_ANNUAL_CYCLE_SHARE} (a tenth of the variance) and
 * more than chance gives: for independent normal values with equal monthly means, η² with k
 * months and n values follows Beta((k − 1)/2, (n − k)/2) (the null distribution of R²; common
 * practice), with mean (k − 1)/(n − 1) and variance 2(k − 1)(n − k)/((n − 1)²(n + 1)); the
 * share must also exceed that mean by 3 standard deviations, so a short series of noise (at 36
 * months the mean alone is 0.31) is not called seasonal. Autocorrelated series without an
 * annual cycle have η² near or below the independent case when their variations are slower
 * than a year (each calendar month samples them alike).
 *
 * NaN values are skipped. Dimensionless.
 *
 * @param series `{ time, value }`: decimal years (the calendar month of each is read from its
 *   date) and values, NaN for missing
 * @returns η², its null mean and spread, the threshold and whether the cycle is strong
 * @throws {InputError} when lengths differ (`value`), a time is not finite (`time`), or fewer
 *   than 2 calendar months or fewer than 13 finite values are present (`value`,
 *   `too_few_points`)
 * @example
 * ```ts
 * import { annualCycleShare } from "./annual_cycle_share.ts";
 * import assert from "node:assert/strict";
 * // ten years of a pure annual cycle plus a small alternation: nearly all variance seasonal
 * const time = Array.from({ length: 120 }, (_, i) => 2000 + (i + 0.5) / 12);
 * const value = time.map((_, i) => 10 * Math.cos((2 * Math.PI * i) / 12) + (i % 2 ? 0.1 : -0.1));
 * const a = annualCycleShare({ time, value });
 * assert.ok(a.share > 0.99 && a.strong);
 * assert.ok(Math.abs(a.nullMean - 11 / 119) < 1e-12);
 * ```
 */
export function annualCycleShare(
  series: { time: ArrayLike<number>; value: ArrayLike<number> },
): AnnualCycleShare {
  const { time, value } = series;
  if (time.length !== value.length) {
    throw new InputError(
      `Cannot measure the annual cycle: value has ${value.length} entries but time has ${time.length}`,
      { field: "value", reason: "length_mismatch", value: value.length },
    );
  }
  const sum = new Float64Array(12), count = new Int32Array(12);
  let n = 0, total = 0;
  for (let i = 0; i < time.length; i++) {
    if (!Number.isFinite(time[i])) {
      throw new InputError(`Cannot measure the annual cycle: time[${i}] is not finite`, {
        field: "time",
        reason: "not_finite",
        index: i,
        value: time[i],
      });
    }
    const v = value[i];
    if (!Number.isFinite(v)) continue;
    const m = calendarInstant(time[i]).month - 1;
    sum[m] += v;
    count[m]++;
    total += v;
    n++;
  }
  const k = count.filter((c) => c > 0).length;
  if (k < 2 || n < 13) {
    throw new InputError(
      `Cannot measure the annual cycle: needs at least 13 values in 2 or more calendar months, ` +
        `got ${n} values in ${k} months`,
      { field: "value", reason: "too_few_points", value: n },
    );
  }
  const mean = total / n;
  let ssTotal = 0;
  for (let i = 0; i < time.length; i++) {
    const v = value[i];
    if (Number.isFinite(v)) ssTotal += (v - mean) * (v - mean);
  }
  let ssBetween = 0;
  for (let m = 0; m < 12; m++) {
    if (count[m] > 0) ssBetween += count[m] * (sum[m] / count[m] - mean) ** 2;
  }
  const share = ssTotal > 0 ? Math.min(1, ssBetween / ssTotal) : 0;
  const nullMean = (k - 1) / (n - 1);
  const nullSd = Math.sqrt((2 * (k - 1) * (n - k)) / ((n - 1) ** 2 * (n + 1)));
  const threshold = Math.max(STRONG_ANNUAL_CYCLE_SHARE, nullMean + 3 * nullSd);
  return { share, n, months: k, nullMean, nullSd, threshold, strong: share >= threshold };
}
