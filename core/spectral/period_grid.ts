/**
 * Frequency grids for periodograms.
 *
 * @module
 */

/** Options of {@link periodGrid}. */
export interface PeriodGridOptions {
  /** Shortest period, time units (years). */
  minPeriod: number;
  /** Longest period, time units (years). */
  maxPeriod: number;
  /** Number of grid points, integer ≥ 1. */
  count: number;
  /**
   * "frequency": evenly spaced in frequency (the natural grid of a periodogram, and the fast
   * path of {@link lombScargle}); "period": evenly spaced in period.
   * @default "frequency"
   */
  spacing?: "frequency" | "period";
}

/**
 * A grid of frequencies (cycles per time unit) between 1/maxPeriod and 1/minPeriod, in
 * increasing frequency order.
 *
 * @param options period range, count and spacing
 * @returns frequencies, cycles per time unit, increasing
 * @throws {RangeError} when the range is empty or not positive, or count is not an integer ≥ 1
 * @example
 * ```ts
 * import { periodGrid } from "./period_grid.ts";
 * import assert from "node:assert/strict";
 * const f = periodGrid({ minPeriod: 2, maxPeriod: 10, count: 5 });
 * assert.equal(f[0], 0.1);
 * assert.equal(f[4], 0.5);
 * ```
 */
export function periodGrid(options: PeriodGridOptions): Float64Array {
  const { minPeriod: lo, maxPeriod: hi, count } = options;
  if (!(Number.isFinite(lo) && lo > 0 && Number.isFinite(hi) && hi > lo)) {
    throw new RangeError(
      `Cannot build period grid: need 0 < minPeriod < maxPeriod, got minPeriod ${lo}, maxPeriod ${hi}`,
    );
  }
  if (!Number.isInteger(count) || count < 1) {
    throw new RangeError(
      `Cannot build period grid: count must be an integer >= 1, current value is ${count}`,
    );
  }
  const f = new Float64Array(count);
  if (count === 1) {
    f[0] = 2 / (lo + hi);
    return f;
  }
  if ((options.spacing ?? "frequency") === "frequency") {
    const f0 = 1 / hi, f1 = 1 / lo;
    for (let k = 0; k < count; k++) f[k] = f0 + ((f1 - f0) * k) / (count - 1);
    f[count - 1] = f1;
  } else {
    for (let k = 0; k < count; k++) f[k] = 1 / (hi - ((hi - lo) * k) / (count - 1));
  }
  return f;
}

/**
 * Default grid count for a Lomb–Scargle periodogram: an oversampling factor n0 over the
 * natural resolution 1/T, i.e. count = ceil(n0 · T · (f_max − f_min)) + 1 (VanderPlas 2018,
 * ApJS 236, 16, §7.1, which recommends n0 = 5 to 10).
 *
 * @param span time span T of the data, time units
 * @param minPeriod shortest period
 * @param maxPeriod longest period
 * @param oversampling n0, default 5
 * @returns grid count, at least 2
 * @example
 * ```ts
 * import { defaultGridCount } from "./period_grid.ts";
 * import assert from "node:assert/strict";
 * assert.equal(defaultGridCount(100, 2, 100), 246);
 * ```
 */
export function defaultGridCount(
  span: number,
  minPeriod: number,
  maxPeriod: number,
  oversampling = 5,
): number {
  return Math.max(2, Math.ceil(oversampling * span * (1 / minPeriod - 1 / maxPeriod)) + 1);
}
