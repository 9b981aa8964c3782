/**
 * The grid windows of the complete cycles of a table: for each cycle with both minima and a
 * maximum observed, the index range [start minimum, end minimum) into its regular grid, found by
 * integer calendar-period arithmetic.
 *
 * @module
 */
import type { CycleRow } from "./cycle_table.ts";
import type { CycleWindow } from "./cycle_sequence_fit.ts";
import { periodIndex, type RegularGrid } from "./regular_grid.ts";

/**
 * Index of the grid period that contains decimal year `t` (the grid's own times map to their
 * own index).
 *
 * @param grid the regular grid
 * @param t decimal year, finite
 * @returns period index minus the grid's first period (may fall outside the grid)
 * @throws {RangeError} when t is not finite
 * @example
 * ```ts
 * import { gridIndex } from "./cycle_windows.ts";
 * import { toRegularGrid } from "./regular_grid.ts";
 * import assert from "node:assert/strict";
 * const g = toRegularGrid([2000.5, 2003.5], [1, 2], "annual");
 * assert.equal(gridIndex(g, 2002.5), 2);
 * ```
 */
export function gridIndex(grid: RegularGrid, t: number): number {
  return periodIndex(t, grid.resolution) - grid.firstPeriod;
}

/**
 * The complete cycles of a table (both minima and a maximum observed) with their windows.
 *
 * @param grid the regular grid the table was built on
 * @param rows the cycle table from {@link cycleTable}
 * @returns the complete rows and, for each, its window [start, end) of grid indices
 * @example
 * ```ts
 * import { completeCycleWindows } from "./cycle_windows.ts";
 * import { cycleTable } from "./cycle_table.ts";
 * import { findCycleExtrema } from "./cycle_extrema.ts";
 * import { toRegularGrid } from "./regular_grid.ts";
 * import assert from "node:assert/strict";
 * const t = Array.from({ length: 30 }, (_, i) => 2000.5 + i);
 * const g = toRegularGrid(t, t.map((x) => 50 - 50 * Math.cos(2 * Math.PI * (x - 2005.5) / 11)), "annual");
 * const { rows, windows } = completeCycleWindows(g, cycleTable(g.time, findCycleExtrema(g.time, g.value)));
 * assert.equal(rows.length, 2);
 * assert.deepEqual(windows, [{ start: 5, end: 16 }, { start: 16, end: 27 }]);
 * ```
 */
export function completeCycleWindows(
  grid: RegularGrid,
  rows: readonly CycleRow[],
): { rows: CycleRow[]; windows: CycleWindow[] } {
  const complete = rows.filter((r) => !r.inProgress && r.maximum);
  const windows = complete.map((r) => ({
    start: gridIndex(grid, r.start.time),
    end: gridIndex(grid, r.end!.time),
  }));
  return { rows: complete, windows };
}
