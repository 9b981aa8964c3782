/**
 * Summary statistics of a cycle table: how many cycles are complete, and the mean, standard
 * deviation and range of their lengths, rise times and amplitudes.
 *
 * @module
 */
import { deviation, max, mean, min } from "d3-array";
import type { CycleRow } from "./cycle_table.ts";

/** Mean, sample standard deviation (n − 1), smallest and largest value, and count. */
export interface CycleStatistic {
  /** null without values. */
  mean: number | null;
  /** null with fewer than 2 values. */
  sd: number | null;
  min: number | null;
  max: number | null;
  n: number;
}

/** What {@link summarizeCycleTable} reports. */
export interface CycleTableSummary {
  /** Cycles with both minima observed. */
  completeCycles: number;
  /** Whether the table ends with a cycle in progress. */
  inProgress: boolean;
  /** Lengths (minimum to minimum), years. */
  lengthYears: CycleStatistic;
  /** Rise times (minimum to maximum), years. */
  riseYears: CycleStatistic;
  /** Amplitudes (smoothed maxima), input units. */
  amplitude: CycleStatistic;
}

/**
 * Mean, sample standard deviation, minimum and maximum of some values (d3-array's `mean`,
 * `deviation` (Welford's algorithm), `min` and `max`).
 *
 * @param x finite values
 * @returns the statistic; mean, min and max null for no values, sd null for fewer than 2
 * @example
 * ```ts
 * import { cycleStatistic } from "./cycle_statistics.ts";
 * import assert from "node:assert/strict";
 * const s = cycleStatistic([10, 12, 11]);
 * assert.equal(s.mean, 11);
 * assert.equal(s.sd, 1);
 * assert.deepEqual([s.min, s.max, s.n], [10, 12, 3]);
 * assert.equal(cycleStatistic([9]).sd, null);
 * ```
 */
export function cycleStatistic(x: readonly number[]): CycleStatistic {
  if (x.length === 0) return { mean: null, sd: null, min: null, max: null, n: 0 };
  return {
    mean: mean(x)!,
    sd: x.length > 1 ? deviation(x)! : null,
    min: min(x)!,
    max: max(x)!,
    n: x.length,
  };
}

/**
 * Summarise the complete cycles of a table (length, rise time and amplitude as defined by
 * Hathaway 2010, Living Rev. Sol. Phys. 7, 1, §4); the cycle in progress is left out.
 *
 * @param rows the cycle table from {@link cycleTable}
 * @returns counts and statistics
 * @example
 * ```ts
 * import { summarizeCycleTable } from "./cycle_statistics.ts";
 * import { cycleTable } from "./cycle_table.ts";
 * import { findCycleExtrema } from "./cycle_extrema.ts";
 * import assert from "node:assert/strict";
 * const t = Array.from({ length: 30 }, (_, i) => 2000 + i);
 * const v = t.map((x) => 50 - 50 * Math.cos(2 * Math.PI * (x - 2005) / 11));
 * const s = summarizeCycleTable(cycleTable(t, findCycleExtrema(t, v)));
 * assert.equal(s.completeCycles, 2);
 * assert.equal(s.lengthYears.mean, 11);
 * assert.ok(s.inProgress);
 * ```
 */
export function summarizeCycleTable(rows: readonly CycleRow[]): CycleTableSummary {
  const complete = rows.filter((r) => !r.inProgress);
  return {
    completeCycles: complete.length,
    inProgress: rows.some((r) => r.inProgress),
    lengthYears: cycleStatistic(complete.map((r) => r.length!)),
    riseYears: cycleStatistic(complete.map((r) => r.riseTime!)),
    amplitude: cycleStatistic(complete.map((r) => r.amplitude!)),
  };
}
