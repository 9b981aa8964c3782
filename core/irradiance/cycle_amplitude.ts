/**
 * Solar-cycle amplitude of an irradiance series, for plausibility checks, and the per-cycle
 * comparison of a reconstruction with what the sunspot amplitude of each cycle implies.
 *
 * @module
 */
import { median } from "d3-array";
import { resampleMeans } from "../series/resample_means.ts";
import { periodKey } from "../series/period_key.ts";
import { inferResolution } from "../time/mod.ts";
import { InputError } from "../errors.ts";

/** Result of {@link tsiCycleAmplitude}. */
export interface TsiCycleAmplitude {
  /** Median maximum-minus-preceding-minimum of annual means, W m-2 (null if no cycle found). */
  median: number | null;
  /** Each cycle: years of the minimum and maximum (annual means) and the amplitude. */
  cycles: { minimumYear: number; maximumYear: number; amplitude: number }[];
}

/**
 * Annual means of a series by year, with the coverage rule of core/series (a year needs 10
 * covered months; a month from daily values 20 days): the values that are present (NaN
 * skipped), on the resolution their times show.
 *
 * @param time decimal years, increasing
 * @param value values, NaN for missing
 * @returns covered years and their means; empty with fewer than 2 values
 */
function annualMeans(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
): { years: number[]; mean: number[] } {
  const t: number[] = [], v: number[] = [];
  for (let i = 0; i < time.length; i++) {
    if (Number.isFinite(value[i])) t.push(time[i]), v.push(value[i]);
  }
  if (t.length < 2) return { years: [], mean: [] };
  const m = resampleMeans({ time: t, value: v }, "annual", { from: inferResolution(t) });
  const years: number[] = [], mean: number[] = [];
  const y0 = periodKey(m.time[0], "annual");
  m.value.forEach((x, j) => {
    if (m.covered[j]) years.push(y0 + j), mean.push(x);
  });
  return { years, mean };
}

/**
 * Peak-to-trough cycle amplitude from annual means: a year is a maximum (minimum) when its
 * annual mean is the largest (smallest) within ±`halfWindow` years; each maximum is paired with
 * the latest minimum before it (common practice for cycle extrema of smoothed series; annual
 * means are close to the 13-month smoothing at the extrema). Annual means follow the coverage
 * rule of core/series (resample_means.ts: a year needs 10 covered months, so a partial year at
 * an end is a gap, not an extremum); the median is d3-array's.
 *
 * @param time decimal years, increasing (a regular daily, monthly or annual axis)
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
  const { years, mean: v } = annualMeans(time, value);
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

/** Options of {@link cycleAmplitudesAgainstReference}. */
export interface CycleAmplitudeCheckOptions {
  /** Relative difference |A/E − 1| beyond which a cycle is inconsistent. @default 0.1 */
  tolerance?: number;
  /** Absolute difference |A − E| (W m-2) below which a cycle is never inconsistent. @default 0.05 */
  floor?: number;
  /** Years either side for an extremum, as {@link tsiCycleAmplitude}. @default 3 */
  halfWindow?: number;
  /**
   * The series' cycles when the caller already has them: `tsiCycleAmplitude(time, value,
   * halfWindow)` of the same arrays (not checked), so they are not found twice.
   * @default computed here
   */
  amplitude?: TsiCycleAmplitude;
}

/** One cycle of {@link cycleAmplitudesAgainstReference}. */
export interface CycleAmplitudeCheck {
  minimumYear: number;
  maximumYear: number;
  /** The series' maximum-minus-preceding-minimum of annual means, W m-2. */
  amplitude: number;
  /** The reference's annual mean at the same maximum year minus that at the minimum year. */
  expected: number | null;
  /** amplitude / expected; null when the reference lacks a year or expected ≤ 0. */
  ratio: number | null;
  /**
   * |amplitude − expected| ≤ floor or |ratio − 1| ≤ tolerance; true when the reference lacks a
   * year (not comparable).
   */
  consistent: boolean;
}

