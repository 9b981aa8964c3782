/**
 * Solar-cycle variability of many irradiance series (spectral bands) between the cycle
 * extrema of one reference series, so every band is measured between the same years.
 *
 * @module
 */
import { mean } from "d3-array";
import { InputError } from "../errors.ts";
import { resampledAtPeriodKeys } from "../series/resample_means.ts";
import { inferResolution } from "../time/resolution.ts";
import { tsiCycleAmplitude } from "./cycle_amplitude.ts";

/** One band's change over the cycles (part of {@link BandCycleVariability}). */
export interface BandCycleChange {
  /** Mean over the cycles of (annual mean at the maximum − at the preceding minimum). */
  amplitude: number | null;
  /** Smallest and largest change of a single cycle. */
  min: number | null;
  max: number | null;
  /** Mean of the annual means at the cycles' minima and maxima (the level the change is of). */
  level: number | null;
  /** amplitude / level: relative cycle variability (negative: in anti-phase with the cycle). */
  relative: number | null;
}

/** Result of {@link bandCycleVariability}. */
export interface BandCycleVariability {
  /** The reference's cycles: years (annual-mean keys) of each minimum and following maximum. */
  cycles: { minimumYear: number; maximumYear: number }[];
  /** Per series, in input order. */
  bands: BandCycleChange[];
}

/**
 * Cycle changes of several series between the extrema of a reference: the reference's
 * cycles are found from its annual means as {@link tsiCycleAmplitude} finds them (a year is
 * a maximum or minimum within ±`halfWindow` years; each maximum pairs with the latest minimum
 * before it), and each series' change per cycle is its annual mean in the maximum year minus
 * that in the minimum year. A series that falls while the reference rises (a band dominated
 * by sunspot darkening) has a negative change. Annual means follow the coverage rule of
 * core/series (a year needs 10 covered months), as the reference's do.
 *
 * @param time decimal years, shared by the reference and the series
 * @param series the series (e.g. one per band), NaN for missing
 * @param reference the series whose cycles define the years (e.g. the integral over bands)
 * @param halfWindow years either side for an extremum @default 3
 * @returns {@link BandCycleVariability}; a series without a value at some cycle's years
 *   skips that cycle, and has nulls when it has none
 * @throws {InputError} (field `series`, reason `length_mismatch`, with the index) when a
 *   series is not aligned with `time`
 * @example
 * ```ts
 * import { bandCycleVariability } from "./band_cycle_variability.ts";
 * import assert from "node:assert/strict";
 * const t: number[] = [], ref: number[] = [], uv: number[] = [], ir: number[] = [];
 * for (let y = 1950; y < 2000; y++) {
 *   const s = Math.sin((2 * Math.PI * y) / 11);
 *   t.push(y + 0.5), ref.push(1361 + 0.5 * s), uv.push(10 + 0.3 * s), ir.push(100 - 0.05 * s);
 * }
 * const v = bandCycleVariability(t, [uv, ir], ref);
 * assert.ok(v.cycles.length >= 3);
 * assert.ok(v.bands[0].relative! > 0.05 && v.bands[0].relative! <= 0.06);
 * assert.ok(v.bands[1].relative! < 0); // anti-phase
 * ```
 */
export function bandCycleVariability(
  time: ArrayLike<number>,
  series: readonly ArrayLike<number>[],
  reference: ArrayLike<number>,
  halfWindow = 3,
): BandCycleVariability {
  series.forEach((s, i) => {
    if (s.length !== time.length) {
      throw new InputError(
        `Cannot measure cycle variability: series ${i} has ${s.length} values for ${time.length} times`,
        { field: "series", reason: "length_mismatch", index: i, value: s.length },
      );
    }
  });
  const cycles = tsiCycleAmplitude(time, reference, halfWindow).cycles.map((c) => ({
    minimumYear: c.minimumYear,
    maximumYear: c.maximumYear,
  }));
  const keys = cycles.flatMap((c) => [c.minimumYear, c.maximumYear]);
  const from = time.length >= 2 ? inferResolution(time) : "irregular";
  const bands = series.map((s): BandCycleChange => {
    const at = resampledAtPeriodKeys({ time, value: s }, from, "annual", keys);
    const changes: number[] = [], levels: number[] = [];
    for (let c = 0; c < cycles.length; c++) {
      const lo = at[2 * c], hi = at[2 * c + 1];
      if (!Number.isFinite(lo) || !Number.isFinite(hi)) continue;
      changes.push(hi - lo);
      levels.push(lo, hi);
    }
    if (changes.length === 0) {
      return { amplitude: null, min: null, max: null, level: null, relative: null };
    }
    const amplitude = mean(changes)!, level = mean(levels)!;
    return {
      amplitude,
      min: Math.min(...changes),
      max: Math.max(...changes),
      level,
      relative: level !== 0 ? amplitude / level : null,
    };
  });
  return { cycles, bands };
}
