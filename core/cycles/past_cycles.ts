/**
 * The past cycles of a table in the shape the hindcast takes: each complete cycle's observed
 * values from its starting minimum, its observed maximum, and the fitted curve of the cycle
 * before it (to subtract its overlapping tail, as the forecast of the cycle in progress does).
 *
 * @module
 */
import type { HindcastCycle } from "./cycle_hindcast.ts";
import type { CycleRow } from "./cycle_table.ts";
import type { CycleWindow } from "./cycle_sequence_fit.ts";
import type { HathawayFit } from "./cycle_shape_fit.ts";
import type { RegularGrid } from "./regular_grid.ts";

/**
 * Past cycles for {@link hindcastCycles} from the complete cycles of a table. Missing months
 * are left out (a fit takes only finite values). With `previousFits` (the independent fit of
 * every complete cycle, in table order), each cycle carries its predecessor's fit and the first
 * cycle, which has none, is left out.
 *
 * @param grid the regular grid of the table
 * @param rows complete cycles, with their maxima (from {@link completeCycleWindows})
 * @param windows their grid windows [start, end)
 * @param previousFits fits of the same cycles from their own windows, or undefined to ignore
 *   the overlap of consecutive cycles
 * @returns the past cycles, identified by their table index
 * @example
 * ```ts
 * import { pastCycles } from "./past_cycles.ts";
 * import { toRegularGrid } from "./regular_grid.ts";
 * import type { CycleRow } from "./cycle_table.ts";
 * import assert from "node:assert/strict";
 * const g = toRegularGrid([2000.5, 2001.5, 2002.5, 2003.5], [1, NaN, 3, 2], "annual");
 * const row = { index: 4, start: { time: 2000.5 }, maximum: { time: 2002.5, value: 3 } };
 * const [c] = pastCycles(g, [row as CycleRow], [{ start: 0, end: 4 }]);
 * assert.deepEqual(Array.from(c.value), [1, 3, 2]);
 * assert.equal(c.id, 4);
 * ```
 */
export function pastCycles(
  grid: RegularGrid,
  rows: readonly CycleRow[],
  windows: readonly CycleWindow[],
  previousFits?: readonly HathawayFit[],
): HindcastCycle[] {
  const past: HindcastCycle[] = [];
  rows.forEach((r, k) => {
    if (previousFits && k === 0) return;
    const w = windows[k];
    const time: number[] = [], value: number[] = [];
    for (let i = w.start; i < w.end; i++) {
      if (Number.isFinite(grid.value[i])) {
        time.push(grid.time[i]);
        value.push(grid.value[i]);
      }
    }
    past.push({
      id: r.index,
      time: Float64Array.from(time),
      value: Float64Array.from(value),
      start: r.start.time,
      maximum: { time: r.maximum!.time, value: r.maximum!.value },
      previousCycle: previousFits ? previousFits[k - 1] : undefined,
    });
  });
  return past;
}
