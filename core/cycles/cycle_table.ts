/**
 * The table of solar cycles: one row per cycle, from one smoothed minimum to the next, with
 * its timing, amplitude and activity (definitions as in Hathaway 2010, Living Rev. Sol. Phys.
 * 7, 1, §4: a cycle starts at a minimum of the 13-month smoothed sunspot number; its amplitude
 * is the smoothed maximum; rise time runs from minimum to maximum).
 *
 * @module
 */
import type { Extremum } from "./cycle_extrema.ts";

/** A point of the smoothed series. */
export interface CyclePoint {
  /** Decimal year. */
  time: number;
  /** Smoothed value, input units. */
  value: number;
}

/** One row of the cycle table. Times in decimal years, durations in years. */
export interface CycleRow {
  /** Position in the table, 1-based. */
  index: number;
  /** Cycle number from the user's anchor, or null when no numbering was set. */
  number: number | null;
  /** True for the last cycle, which has begun but whose ending minimum is not yet seen. */
  inProgress: boolean;
  /** Starting minimum. */
  start: CyclePoint;
  /** Smoothed maximum; for the cycle in progress possibly provisional (still rising). */
  maximum: (CyclePoint & { provisional: boolean }) | null;
  /** Ending minimum (the next cycle's start); null for the cycle in progress. */
  end: CyclePoint | null;
  /** end − start, years; null in progress. */
  length: number | null;
  /** maximum − start, years; null while the maximum is provisional. */
  riseTime: number | null;
  /** end − maximum, years; null in progress. */
  declineTime: number | null;
  /** Smoothed maximum value, input units; null while provisional. */
  amplitude: number | null;
  /** Mean of the activity values from start (included) to end (excluded), input units. */
  meanActivity: number | null;
  /**
   * Time integral of activity over the cycle, input units × years: mean activity × duration
   * (so missing months do not bias it low). For the cycle in progress, up to the last value.
   */
  integratedActivity: number | null;
  /** Number of activity values present and expected over the cycle (missing = expected − present). */
  samples: { present: number; expected: number };
}

/** Numbering anchor: "cycle `cycle` began at the minimum nearest `time`". */
export interface CycleAnchor {
  /** Cycle number, integer. */
  cycle: number;
  /** Decimal year near the starting minimum of that cycle. */
  time: number;
}

/** Options of {@link cycleTable}. */
export interface CycleTableOptions {
  /**
   * Activity values for the mean and integrated activity (e.g. the unsmoothed monthly means),
   * same grid as `time`; NaN = missing.
   * @default the smoothed values
   */
  activity?: ArrayLike<number>;
  /** Numbering anchor. @default none (numbers are null) */
  anchor?: CycleAnchor;
}

/**
 * Build the cycle table from the extrema of a smoothed series.
 *
 * Every pair of consecutive minima makes one complete cycle, with the maximum found between
 * them. After the last minimum comes the cycle in progress: no end, no length, no decline
 * time, and its maximum marked provisional until the series has fallen from it by the
 * prominence rule of {@link findCycleExtrema}. Nothing is extrapolated.
 *
 * Numbering: with an anchor, the cycle whose starting minimum is nearest `anchor.time` gets
 * number `anchor.cycle`, and the others count up and down from it.
 *
 * @param time decimal years of the grid, increasing
 * @param extrema from {@link findCycleExtrema} on the same grid
 * @param options activity values and numbering anchor
 * @returns rows in time order (empty when no minimum was found)
 * @throws {RangeError} when the anchor time lies outside the series or its cycle number is
 *   not an integer, or when the activity array length differs from time
 * @example
 * ```ts
 * import { cycleTable } from "./cycle_table.ts";
 * import { findCycleExtrema } from "./cycle_extrema.ts";
 * import assert from "node:assert/strict";
 * const t = Array.from({ length: 25 }, (_, i) => 2000 + i);
 * const v = t.map((x) => 50 - 50 * Math.cos(2 * Math.PI * (x - 2005) / 11));
 * const rows = cycleTable(t, findCycleExtrema(t, v), { anchor: { cycle: 7, time: 2004 } });
 * assert.equal(rows.length, 2);
 * assert.equal(rows[0].number, 7);
 * assert.equal(rows[0].length, 11);
 * assert.ok(rows[1].inProgress && rows[1].end === null);
 * ```
 */
