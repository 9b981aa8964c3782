/**
 * Forecast of a solar cycle in progress from the months observed so far: a fit of the
 * Hathaway, Wilson & Reichmann (1994) shape function with a residual-bootstrap band.
 *
 * @module
 */
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";
import { InputError } from "../errors.ts";
import { quantileSorted } from "d3-array";
import { randomStream } from "../random/random_stream.ts";
import { smoothed13Month } from "./smoothed_13_month.ts";
import {
  fitHathawayCycle,
  hathawayCurve,
  type HathawayFit,
  type HathawayFitOptions,
} from "./cycle_shape_fit.ts";

/** Options of {@link forecastCycle}. */
export interface CycleForecastOptions
  extends Pick<HathawayFitOptions, "amplitudeScale">, StopOptions {
  /** Seed of the bootstrap streams (replicate r uses randomStream(seed, r)). */
  seed: number;
  /** Decimal years at which to give the forecast curve and band. */
  curveTime: ArrayLike<number>;
  /** Bootstrap replicates, integer ≥ 20. @default 200 */
  replicates?: number;
  /**
   * Block length of the moving-block residual bootstrap, in points (months), integer ≥ 1;
   * 1 gives the ordinary residual bootstrap. @default 6
   */
  blockLength?: number;
  /** Central probability of the band. @default 0.9 */
  level?: number;
  /**
   * Width model of the shape fit. @default "amplitude_dependent" (two parameters: the form
   * Hathaway et al. 1994 recommend early in a cycle)
   */
  width?: HathawayFitOptions["width"];
  /**
   * The fitted previous cycle, whose declining tail overlaps the start of this one: its curve
   * is subtracted from the observed values before the fit and added back to the forecast
   * curve (the sunspot number as a sum of overlapping cycles, Hathaway et al. 1994).
   * @default none
   */
  previousCycle?: Pick<HathawayFit, "t0" | "a" | "b" | "c">;
  /**
   * Resample standardised residuals with a scale growing linearly with the fitted level
   * (sunspot-number errors grow with activity); false resamples raw residuals.
   * @default true
   */
  heteroscedastic?: boolean;
}

/** A forecast of one cycle. Times in decimal years, values in input units. */
export interface CycleForecast {
  /** The fit to the observed months. */
  fit: HathawayFit;
  level: number;
  /** Predicted maximum of this cycle's own curve with its bootstrap percentile intervals. */
  maximum: {
    time: number;
    value: number;
    timeInterval: [number, number];
    valueInterval: [number, number];
    /**
     * Predictive intervals of the maximum of the 13-month smoothed observations (date and
     * value): each replicate continues the observed months with its curve plus resampled
     * noise and smooths the path. Null unless `curveTime` is the monthly grid continuing the
     * observed months.
     */
    smoothed: { timeInterval: [number, number]; valueInterval: [number, number] } | null;
  };
  /** Forecast at `curveTime` (this cycle plus the previous cycle's tail) with its band. */
  curve: { time: Float64Array; value: Float64Array; lower: Float64Array; upper: Float64Array };
  /** Replicates run, and how many of them failed to fit (left out of the band). */
  replicates: number;
  failedReplicates: number;
}

