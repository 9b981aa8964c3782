/**
 * Calendar-period means with a minimum-coverage rule: daily → monthly → annual, built on the
 * one binning pass of core/series (period_means.ts) and its periods (period_key.ts).
 *
 * @module
 */
import {
  calendarInstant,
  type CalendarResolution,
  daysInMonth,
  inferResolution,
  type TimeResolution,
} from "../time/mod.ts";
import { dailyBounds, periodKey, periodKeyer, periodOfKey } from "./period_key.ts";
import { InputError } from "../errors.ts";
import { periodSums } from "./period_means.ts";

/** Coverage thresholds of {@link resampleMeans}. */
export interface ResampleOptions {
  /** Resolution of the input. @default inferred with inferResolution */
  from?: TimeResolution;
  /** One-sigma uncertainty per input point (same length as value), or null. @default null */
  uncertainty?: ArrayLike<number> | null;
  /** Daily values needed for a monthly mean, 1..31. @default 20 */
  minDaysPerMonth?: number;
  /** Monthly means needed for an annual mean, 1..12. @default 10 */
  minMonthsPerYear?: number;
  /** Points needed per period when the input is irregular. @default 1 */
  minPointsPerPeriod?: number;
  /**
   * Daily input only: a month whose longest run of consecutive missing days (counting from
   * the month's first day and to its last) is longer than this is a gap, whatever its count.
   * With `minDaysPerMonth` it expresses the common "at most 10 days missing, and fewer than 5
   * in a row" practice (`minDaysPerMonth` = days − 10, `maxMissingRunDays` = 4).
   * @default no limit
   */
  maxMissingRunDays?: number;
}

/** Means per calendar period, every period from the first to the last holding data. */
export interface PeriodMeans {
  resolution: CalendarResolution;
  /** Period middles, decimal years. */
  time: Float64Array;
  /** Period bounds, decimal years (end exclusive). */
  start: Float64Array;
  end: Float64Array;
  /** Mean per period; NaN marks a gap: a period that failed coverage (`covered[i] === 0`). */
  value: Float64Array;
  /** Uncertainty of each mean, √(Σσ²)/n (independent errors), NaN in gaps; null without input σ. */
  uncertainty: Float64Array | null;
  /** Units averaged in the last stage: days (daily→monthly), months (→annual), or points. */
  count: Int32Array;
  /** The count a period needs to be covered. */
  required: number;
  /** 1 where `count >= required`, else 0. */
  covered: Uint8Array;
  /** Daily → monthly only: the longest run of consecutive missing days per month, else null. */
  longestMissingRun: Int32Array | null;
  /** Input points inside each period. */
  points: Int32Array;
  /** How the means were formed, in words. */
  rule: string;
}

const RANK: Record<CalendarResolution, number> = { daily: 0, monthly: 1, annual: 2 };

/**
 * Resample a series to calendar-period means with a minimum-coverage rule.
 *
 * Method (common practice for station records, e.g. "at least 20 days for a monthly mean,
 * at least 10 months for an annual mean"):
 * - daily → monthly: the mean of the daily values in each calendar month, kept when the month
 *   has at least `minDaysPerMonth` of them;
 * - monthly → annual: the mean of the monthly values in each year, kept when the year has at
 *   least `minMonthsPerYear` of them;
 * - daily → annual: in two stages (monthly means with the day rule, then annual means of the
 *   covered months with the month rule), so an unevenly sampled year is not biased towards
 *   its best-sampled months;
 * - same resolution, or irregular input: the mean of the points in each period, kept with at
 *   least 1 point (same resolution) or `minPointsPerPeriod` points (irregular).
 * A period failing its rule is a gap (NaN, `covered` 0), never a mean of too few values. The
 * uncertainty of a mean assumes independent errors and excludes sampling error.
 *
 * @param series `{ time, value }`: decimal years strictly increasing, finite values, ≥ 2 points
 * @param to target resolution: `daily`, `monthly` or `annual`, not finer than the input
 * @param options input resolution, uncertainty and coverage thresholds
 * @returns means, bounds, counts and coverage per period
 * @throws {InputError} for a target finer than the input or too many periods (field `to`),
 *   thresholds out of range (the option's name), or bad input (`time`, `value` or
 *   `uncertainty`, with the index of a non-finite value)
 * @example
 * ```ts
 * import { resampleMeans } from "./resample_means.ts";
 * import { decimalYear } from "../time/mod.ts";
 * import assert from "node:assert/strict";
 * // 25 days of January 2001 (covered) and 10 days of February (a gap)
 * const days = [...Array(25).keys()].map((d) => decimalYear(2001, 1, d + 1, 0.5))
 *   .concat([...Array(10).keys()].map((d) => decimalYear(2001, 2, d + 1, 0.5)));
 * const m = resampleMeans({ time: days, value: days.map((_, i) => i) }, "monthly");
 * assert.deepEqual(Array.from(m.count), [25, 10]);
 * assert.deepEqual(Array.from(m.covered), [1, 0]);
 * assert.equal(m.value[0], 12);
 * assert.ok(Number.isNaN(m.value[1]));
 * ```
 */
