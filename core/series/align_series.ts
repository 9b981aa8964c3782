/**
 * Alignment of several series onto one calendar time axis.
 *
 * @module
 */
import type { CalendarResolution, TimeResolution } from "../time/mod.ts";
import { type PeriodMeans, resampleMeans, type ResampleOptions } from "./resample_means.ts";
import { InputError } from "../errors.ts";

/** A series to align. */
export interface AlignInput {
  time: ArrayLike<number>;
  value: ArrayLike<number>;
  uncertainty?: ArrayLike<number> | null;
  /** @default inferred */
  resolution?: TimeResolution;
}

/** Options of {@link alignSeries}. */
export interface AlignOptions extends Omit<ResampleOptions, "from" | "uncertainty"> {
  /**
   * `intersection`: keep only periods where every series has a covered value;
   * `common_span`: keep every period from the latest first covered period to the earliest last
   * one, with gaps (NaN) where a series lacks a value. @default "intersection"
   */
  rule?: "intersection" | "common_span";
}

/** What alignment kept and dropped for one series. */
export interface AlignReport {
  /** Input points. */
  points: number;
  /** Periods with a covered mean after resampling. */
  covered: number;
  /** Periods inside the series' span that failed coverage (gaps before alignment). */
  uncovered: number;
  /** Covered periods outside the common axis (before or after the other series). */
  droppedOutsideSpan: number;
  /** Covered periods inside the common span dropped because another series lacks them. */
  droppedByIntersection: number;
}

/** Series on a common axis. */
export interface AlignedSeries {
  resolution: CalendarResolution;
  rule: "intersection" | "common_span";
  /** Period middles, decimal years. */
  time: Float64Array;
  /** One value array per input, NaN in gaps (common_span only). */
  values: Float64Array[];
  uncertainties: (Float64Array | null)[];
  /** Units averaged per period, per input. */
  counts: Int32Array[];
  report: AlignReport[];
  /** How each series was resampled, in words. */
  resampling: string[];
}

/**
 * Put several series on one calendar axis at a chosen resolution.
 *
 * Each series is first turned into same-period means with {@link resampleMeans} (with its
 * coverage rule; a series already at the target resolution is binned as is), then the periods
 * are matched by rule (see {@link AlignOptions.rule}). Everything dropped is counted per series.
 *
 * @param series two or more series
 * @param to target resolution (not finer than any input's)
 * @param options rule and coverage thresholds
 * @returns the common axis, values per series and what was dropped
 * @throws {InputError} for fewer than 2 series, a target finer than an input (field `to`, index
 *   of the series), a series {@link resampleMeans} refuses or without a covered period (`series`
 *   with its index), or no common period (`series`, reason `no_overlap`)
 * @example
 * ```ts
 * import { alignSeries } from "./align_series.ts";
 * import assert from "node:assert/strict";
 * const a = { time: [2000.5, 2001.5, 2002.5], value: [1, 2, 3] };
 * const b = { time: [2001.5, 2002.5, 2003.5], value: [5, 6, 7] };
 * const r = alignSeries([a, b], "annual");
 * assert.deepEqual(Array.from(r.time), [2001.5, 2002.5]);
 * assert.deepEqual(r.values.map((v) => Array.from(v)), [[2, 3], [5, 6]]);
 * assert.equal(r.report[0].droppedOutsideSpan, 1);
 * ```
 */
export function alignSeries(
  series: AlignInput[],
  to: CalendarResolution,
  options: AlignOptions = {},
): AlignedSeries {
  if (series.length < 2) {
    throw new InputError(`Cannot align series: needs at least 2 series, got ${series.length}`, {
      field: "series",
      reason: "too_few_points",
      value: series.length,
    });
  }
  const rule = options.rule ?? "intersection";
  if (rule !== "intersection" && rule !== "common_span") {
    throw new InputError(
      `Cannot align series: rule must be intersection or common_span, got ${rule}`,
      { field: "rule", reason: "unsupported", value: rule },
    );
  }
  const means: PeriodMeans[] = series.map((s, k) => {
    try {
      return resampleMeans(s, to, {
        ...options,
        from: s.resolution,
        uncertainty: s.uncertainty ?? null,
      });
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      // the target resolution and the thresholds are checked for every series alike; anything
      // else is about series k
      const shared = e.field === "to" || e.field.startsWith("min") || e.field.startsWith("max");
      throw new InputError(`Cannot align series: series ${k}: ${e.message}`, {
        field: shared ? e.field : "series",
        reason: e.reason,
        index: k,
        value: e.value,
      });
    }
  });
  const index = means.map((m) => {
    const at = new Map<number, number>();
    m.time.forEach((t, j) => {
      if (m.covered[j]) at.set(t, j);
    });
    return at;
  });
  const firsts = means.map((m) => m.time[m.covered.indexOf(1)]);
  const lasts = means.map((m) => m.time[m.covered.lastIndexOf(1)]);
  if (firsts.some((t) => t === undefined)) {
    const k = firsts.findIndex((t) => t === undefined);
    throw new InputError(
      `Cannot align series: series ${k} has no ${to} period that meets coverage`,
      { field: "series", reason: "empty", index: k },
    );
  }
  const lo = Math.max(...firsts), hi = Math.min(...lasts);
  const axis: number[] = [];
  if (lo <= hi) {
    // all period middles in [lo, hi], from any series (they share the same calendar)
    const span = new Set<number>();
    for (const m of means) for (const t of m.time) if (t >= lo && t <= hi) span.add(t);
    for (const t of [...span].sort((a, b) => a - b)) {
      if (rule === "common_span" || index.every((at) => at.has(t))) axis.push(t);
    }
  }
  if (axis.length === 0) {
    throw new InputError(
      `Cannot align series: no common ${to} period where every series has a covered value` +
        (lo > hi ? ` (the series do not overlap in time)` : ""),
      { field: "series", reason: "no_overlap" },
    );
  }
  const inAxis = new Set(axis);
  const values = means.map((_, k) =>
    Float64Array.from(axis, (t) => {
      const j = index[k].get(t);
      return j === undefined ? NaN : means[k].value[j];
    })
  );
  const uncertainties = means.map((m, k) =>
    m.uncertainty
      ? Float64Array.from(axis, (t) => {
        const j = index[k].get(t);
        return j === undefined ? NaN : m.uncertainty![j];
      })
      : null
  );
  const counts = means.map((m, k) =>
    Int32Array.from(axis, (t) => {
      const j = index[k].get(t);
      return j === undefined ? 0 : m.count[j];
    })
  );
  const report = means.map((m, k): AlignReport => {
    let covered = 0, outside = 0, inter = 0;
    m.time.forEach((t, j) => {
      if (!m.covered[j]) return;
      covered++;
      if (t < lo || t > hi) outside++;
      else if (!inAxis.has(t)) inter++;
    });
    return {
      points: series[k].time.length,
      covered,
      uncovered: m.time.length - covered,
      droppedOutsideSpan: outside,
      droppedByIntersection: inter,
    };
  });
  return {
    resolution: to,
    rule,
    time: Float64Array.from(axis),
    values,
    uncertainties,
    counts,
    report,
    resampling: means.map((m) => m.rule),
  };
}
