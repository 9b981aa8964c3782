/**
 * Per-point statistics of an ensemble stored member by member.
 *
 * @module
 */
import { quantileSorted } from "d3-array";
import { InputError } from "../errors.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";

/** Mean, SD and a central interval per point (result of {@link ensembleSummary}). */
export interface EnsembleSummary {
  mean: Float64Array;
  /** Sample SD (divisor count − 1); 0 for one member. */
  sd: Float64Array;
  /** Quantiles (1 − level)/2 and (1 + level)/2 of the members (R's type 7, d3-array). */
  lower: Float64Array;
  upper: Float64Array;
}

/**
 * Mean, SD (two-pass, divisor count − 1) and the central `level` interval of the members at
 * each point, the interval's ends being quantiles by linear interpolation between order
 * statistics (Hyndman & Fan 1996, type 7, R's default; d3-array `quantileSorted`). A point
 * where any member is not finite gets NaN.
 *
 * @param members count × n values, member-major
 * @param count number of members (≥ 1)
 * @param level central interval, in (0, 1) @default 0.95
 * @param options `shouldStop`, polled every 64 points
 * @returns {@link EnsembleSummary}
 * @throws {InputError} (field `members`) when its length is not a multiple of count; (field
 *   `count` or `level`) when out of range
 * @throws {StoppedError} when `shouldStop` answers true
 * @example
 * ```ts
 * import { ensembleSummary } from "./ensemble_summary.ts";
 * import assert from "node:assert/strict";
 * // two points, three members: (1, 10), (2, 20), (3, 30)
 * const s = ensembleSummary(Float64Array.of(1, 10, 2, 20, 3, 30), 3, 0.5);
 * assert.deepEqual([...s.mean], [2, 20]);
 * assert.deepEqual([...s.sd], [1, 10]);
 * assert.deepEqual([...s.lower], [1.5, 15]); // R: quantile(1:3, 0.25) = 1.5
 * ```
 */
export function ensembleSummary(
  members: Float64Array,
  count: number,
  level = 0.95,
  options: StopOptions = {},
): EnsembleSummary {
  if (!Number.isInteger(count) || count < 1) {
    throw new InputError(`Cannot summarise an ensemble: count must be ≥ 1, got ${count}`, {
      field: "count",
      reason: "out_of_range",
      value: count,
    });
  }
  if (members.length % count !== 0) {
    throw new InputError(
      `Cannot summarise an ensemble: ${members.length} values are not ${count} equal members`,
      { field: "members", reason: "length_mismatch", value: members.length },
    );
  }
  if (!(level > 0 && level < 1)) {
    throw new InputError(`Cannot summarise an ensemble: level must be in (0, 1), got ${level}`, {
      field: "level",
      reason: "out_of_range",
      value: level,
    });
  }
  const n = members.length / count;
  const mean = new Float64Array(n), sd = new Float64Array(n);
  const lower = new Float64Array(n), upper = new Float64Array(n);
  // a typed array sorts numerically in place; d3-array reads it by index like an array
  const col = new Float64Array(count);
  const pLo = (1 - level) / 2, pHi = 1 - pLo;
  for (let i = 0; i < n; i++) {
    if ((i & 63) === 0) throwIfStopped(options, "summarise an ensemble");
    let s = 0, ok = true;
    for (let m = 0; m < count; m++) {
      const v = members[m * n + i];
      if (!Number.isFinite(v)) {
        ok = false;
        break;
      }
      col[m] = v;
      s += v;
    }
    if (!ok) {
      mean[i] =
        sd[i] =
        lower[i] =
        upper[i] =
          NaN;
      continue;
    }
    const mu = s / count;
    let q = 0;
    for (let m = 0; m < count; m++) q += (col[m] - mu) ** 2;
    mean[i] = mu;
    sd[i] = count > 1 ? Math.sqrt(q / (count - 1)) : 0;
    col.sort();
    const sorted = col as unknown as number[];
    lower[i] = quantileSorted(sorted, pLo)!;
    upper[i] = quantileSorted(sorted, pHi)!;
  }
  return { mean, sd, lower, upper };
}