export function resampleMeans(
  series: { time: ArrayLike<number>; value: ArrayLike<number> },
  to: CalendarResolution,
  options: ResampleOptions = {},
): PeriodMeans {
  const { time, value } = series;
  const n = time.length;
  if (!(to in RANK)) {
    throw new InputError(`Cannot resample: target must be daily, monthly or annual, got ${to}`, {
      field: "to",
      reason: "unsupported",
      value: to,
    });
  }
  if (value.length !== n) {
    throw new InputError(
      `Cannot resample: value has ${value.length} entries but time has ${n}`,
      { field: "value", reason: "length_mismatch", value: value.length },
    );
  }
  const unc = options.uncertainty ?? null;
  if (unc && unc.length !== n) {
    throw new InputError(
      `Cannot resample: uncertainty has ${unc.length} entries but time has ${n}`,
      { field: "uncertainty", reason: "length_mismatch", value: unc.length },
    );
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(value[i])) {
      throw new InputError(`Cannot resample: value[${i}] is not finite (${value[i]})`, {
        field: "value",
        reason: "not_finite",
        index: i,
        value: value[i],
      });
    }
  }
  if (n < 2) {
    throw new InputError(`Cannot resample: needs at least 2 points, got ${n}`, {
      field: "value",
      reason: "too_few_points",
      value: n,
    });
  }
  const from = options.from ?? inferResolution(time);
  const minDays = checkInt(options.minDaysPerMonth ?? 20, "minDaysPerMonth", 1, 31);
  const minMonths = checkInt(options.minMonthsPerYear ?? 10, "minMonthsPerYear", 1, 12);
  const minPoints = checkInt(options.minPointsPerPeriod ?? 1, "minPointsPerPeriod", 1, 1_000_000);
  const maxRun = options.maxMissingRunDays === undefined
    ? null
    : checkInt(options.maxMissingRunDays, "maxMissingRunDays", 0, 31);
  const runRule = maxRun === null ? "" : ` and no run of more than ${maxRun} missing days`;
  if (from !== "irregular" && RANK[from] > RANK[to]) {
    throw new InputError(
      `Cannot resample ${from} data to ${to}: resampling only averages into longer periods`,
      { field: "to", reason: "unsupported", value: to },
    );
  }

  if (from === "daily" && to === "annual") {
    const rule =
      `annual means of monthly means; a month needs ${minDays} daily values${runRule}, ` +
      `a year ${minMonths} covered months`;
    const monthly = bin(time, value, unc, "monthly", minDays, maxRun);
    const keep = [...monthly.covered.keys()].filter((i) => monthly.covered[i] === 1);
    const annual = keep.length === 0 ? null : bin(
      keep.map((i) => monthly.time[i]),
      keep.map((i) => monthly.value[i]),
      monthly.uncertainty ? keep.map((i) => monthly.uncertainty![i]) : null,
      "annual",
      minMonths,
    );
    // the periods span every year holding input points, not only years with covered months
    return merge(bin(time, value, unc, "annual", 1), annual, minMonths, rule);
  }
  const required = from === "irregular"
    ? minPoints
    : from === to
    ? 1
    : from === "daily"
    ? minDays
    : minMonths;
  const unit = from === "irregular" || from === to
    ? (required === 1 ? "point" : "points")
    : from === "daily"
    ? (required === 1 ? "daily value" : "daily values")
    : (required === 1 ? "monthly value" : "monthly values");
  const daysToMonths = from === "daily" && to === "monthly";
  const out = bin(time, value, unc, to, required, daysToMonths ? maxRun : null);
  out.rule = `${to} means of ${from} data; a period needs at least ${required} ${unit}` +
    (daysToMonths ? runRule : "");
  return out;
}

