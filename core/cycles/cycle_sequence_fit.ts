/**
 * Fits of the shape function to a sequence of consecutive cycles, allowing for their overlap.
 *
 * @module
 */
import { InputError } from "../errors.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";
import { fitHathawayCycle, type HathawayFit, type HathawayFitOptions } from "./cycle_shape_fit.ts";
import { hathawayCurve } from "./cycle_shape_fit.ts";

/** One cycle's window: index range [start, end) into the series arrays. */
export interface CycleWindow {
  start: number;
  end: number;
}

/** Options of {@link fitCycleSequence}. */
export interface CycleSequenceOptions extends Omit<HathawayFitOptions, "start">, StopOptions {
  /**
   * Backfitting passes after the first, independent, fits; 0 fits every cycle on its own.
   * @default 2
   */
  passes?: number;
}

/**
 * Fit the Hathaway et al. (1994) shape function to each of a sequence of cycles.
 *
 * The first pass fits every cycle to its own window independently ({@link fitHathawayCycle}).
 * Because consecutive cycles overlap (the next one starts before the smoothed minimum, the
 * previous one's tail runs past it), each further pass refits cycle k to its window's values
 * minus the current curves of its two neighbours: backfitting of an additive model (Hastie &
 * Tibshirani 1990, "Generalized Additive Models", §4.3), starting from the previous pass.
 *
 * Missing (NaN) values are left out of each window's fit.
 *
 * @param time decimal years of the series
 * @param value values (NaN = missing)
 * @param windows consecutive cycle windows in time order
 * @param options width model, amplitude scale, passes, and `shouldStop` (polled before each
 *   fit)
 * @returns one fit per window (its `fitted` values refer to the window's non-missing points);
 *   `independent` holds the first-pass fits, which use no data outside their window
 * @throws {InputError} as {@link fitHathawayCycle}, or for a window out of range
 * @throws {StoppedError} when `options.shouldStop` answers true
 * @example
 * ```ts
 * import { fitCycleSequence } from "./cycle_sequence_fit.ts";
 * import { hathawayShape } from "./hathaway_shape.ts";
 * import assert from "node:assert/strict";
 * const t = Array.from({ length: 264 }, (_, i) => 1900 + i / 12);
 * const v = t.map((x) =>
 *   hathawayShape((x - 1900) * 12, { t0: -6, a: 0.002 }) +
 *   hathawayShape((x - 1900) * 12, { t0: 126, a: 0.0015 })
 * );
 * const { fits } = fitCycleSequence(t, v, [{ start: 0, end: 130 }, { start: 130, end: 264 }], {
 *   width: "amplitude_dependent",
 * });
 * assert.ok(Math.abs(fits[1].a - 0.0015) < 2e-5);
 * ```
 */
export function fitCycleSequence(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  windows: readonly CycleWindow[],
  options: CycleSequenceOptions = {},
): { fits: HathawayFit[]; independent: HathawayFit[] } {
  const passes = options.passes ?? 2;
  if (!Number.isInteger(passes) || passes < 0) {
    throw new InputError(
      `Cannot fit cycle sequence: passes must be an integer >= 0, current value is ${passes}`,
      { field: "passes", reason: "out_of_range", value: passes },
    );
  }
  const pts = windows.map((w) => {
    if (
      !(Number.isInteger(w.start) && Number.isInteger(w.end) && w.start >= 0 &&
        w.end <= time.length && w.end > w.start)
    ) {
      throw new InputError(
        `Cannot fit cycle sequence: window [${w.start}, ${w.end}) is outside the series`,
        { field: "windows", reason: "out_of_range", value: [w.start, w.end] },
      );
    }
    const t: number[] = [], v: number[] = [];
    for (let i = w.start; i < w.end; i++) {
      if (Number.isFinite(value[i])) {
        t.push(time[i]);
        v.push(value[i]);
      }
    }
    return { t, v };
  });
  const base = { width: options.width, amplitudeScale: options.amplitudeScale };
  const fn = "fit cycle sequence";
  const independent = pts.map((p) => {
    throwIfStopped(options, fn);
    return fitHathawayCycle(p.t, p.v, { ...base, maxIterations: options.maxIterations });
  });
  let fits = independent.slice();
  for (let pass = 0; pass < passes; pass++) {
    fits = pts.map((p, k) => {
      throwIfStopped(options, fn);
      const y = p.v.slice();
      for (const j of [k - 1, k + 1]) {
        if (j < 0 || j >= fits.length) continue;
        const c = hathawayCurve(fits[j], p.t);
        for (let i = 0; i < y.length; i++) y[i] -= c[i];
      }
      return fitHathawayCycle(p.t, y, { ...base, start: fits[k], maxIterations: 20 });
    });
  }
  return { fits, independent };
}

/**
 * The sum of the fitted curves of a sequence of cycles at decimal-year times: the additive
 * model of {@link fitCycleSequence} (each curve is 0 before its start t0).
 *
 * @param fits fitted cycles (e.g. `fits` of {@link fitCycleSequence})
 * @param time decimal years
 * @returns the summed curve, input units
 * @example
 * ```ts
 * import { cycleSequenceCurve } from "./cycle_sequence_fit.ts";
 * import { hathawayCurve } from "./cycle_shape_fit.ts";
 * import assert from "node:assert/strict";
 * const a = { t0: 2000, a: 0.002, b: 45, c: 0.71 }, b = { t0: 2011, a: 0.001, b: 50, c: 0.71 };
 * const t = [2005, 2013];
 * const s = cycleSequenceCurve([a, b], t);
 * assert.equal(s[1], hathawayCurve(a, t)[1] + hathawayCurve(b, t)[1]);
 * ```
 */
export function cycleSequenceCurve(
  fits: readonly Parameters<typeof hathawayCurve>[0][],
  time: ArrayLike<number>,
): Float64Array {
  const sum = new Float64Array(time.length);
  for (const f of fits) {
    const c = hathawayCurve(f, time);
    for (let i = 0; i < time.length; i++) sum[i] += c[i];
  }
  return sum;
}
