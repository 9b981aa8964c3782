/**
 * Solar-cycle amplitude of an irradiance series, for plausibility checks.
 *
 * @module
 */
import { median } from "d3-array";
import { periodMeansByKey } from "../series/period_means.ts";

/** Result of {@link tsiCycleAmplitude}. */
export interface TsiCycleAmplitude {
  /** Median maximum-minus-preceding-minimum of annual means, W m-2 (null if no cycle found). */
  median: number | null;
  /** Each cycle: years of the minimum and maximum (annual means) and the amplitude. */
  cycles: { minimumYear: number; maximumYear: number; amplitude: number }[];
}

/**
 * Peak-to-trough cycle amplitude from annual means: a year is a maximum (minimum) when its
 * annual mean is the largest (smallest) within ±`halfWindow` years; each maximum is paired with
 * the latest minimum before it (common practice for cycle extrema of smoothed series; annual
 * means are close to the 13-month smoothing at the extrema). Annual means are those of
 * core/series (every year with at least one value); the median is d3-array's.
 *
 * @param time decimal years
 * @param value TSI, W m-2 (NaN skipped)
 * @param halfWindow years either side for an extremum @default 3
 * @returns {@link TsiCycleAmplitude}
 * @example
 * ```ts
 * import { tsiCycleAmplitude } from "./cycle_amplitude.ts";
 * import assert from "node:assert/strict";
 * const t: number[] = [], v: number[] = [];
 * for (let y = 1950; y < 2000; y++) t.push(y + 0.5), v.push(1361 + 0.5 * Math.sin(2 * Math.PI * y / 11));
 * const a = tsiCycleAmplitude(t, v);
 * assert.ok(a.median! > 0.9 && a.median! <= 1.0);
 * ```
 */
export function tsiCycleAmplitude(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  halfWindow = 3,
): TsiCycleAmplitude {
  const annual = periodMeansByKey({ time, value }, "annual");
  const years = annual.keys, v = annual.mean;
  const n = years.length;
  const isExt = (i: number, sign: number) => {
    for (let j = Math.max(0, i - halfWindow); j <= Math.min(n - 1, i + halfWindow); j++) {
      if (j !== i && sign * (v[j] - v[i]) >= 0) return false;
      if (Math.abs(years[j] - years[i]) > halfWindow) return false; // gap in years
    }
    return i >= halfWindow && i < n - halfWindow;
  };
  const cycles: TsiCycleAmplitude["cycles"] = [];
  let lastMin = -1;
  for (let i = 0; i < n; i++) {
    if (isExt(i, -1)) lastMin = i;
    else if (isExt(i, 1) && lastMin >= 0) {
      cycles.push({
        minimumYear: years[lastMin],
        maximumYear: years[i],
        amplitude: v[i] - v[lastMin],
      });
      lastMin = -1;
    }
  }
  return { median: median(cycles, (c) => c.amplitude) ?? null, cycles };
}