function bin(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  unc: ArrayLike<number> | null,
  to: CalendarResolution,
  required: number,
  maxRun: number | null = null,
): PeriodMeans {
  // the one binning pass of core/series (values are finite here: resampleMeans refuses NaN)
  const sums = periodSums(time, value, to, unc);
  const { sum, count, firstKey: k0 } = sums;
  const sq = sums.sumSquaredUncertainty;
  const m = count.length;
  // longest run of missing days per month: gaps between present days, before the first and
  // after the last (points are in time order, so days rise within a month)
  const run = maxRun === null ? null : new Int32Array(m);
  const lastDay = maxRun === null ? null : new Int32Array(m);
  if (run && lastDay) {
    const keyOf = periodKeyer(to);
    for (let i = 0; i < time.length; i++) {
      const j = keyOf(time[i]) - k0;
      const d = calendarInstant(time[i]).day;
      run[j] = Math.max(run[j], d - lastDay[j] - 1);
      lastDay[j] = d;
    }
  }
  const out: PeriodMeans = {
    resolution: to,
    time: new Float64Array(m),
    start: new Float64Array(m),
    end: new Float64Array(m),
    value: new Float64Array(m),
    uncertainty: sq ? new Float64Array(m) : null,
    count,
    required,
    covered: new Uint8Array(m),
    longestMissingRun: run,
    points: sums.points,
    rule: "",
  };
  const days = to === "daily" ? dailyBounds(k0, m) : null;
  for (let j = 0; j < m; j++) {
    if (days) {
      out.time[j] = days.middle[j];
      out.start[j] = days.start[j];
      out.end[j] = days.end[j];
    } else {
      const p = periodOfKey(k0 + j, to);
      out.time[j] = p.middle;
      out.start[j] = p.start;
      out.end[j] = p.end;
    }
    if (run && lastDay) {
      const y = Math.floor((k0 + j) / 12), mo = k0 + j - y * 12 + 1;
      run[j] = Math.max(run[j], daysInMonth(y, mo) - lastDay[j]);
    }
    const ok = count[j] >= required && (run === null || maxRun === null || run[j] <= maxRun);
    out.covered[j] = ok ? 1 : 0;
    out.value[j] = ok ? sum[j] / count[j] : NaN;
    if (out.uncertainty && sq) out.uncertainty[j] = ok ? Math.sqrt(sq[j]) / count[j] : NaN;
  }
  return out;
}

/** Annual periods of `all` (every year with input) carrying the two-stage means of `annual`. */
function merge(
  all: PeriodMeans,
  annual: PeriodMeans | null,
  required: number,
  rule: string,
): PeriodMeans {
  const at = new Map<number, number>();
  annual?.time.forEach((t, j) => at.set(t, j));
  const m = all.time.length;
  const out: PeriodMeans = {
    ...all,
    value: new Float64Array(m),
    uncertainty: all.uncertainty ? new Float64Array(m) : null,
    count: new Int32Array(m),
    covered: new Uint8Array(m),
    required,
    rule,
  };
  for (let j = 0; j < m; j++) {
    const k = at.get(all.time[j]);
    if (k === undefined || annual === null) {
      out.value[j] = NaN;
      if (out.uncertainty) out.uncertainty[j] = NaN;
      continue;
    }
    out.count[j] = annual.count[k];
    out.covered[j] = annual.covered[k];
    out.value[j] = annual.value[k];
    if (out.uncertainty) out.uncertainty[j] = annual.uncertainty ? annual.uncertainty[k] : NaN;
  }
  return out;
}