/**
 * Compare each solar cycle of a TSI series with a reference for the same cells: the cycles
 * (minimum and maximum years) are found in `value` by {@link tsiCycleAmplitude}; the expected
 * amplitude is the reference's annual mean in the maximum year minus that in the minimum year
 * (the same annual means, same coverage rule). A cycle is inconsistent when its amplitude
 * differs from the expected one by more than `tolerance` (relative) and more than `floor`
 * (absolute). The reference is what the cycle's sunspot amplitude implies: in the
 * reconstruction analysis, the model's own sunspot mappings applied to the sunspot series put
 * on the model's version by the published conversion (so a wrong version factor, or proxies
 * that disagree with the sunspot record, show up cycle by cycle, and a weak-cycle era is
 * judged against its own weak sunspot cycles).
 *
 * Defaults (stated, common practice here): 10 %, below the 14–18 % steps of the version 2
 * recalibration of the sunspot number (Clette & Lefèvre 2016), and 0.05 W m-2, about 5 % of a
 * typical cycle (Kopp 2016), so nearly flat cycles are not flagged for rounding-size
 * differences.
 *
 * @param time decimal years of the cells
 * @param value TSI per cell, W m-2 (NaN skipped)
 * @param reference the yardstick TSI per cell, W m-2 (NaN skipped)
 * @param options tolerance, floor, half window
 * @returns one entry per cycle found in `value`
 * @throws {InputError} when the arrays differ in length (`reference`) or a threshold is
 *   negative (`tolerance`, `floor`)
 * @example
 * ```ts
 * import { cycleAmplitudesAgainstReference } from "./cycle_amplitude.ts";
 * import assert from "node:assert/strict";
 * const t: number[] = [], ref: number[] = [], v: number[] = [];
 * for (let y = 1900; y < 2000; y++) {
 *   const c = 0.5 * Math.sin((2 * Math.PI * y) / 11);
 *   t.push(y + 0.5), ref.push(1361 + c), v.push(1361 + (y >= 1947 ? 1.18 : 1) * c);
 * }
 * const cycles = cycleAmplitudesAgainstReference(t, v, ref);
 * assert.ok(cycles.filter((c) => c.maximumYear < 1947).every((c) => c.consistent));
 * assert.ok(cycles.filter((c) => c.minimumYear >= 1947).every((c) => !c.consistent));
 * ```
 */
export function cycleAmplitudesAgainstReference(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  reference: ArrayLike<number>,
  options: CycleAmplitudeCheckOptions = {},
): CycleAmplitudeCheck[] {
  const tolerance = options.tolerance ?? 0.1, floor = options.floor ?? 0.05;
  if (reference.length !== time.length || value.length !== time.length) {
    throw new InputError(
      `Cannot compare cycle amplitudes: time, value and reference have ${time.length}, ` +
        `${value.length} and ${reference.length} entries`,
      { field: "reference", reason: "length_mismatch", value: reference.length },
    );
  }
  for (const [name, x] of [["tolerance", tolerance], ["floor", floor]] as const) {
    if (!(x >= 0) || !Number.isFinite(x)) {
      throw new InputError(`Cannot compare cycle amplitudes: ${name} must be ≥ 0, got ${x}`, {
        field: name,
        reason: "out_of_range",
        value: x,
      });
    }
  }
  const ref = annualMeans(time, reference);
  const at = new Map(ref.years.map((y, i) => [y, ref.mean[i]]));
  const own = options.amplitude ?? tsiCycleAmplitude(time, value, options.halfWindow);
  return own.cycles.map((c) => {
    const hi = at.get(c.maximumYear), lo = at.get(c.minimumYear);
    const expected = hi === undefined || lo === undefined ? null : hi - lo;
    const ratio = expected === null || expected <= 0 ? null : c.amplitude / expected;
    const consistent = expected === null ||
      Math.abs(c.amplitude - expected) <= floor ||
      (ratio !== null && Math.abs(ratio - 1) <= tolerance);
    return { ...c, expected, ratio, consistent };
  });
}