/**
 * Forecast a cycle from its observed months.
 *
 * Method: fit the shape function to the observed values ({@link fitHathawayCycle}); then a
 * moving-block bootstrap of the residuals (Künsch 1989, Ann. Statist. 17, 1217; blocks keep
 * the residuals' month-to-month correlation): y* = ŷ + e*, refit from the point estimate,
 * record the maximum and the curve. The band is the bootstrap percentile interval (Efron &
 * Tibshirani 1993, ch. 13; R-7 quantiles via d3-array). It describes the uncertainty of the
 * fitted cycle curve (the smoothed cycle), not of individual monthly values, and it assumes
 * the shape function is right: the hindcast ({@link hindcastCycles}) measures how far that
 * holds on past cycles.
 *
 * Predictive intervals for what will be observed: when `curveTime` continues the observed
 * months on the monthly grid, each replicate also continues the observed values with its own
 * curve plus block-resampled, rescaled residuals, smooths the whole path with the 13-month
 * smoothing and records the date and height of its maximum (a bootstrap prediction interval:
 * Davison & Hinkley 1997, "Bootstrap Methods and their Application", §6.3.3). Those intervals
 * include the noise of the future months and are the ones to compare with an observed
 * smoothed maximum.
 *
 * Randomness: replicate r draws only from randomStream(seed, r), so the band is the same
 * whatever the order or split of the work.
 *
 * @param time decimal years of the observed months of the cycle (from its starting minimum)
 * @param value observed values, finite
 * @param options seed, curve times, replicates, block length, level, width model, and
 *   `shouldStop` (polled before each replicate)
 * @returns the forecast
 * @throws {InputError} for fewer than 12 points (field `time`), bad options (`replicates` < 20,
 *   `blockLength` not in [1, n], `level` outside (0, 1)), or as {@link fitHathawayCycle}
 * @throws {StoppedError} when `options.shouldStop` answers true
 * @example
 * ```ts
 * import { forecastCycle } from "./cycle_forecast.ts";
 * import { hathawayShape } from "./hathaway_shape.ts";
 * import { randomStream } from "../random/random_stream.ts";
 * import assert from "node:assert/strict";
 * const rng = randomStream(1);
 * const t = Array.from({ length: 36 }, (_, i) => 2000 + i / 12);
 * const v = t.map((x) => hathawayShape((x - 2000) * 12 + 2, { t0: 0, a: 0.002 }) + 5 * rng.normal());
 * const fc = forecastCycle(t, v, { seed: 7, curveTime: [2004, 2005], replicates: 40 });
 * assert.ok(fc.maximum.valueInterval[0] <= fc.maximum.value);
 * assert.ok(fc.maximum.value <= fc.maximum.valueInterval[1]);
 * ```
 */
