/**
 * The gap-free-run rule of the solar–climate analyses: lagged correlations, regressions with
 * lagged regressors and AR(1) error models need consecutive, evenly spaced samples, so on an
 * aligned axis with gaps an analysis keeps the longest stretch of consecutive periods where
 * every series has a value, and never fills a gap (common practice).
 *
 * @module
 */
import { InputError } from "../errors.ts";

/** A stretch `[start, start + length)` of sample indices. */
export interface IndexRun {
  start: number;
  length: number;
}

/**
 * The longest run of consecutive indices where every series is finite (NaN marks a gap); the
 * earliest one when several are equally long. Cost O(n · series).
 *
 * @param values series of one length on one axis, NaN where a value is missing
 * @returns the run (length 0, start 0 when no index is complete)
 * @throws {InputError} when no series is given (field `values`, reason `empty`) or the series
 *   differ in length (`values`, `length_mismatch`, index of the first that differs)
 * @example
 * ```ts
 * import { longestCompleteRun } from "./longest_complete_run.ts";
 * import assert from "node:assert/strict";
 * const a = [1, 2, NaN, 4, 5, 6, 7];
 * const b = [1, 2, 3, 4, NaN, 6, 7];
 * assert.deepEqual(longestCompleteRun([a, b]), { start: 0, length: 2 });
 * assert.deepEqual(longestCompleteRun([a]), { start: 3, length: 4 });
 * ```
 */
export function longestCompleteRun(values: readonly ArrayLike<number>[]): IndexRun {
  if (values.length === 0) {
    throw new InputError("Cannot find a complete run: needs at least one series", {
      field: "values",
      reason: "empty",
    });
  }
  const n = values[0].length;
  const k = values.findIndex((v) => v.length !== n);
  if (k >= 0) {
    throw new InputError(
      `Cannot find a complete run: series ${k} has ${values[k].length} values, series 0 has ${n}`,
      { field: "values", reason: "length_mismatch", index: k },
    );
  }
  let bestStart = 0, bestLen = 0, runStart = 0;
  for (let i = 0; i <= n; i++) {
    const ok = i < n && values.every((v) => Number.isFinite(v[i]));
    if (!ok) {
      if (i - runStart > bestLen) {
        bestLen = i - runStart;
        bestStart = runStart;
      }
      runStart = i + 1;
    }
  }
  return { start: bestStart, length: bestLen };
}