export function cycleTable(
  time: ArrayLike<number>,
  extrema: readonly Extremum[],
  options: CycleTableOptions = {},
): CycleRow[] {
  const n = time.length;
  const act = options.activity;
  if (act && act.length !== n) {
    throw new RangeError(
      `Cannot build cycle table: activity has ${act.length} points but time has ${n}`,
    );
  }
  const anchor = options.anchor;
  if (anchor) {
    if (!Number.isInteger(anchor.cycle)) {
      throw new RangeError(
        `Cannot build cycle table: anchor cycle must be an integer, current value is ${anchor.cycle}`,
      );
    }
    if (!(anchor.time >= time[0] && anchor.time <= time[n - 1])) {
      throw new RangeError(
        `Cannot build cycle table: anchor time ${anchor.time} lies outside the series (${
          time[0]
        } to ${time[n - 1]})`,
      );
    }
  }
  const minima = extrema.filter((e) => e.kind === "minimum");
  const maxima = extrema.filter((e) => e.kind === "maximum");
  const values = act ?? null;
  const rows: CycleRow[] = [];
  let lastDefined = -1;
  if (values) {
    for (let i = n - 1; i >= 0; i--) {
      if (Number.isFinite(values[i])) {
        lastDefined = i;
        break;
      }
    }
  }
  const activity = (from: number, toExcl: number) => {
    let s = 0, c = 0;
    if (values) {
      for (let i = from; i < toExcl; i++) {
        const x = values[i];
        if (Number.isFinite(x)) {
          s += x;
          c++;
        }
      }
    }
    return { mean: c > 0 ? s / c : null, present: c, expected: Math.max(0, toExcl - from) };
  };
  for (let q = 0; q < minima.length; q++) {
    const a = minima[q], b = q + 1 < minima.length ? minima[q + 1] : null;
    const mx = maxima.find((m) => m.index > a.index && (b === null || m.index < b.index)) ??
      null;
    const start = { time: a.time, value: a.value };
    const confirmed = mx !== null && !mx.provisional;
    if (b) {
      const ac = values ? activity(a.index, b.index) : null;
      const len = b.time - a.time;
      rows.push({
        index: q + 1,
        number: null,
        inProgress: false,
        start,
        maximum: mx && { time: mx.time, value: mx.value, provisional: false },
        end: { time: b.time, value: b.value },
        length: len,
        riseTime: mx ? mx.time - a.time : null,
        declineTime: mx ? b.time - mx.time : null,
        amplitude: mx ? mx.value : null,
        meanActivity: ac ? ac.mean : null,
        integratedActivity: ac && ac.mean !== null ? ac.mean * len : null,
        samples: ac
          ? { present: ac.present, expected: ac.expected }
          : { present: b.index - a.index, expected: b.index - a.index },
      });
    } else {
      const endIdx = values ? lastDefined + 1 : n;
      const ac = values ? activity(a.index, endIdx) : null;
      const elapsed = values && lastDefined >= a.index ? time[lastDefined] - a.time : null;
      rows.push({
        index: q + 1,
        number: null,
        inProgress: true,
        start,
        maximum: mx && { time: mx.time, value: mx.value, provisional: !confirmed },
        end: null,
        length: null,
        riseTime: confirmed ? mx!.time - a.time : null,
        declineTime: null,
        amplitude: confirmed ? mx!.value : null,
        meanActivity: ac ? ac.mean : null,
        integratedActivity: ac && ac.mean !== null && elapsed !== null
          ? ac.mean * (elapsed + (time[1] - time[0]))
          : null,
        samples: ac
          ? { present: ac.present, expected: ac.expected }
          : { present: n - a.index, expected: n - a.index },
      });
    }
  }
  if (anchor && rows.length > 0) {
    let best = 0;
    for (let q = 1; q < rows.length; q++) {
      if (
        Math.abs(rows[q].start.time - anchor.time) < Math.abs(rows[best].start.time - anchor.time)
      ) {
        best = q;
      }
    }
    for (let q = 0; q < rows.length; q++) rows[q].number = anchor.cycle + (q - best);
  }
  return rows;
}