export function forecastCycle(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  options: CycleForecastOptions,
): CycleForecast {
  const fn = "forecast cycle";
  const n = time.length;
  const B = options.replicates ?? 200;
  const L = options.blockLength ?? 6;
  const level = options.level ?? 0.9;
  if (n < 12) {
    throw new InputError(`Cannot ${fn}: needs at least 12 observed months, got ${n}`, {
      field: "time",
      reason: "too_few_points",
      value: n,
    });
  }
  if (!Number.isInteger(B) || B < 20) {
    throw new InputError(
      `Cannot ${fn}: replicates must be an integer >= 20, current value is ${B}`,
      { field: "replicates", reason: "out_of_range", value: B },
    );
  }
  if (!Number.isInteger(L) || L < 1 || L > n) {
    throw new InputError(
      `Cannot ${fn}: blockLength must be an integer in [1, ${n}], current value is ${L}`,
      { field: "blockLength", reason: "out_of_range", value: L },
    );
  }
  if (!(level > 0 && level < 1)) {
    throw new InputError(`Cannot ${fn}: level must be in (0, 1), current value is ${level}`, {
      field: "level",
      reason: "out_of_range",
      value: level,
    });
  }
  const width = options.width ?? "amplitude_dependent";
  const fitOpts = { width, amplitudeScale: options.amplitudeScale };
  const prev = options.previousCycle;
  const own = Float64Array.from(value);
  if (prev) {
    const tail = hathawayCurve(prev, time);
    for (let i = 0; i < n; i++) own[i] -= tail[i];
  }
  const fit = fitHathawayCycle(time, own, fitOpts);
  // heteroscedastic residuals: scale s_i = α + β·ŷ_i from a least-squares line of |e_i| on ŷ_i
  // (the variance-function estimate of Carroll & Ruppert 1988, "Transformation and Weighting
  // in Regression", §3.3); standardised residuals are resampled and rescaled to the target
  const resid = new Float64Array(n), scaleOf = new Float64Array(n);
  let scaleOfLevel = (_: number) => 1;
  {
    let sx = 0, sy = 0, sxx = 0, sxy = 0;
    for (let i = 0; i < n; i++) {
      const e = Math.abs(own[i] - fit.fitted[i]), f = fit.fitted[i];
      sx += f;
      sy += e;
      sxx += f * f;
      sxy += f * e;
    }
    const vx = sxx - (sx * sx) / n;
    let beta = vx > 0 ? (sxy - (sx * sy) / n) / vx : 0;
    if (!(beta > 0)) beta = 0;
    const alpha = (sy - beta * sx) / n;
    // floor: a tenth of the mean absolute residual keeps the scale positive
    const floor = Math.max(1e-12, 0.1 * (sy / n));
    if (options.heteroscedastic !== false) {
      scaleOfLevel = (level: number) => Math.max(floor, alpha + beta * level);
    }
    for (let i = 0; i < n; i++) {
      scaleOf[i] = scaleOfLevel(fit.fitted[i]);
      resid[i] = (own[i] - fit.fitted[i]) / scaleOf[i];
    }
  }
  const ct = Float64Array.from(options.curveTime);
  const ctTail = prev ? hathawayCurve(prev, ct) : new Float64Array(ct.length);
  const K = ct.length;
  // the observed 13-month smoothed maximum can be simulated when the curve is the monthly grid
  // continuing the observed months (its first n times are the observed ones)
  let predictive = K > n + 6;
  for (let i = 0; predictive && i < n; i++) {
    if (Math.abs(ct[i] - time[i]) > 1e-9) predictive = false;
  }
  for (let k = 1; predictive && k < K; k++) {
    const d = ct[k] - ct[k - 1];
    if (!(d > 0.07 && d < 0.1)) predictive = false;
  }
  const pT: number[] = [], pV: number[] = [];
  const path = new Float64Array(predictive ? K : 0);
  const curves: Float64Array[] = [];
  const tMax: number[] = [], vMax: number[] = [];
  const ystar = new Float64Array(n);
  let failed = 0;
  for (let r = 0; r < B; r++) {
    throwIfStopped(options, fn);
    const rng = randomStream(options.seed, r);
    for (let i = 0; i < n;) {
      const s = rng.int(0, n - L);
      for (let j = 0; j < L && i < n; j++, i++) {
        ystar[i] = fit.fitted[i] + scaleOf[i] * resid[s + j];
      }
    }
    try {
      const f = fitHathawayCycle(time, ystar, {
        ...fitOpts,
        start: { t0: fit.t0, a: fit.a, b: fit.b },
        // from the point estimate Levenberg-Marquardt settles in a few steps: 12 iterations
        // reproduce 200-iteration maxima to about 1e-8 relative
        maxIterations: 12,
      });
      tMax.push(f.maximum.time);
      vMax.push(f.maximum.value);
      const cv = hathawayCurve(f, ct);
      if (predictive) {
        // observed months as they were, then the replicate's curve plus resampled noise
        for (let i = 0; i < n; i++) path[i] = value[i];
        for (let k = n; k < K;) {
          const s0 = rng.int(0, n - L);
          for (let j = 0; j < L && k < K; j++, k++) {
            path[k] = cv[k] + ctTail[k] + scaleOfLevel(cv[k]) * resid[s0 + j];
          }
        }
        const sm = smoothed13Month(path);
        let best = -1;
        for (let k = 0; k < K; k++) if (sm[k] === sm[k] && (best < 0 || sm[k] > sm[best])) best = k;
        if (best >= 0) {
          pT.push(ct[best]);
          pV.push(sm[best]);
        }
      }
      for (let k = 0; k < cv.length; k++) cv[k] += ctTail[k];
      curves.push(cv);
    } catch {
      failed++;
    }
  }
  const lo = (1 - level) / 2, hi = 1 - lo;
  const q = (xs: number[], p: number) => quantileSorted(xs, p) as number;
  tMax.sort((a, b) => a - b);
  vMax.sort((a, b) => a - b);
  const value0 = hathawayCurve(fit, ct);
  for (let k = 0; k < K; k++) value0[k] += ctTail[k];
  const lower = new Float64Array(K), upper = new Float64Array(K);
  const col: number[] = new Array(curves.length);
  for (let k = 0; k < K; k++) {
    for (let r = 0; r < curves.length; r++) col[r] = curves[r][k];
    col.sort((a, b) => a - b);
    lower[k] = curves.length ? q(col, lo) : NaN;
    upper[k] = curves.length ? q(col, hi) : NaN;
  }
  return {
    fit,
    level,
    maximum: {
      time: fit.maximum.time,
      value: fit.maximum.value,
      timeInterval: tMax.length ? [q(tMax, lo), q(tMax, hi)] : [NaN, NaN],
      valueInterval: vMax.length ? [q(vMax, lo), q(vMax, hi)] : [NaN, NaN],
      smoothed: pT.length
        ? {
          timeInterval: [q(pT.sort((a, b) => a - b), lo), q(pT, hi)],
          valueInterval: [q(pV.sort((a, b) => a - b), lo), q(pV, hi)],
        }
        : null,
    },
    curve: { time: ct, value: value0, lower, upper },
    replicates: B,
    failedReplicates: failed,
  };
}