function checkInt(v: number, name: string, lo: number, hi: number): number {
  if (!Number.isInteger(v) || v < lo || v > hi) {
    throw new InputError(
      `Cannot resample: ${name} must be an integer in ${lo}..${hi}, current value is ${v}`,
      { field: name, reason: "out_of_range", value: v },
    );
  }
  return v;
}

/**
 * Means of a series in given calendar periods (by key, core/series/period_key.ts) with the
 * coverage rule of {@link resampleMeans}: a monthly cell from daily values needs
 * `minDaysPerMonth` of them, an annual cell from monthly values `minMonthsPerYear` (from
 * daily values both, in two stages); a period failing its rule is NaN, never a mean of too few
 * values. An input coarser than the periods (annual values for monthly cells) is not spread:
 * each value lands in the one period holding its time, the others are NaN. Missing values
 * (NaN) are no values: they count toward no period.
 *
 * @param series `{ time, value }`: decimal years strictly increasing, values (NaN missing)
 * @param from resolution of the input (`irregular` for an uneven axis)
 * @param to resolution of the keys
 * @param keys period keys to read, any order
 * @param options coverage thresholds (as {@link resampleMeans}; `from` is the argument)
 * @returns means aligned with `keys`, NaN where a period is not covered
 * @throws {InputError} as {@link resampleMeans}
 * @example
 * ```ts
 * import { resampledAtPeriodKeys } from "./resample_means.ts";
 * import { decimalYear } from "../time/mod.ts";
 * import assert from "node:assert/strict";
 * // 2012: 12 months; 2013: 9 months (January to September), short of 10
 * const time = [...Array(21).keys()].map((i) => decimalYear(2012 + Math.floor(i / 12), (i % 12) + 1, 15));
 * const v = resampledAtPeriodKeys({ time, value: time.map(() => 1) }, "monthly", "annual", [2012, 2013]);
 * assert.equal(v[0], 1);
 * assert.ok(Number.isNaN(v[1]));
 * ```
 */
export function resampledAtPeriodKeys(
  series: { time: ArrayLike<number>; value: ArrayLike<number> },
  from: TimeResolution,
  to: CalendarResolution,
  keys: ArrayLike<number>,
  options: Omit<ResampleOptions, "from" | "uncertainty"> = {},
): Float64Array {
  const out = new Float64Array(keys.length).fill(NaN);
  const time: number[] = [], value: number[] = [];
  for (let i = 0; i < series.time.length; i++) {
    if (Number.isFinite(series.value[i])) time.push(series.time[i]), value.push(series.value[i]);
  }
  const n = time.length;
  if (n === 0) return out;
  const coarser = from !== "irregular" && RANK[from] > RANK[to];
  if (n < 2 && !coarser && from !== to) {
    // one point: resampleMeans needs two; the rule asks for more than one value unless a
    // threshold of 1 was chosen
    const need = from === "daily"
      ? options.minDaysPerMonth ?? 20
      : from === "monthly"
      ? options.minMonthsPerYear ?? 10
      : options.minPointsPerPeriod ?? 1;
    if (need > 1 || (from === "daily" && to === "annual")) return out;
  }
  if (coarser || n < 2) {
    // coarser input (or a single point): each value in the one period holding it
    const at = new Map<number, number>();
    for (let i = 0; i < n; i++) {
      const k = periodKey(time[i], to);
      if (!at.has(k)) at.set(k, value[i]);
    }
    for (let i = 0; i < keys.length; i++) out[i] = at.get(keys[i]) ?? NaN;
    return out;
  }
  const m = resampleMeans({ time, value }, to, { ...options, from });
  const k0 = periodKey(m.time[0], to);
  for (let i = 0; i < keys.length; i++) {
    const j = keys[i] - k0;
    if (j >= 0 && j < m.value.length) out[i] = m.value[j];
  }
  return out;
}
