/**
 * Anomalies relative to a stated base period.
 *
 * @module
 */
import { calendarInstant } from "../time/mod.ts";
import { InputError } from "../errors.ts";

/** Options of {@link anomaliesFromBasePeriod}. */
export interface AnomalyOptions {
  /**
   * `mean`: subtract one base-period mean; `monthly`: subtract the base-period mean of each
   * calendar month (a climatology; for monthly or daily data). @default "mean"
   */
  climatology?: "mean" | "monthly";
  /**
   * Base-period values each base mean needs (each calendar month's, for the monthly
   * climatology). With 1, a calendar month seen once in the base period gets anomalies that are
   * all zero in that year; removing a seasonal cycle over a short overlap asks for 2 or more.
   * @default 1
   */
  minCount?: number;
}

/** Anomalies and the baseline they were taken from. */
export interface Anomalies {
  /** value − baseline, same units as the input. */
  value: Float64Array;
  /** The baseline subtracted at each point. */
  baseline: Float64Array;
  climatology: "mean" | "monthly";
  /** Base-period means: one (mean) or twelve, January first (monthly). */
  baseMeans: Float64Array;
  /** Points of the base period behind each base mean. */
  baseCounts: Int32Array;
}

/**
 * Anomalies relative to a base period: x − mean of x over the base period, or, with the
 * monthly climatology, x − mean of the same calendar month over the base period (common
 * practice in climatology, e.g. 30-year base periods such as 1961–1990; "anomaly" in the CF
 * conventions sense of a difference from a stated base period).
 *
 * Points with base ≤ time < end belong to the base period. The base mean is a plain mean of
 * the points there, so uneven coverage inside the base period weights better-covered stretches
 * more; callers should report the counts.
 *
 * @param series `{ time, value }`: decimal years and finite values of equal length
 * @param base `{ start, end }` decimal years, start < end, end exclusive
 * @param options climatology
 * @returns anomalies, baselines, base means and their counts
 * @throws {InputError} (field `base`) when the base period holds no data (or, for the monthly
 *   climatology, no data for some calendar month: `value` lists the months 1–12; reason
 *   `too_few_points` when a base mean has fewer than `minCount` values), or for malformed input
 *   (`series`, `climatology`, `minCount`)
 * @example
 * ```ts
 * import { anomaliesFromBasePeriod } from "./anomalies_from_base_period.ts";
 * import assert from "node:assert/strict";
 * const a = anomaliesFromBasePeriod(
 *   { time: [1990.5, 1991.5, 1992.5, 1993.5], value: [1, 3, 5, 7] },
 *   { start: 1990, end: 1992 },
 * );
 * assert.deepEqual(Array.from(a.value), [-1, 1, 3, 5]); // base mean (1 + 3) / 2 = 2
 * assert.deepEqual(Array.from(a.baseCounts), [2]);
 * ```
 */
export function anomaliesFromBasePeriod(
  series: { time: ArrayLike<number>; value: ArrayLike<number> },
  base: { start: number; end: number },
  options: AnomalyOptions = {},
): Anomalies {
  const { time, value } = series;
  const n = time.length;
  const mode = options.climatology ?? "mean";
  const minCount = options.minCount ?? 1;
  if (!Number.isInteger(minCount) || minCount < 1) {
    throw new InputError(
      `Cannot compute anomalies: minCount must be a positive integer, current value is ${minCount}`,
      { field: "minCount", reason: "out_of_range", value: minCount },
    );
  }
  if (mode !== "mean" && mode !== "monthly") {
    throw new InputError(
      `Cannot compute anomalies: climatology must be mean or monthly, got ${mode}`,
      { field: "climatology", reason: "unsupported", value: mode },
    );
  }
  if (value.length !== n) {
    throw new InputError(
      `Cannot compute anomalies: value has ${value.length} entries but time has ${n}`,
      { field: "series", reason: "length_mismatch", value: value.length },
    );
  }
  if (!(Number.isFinite(base.start) && Number.isFinite(base.end) && base.start < base.end)) {
    throw new InputError(
      `Cannot compute anomalies: base period must have finite start < end, got ${base.start}..${base.end}`,
      { field: "base", reason: "invalid", value: [base.start, base.end] },
    );
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(time[i]) || !Number.isFinite(value[i])) {
      throw new InputError(`Cannot compute anomalies: point ${i} is not finite`, {
        field: "series",
        reason: "not_finite",
        index: i,
      });
    }
  }
  const groups = mode === "monthly" ? 12 : 1;
  const group = new Int32Array(n);
  if (mode === "monthly") {
    for (let i = 0; i < n; i++) group[i] = calendarInstant(time[i]).month - 1;
  }
  const sum = new Float64Array(groups), count = new Int32Array(groups);
  for (let i = 0; i < n; i++) {
    if (time[i] >= base.start && time[i] < base.end) {
      sum[group[i]] += value[i];
      count[group[i]]++;
    }
  }
  if (count.every((c) => c === 0)) {
    throw new InputError(
      `Cannot compute anomalies: the base period ${base.start}..${base.end} holds no data ` +
        `(series spans ${n ? time[0] : "nothing"}..${n ? time[n - 1] : ""})`,
      { field: "base", reason: "no_overlap", value: [base.start, base.end] },
    );
  }
  const empty = [...count.keys()].filter((g) => count[g] === 0);
  if (empty.length > 0) {
    const names = empty.map((g) => MONTHS[g]).join(", ");
    throw new InputError(
      `Cannot compute anomalies: the base period ${base.start}..${base.end} holds no data for ${names}; ` +
        `a monthly climatology needs every calendar month`,
      { field: "base", reason: "empty", value: empty.map((g) => g + 1) },
    );
  }
  const few = [...count.keys()].filter((g) => count[g] < minCount);
  if (few.length > 0) {
    const what = mode === "monthly" ? few.map((g) => MONTHS[g]).join(", ") : "the base mean";
    throw new InputError(
      `Cannot compute anomalies: the base period ${base.start}..${base.end} holds fewer than ` +
        `${minCount} values for ${what} (${few.map((g) => count[g]).join(", ")})`,
      { field: "base", reason: "too_few_points", value: few.map((g) => g + 1) },
    );
  }
  const baseMeans = Float64Array.from(sum, (s, g) => s / count[g]);
  const baseline = Float64Array.from(group, (g) => baseMeans[g]);
  const out = Float64Array.from(value, (v, i) => v - baseline[i]);
  return { value: out, baseline, climatology: mode, baseMeans, baseCounts: count };
}

const MONTHS = [
  "January",
  "February",
  "March",
  "April",
  "May",
  "June",
  "July",
  "August",
  "September",
  "October",
  "November",
  "December",
];
