/**
 * Cycle phase: the fraction of its cycle elapsed at each time, for superposed-epoch
 * composites across cycles (e.g. Hathaway 2010, Living Rev. Sol. Phys. 7, 1, §4.5).
 *
 * @module
 */
import type { CycleRow } from "./cycle_table.ts";

/** Phase of every grid time within the cycle table. */
export interface CyclePhaseSeries {
  /** (t − start)/(end − start) in [0, 1) inside a complete cycle; NaN elsewhere (before the
   * first minimum, and in the cycle in progress, whose end is unknown). Dimensionless. */
  phase: Float64Array;
  /** Years since the latest minimum at or before t; NaN before the first minimum. */
  sinceMinimum: Float64Array;
  /** Table index (1-based) of the cycle containing t, 0 before the first minimum. */
  cycleIndex: Int32Array;
}

/**
 * Phase of each time within its cycle (linear in time from start minimum 0 to end minimum 1;
 * common practice for composites).
 *
 * @param time decimal years
 * @param rows cycle table from {@link cycleTable}, in time order
 * @returns phase, years since minimum and cycle index per time
 * @example
 * ```ts
 * import { cyclePhase } from "./cycle_phase.ts";
 * import type { CycleRow } from "./cycle_table.ts";
 * import assert from "node:assert/strict";
 * const row = { index: 1, start: { time: 2000, value: 0 }, end: { time: 2010, value: 0 } };
 * const p = cyclePhase([1999, 2005, 2011], [row as CycleRow]);
 * assert.ok(Number.isNaN(p.phase[0]));
 * assert.equal(p.phase[1], 0.5);
 * assert.ok(Number.isNaN(p.phase[2]) && p.sinceMinimum[2] === 1);
 * ```
 */
export function cyclePhase(time: ArrayLike<number>, rows: readonly CycleRow[]): CyclePhaseSeries {
  const n = time.length;
  const phase = new Float64Array(n).fill(NaN);
  const since = new Float64Array(n).fill(NaN);
  const cyc = new Int32Array(n);
  let q = -1;
  for (let i = 0; i < n; i++) {
    const t = time[i];
    while (q + 1 < rows.length && rows[q + 1].start.time <= t) q++;
    if (q < 0) continue;
    const r = rows[q];
    since[i] = t - r.start.time;
    if (r.end && t < r.end.time) {
      phase[i] = (t - r.start.time) / (r.end.time - r.start.time);
      cyc[i] = r.index;
    } else if (!r.end) {
      cyc[i] = r.index;
    } else {
      // after the last complete cycle's end without a following row: no cycle
      since[i] = t - r.end.time;
    }
  }
  return { phase, sinceMinimum: since, cycleIndex: cyc };
}
