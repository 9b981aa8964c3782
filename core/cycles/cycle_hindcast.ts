/**
 * Hindcast score of the cycle forecast: the same method run on past cycles truncated at the
 * same point of their rise, compared with what those cycles then did.
 *
 * @module
 */
import type { StopOptions } from "../stop_signal.ts";
import { InputError } from "../errors.ts";
import { mixSeed } from "../random/random_stream.ts";
import { type CycleForecastOptions, forecastCycle } from "./cycle_forecast.ts";

/** A past cycle to hindcast: its observed months and its observed (smoothed) maximum. */
export interface HindcastCycle {
  /** Identifier echoed in the result (e.g. the cycle table index). */
  id: number;
  /** Decimal years and values of the whole cycle, from its starting minimum. */
  time: ArrayLike<number>;
  value: ArrayLike<number>;
  /** Starting minimum, decimal year. */
  start: number;
  /** Observed maximum (e.g. of the 13-month smoothed series): decimal year and value. */
  maximum: { time: number; value: number };
  /** Fitted previous cycle (from data before this cycle's start), subtracted as in
   * {@link forecastCycle}. */
  previousCycle?: CycleForecastOptions["previousCycle"];
}

/** One hindcast: cycle truncated after `monthsUsed` months. */
export interface HindcastCase {
  id: number;
  /** Last time used, decimal year, and the number of months fitted. */
  truncatedAt: number;
  monthsUsed: number;
  predicted: {
    time: number;
    value: number;
    timeInterval: [number, number];
    valueInterval: [number, number];
    smoothed: { timeInterval: [number, number]; valueInterval: [number, number] } | null;
  };
  observed: { time: number; value: number };
  /** predicted − observed: years and value units. */
  error: { time: number; value: number };
  /**
   * Whether the observed maximum lies inside the predictive intervals of the smoothed
   * maximum (when the cycle's months continue past the truncation), else inside the band of
   * the curve's maximum.
   */
  covered: { time: boolean; value: boolean };
  /** Whether it lies inside the band of the fitted curve's maximum (parameter uncertainty only). */
  coveredByCurveBand: { time: boolean; value: boolean };
}

/** Error statistics over the hindcast cases. */
export interface HindcastSummary {
  cases: number;
  /** Mean error (bias), mean absolute error and root-mean-square error: years for time. */
  time: { meanError: number; meanAbsoluteError: number; rmse: number; coverage: number };
  /** Same for the maximum's value (input units); coverage = share inside the band. */
  value: { meanError: number; meanAbsoluteError: number; rmse: number; coverage: number };
}

/** Options of {@link hindcastCycles}. */
export interface HindcastOptions extends Omit<CycleForecastOptions, "curveTime" | "previousCycle"> {
  /**
   * Months of each past cycle to use: a number (the same for all, e.g. the months observed of
   * the cycle in progress) or a function of the cycle (e.g. half its rise time).
   */
  monthsUsed: number | ((c: HindcastCycle) => number);
}

/**
 * Run {@link forecastCycle} on each past cycle truncated after `monthsUsed` months and score
 * the predicted maximum against the observed one (common practice for judging cycle
 * predictions: e.g. Hathaway 2010, Living Rev. Sol. Phys. 7, 1, §6, compares predictions made
 * at given times after minimum).
 *
 * Seeds: case k (its position in `cycles`) uses the seed mixSeed(seed, k + 1), so each case's
 * band is reproducible on its own and independent of the others.
 *
 * @param cycles past complete cycles
 * @param options forecast options and truncation rule
 * @returns the cases (cycles with fewer than 12 usable months are skipped) and a summary
 *   (null when no case could be run)
 * @throws {RangeError} for bad forecast options
 * @example
 * ```ts
 * import { hindcastCycles } from "./cycle_hindcast.ts";
 * import { hathawayShape, hathawayRiseMonths } from "./hathaway_shape.ts";
 * import assert from "node:assert/strict";
 * const cycles = [0.0015, 0.0025].map((a, id) => {
 *   const time = Array.from({ length: 120 }, (_, i) => 1900 + 11 * id + i / 12);
 *   const value = time.map((t) => hathawayShape((t - time[0]) * 12, { t0: 0, a }));
 *   const tm = time[0] + hathawayRiseMonths(a) / 12;
 *   return { id, time, value, start: time[0], maximum: { time: tm, value: Math.max(...value) } };
 * });
 * const h = hindcastCycles(cycles, { seed: 1, monthsUsed: 30, replicates: 20 });
 * assert.equal(h.cases.length, 2);
 * assert.ok(h.summary!.value.meanAbsoluteError < 1);
 * ```
 */
export function hindcastCycles(
  cycles: readonly HindcastCycle[],
  options: HindcastOptions,
): { cases: HindcastCase[]; summary: HindcastSummary | null } {
  const cases: HindcastCase[] = [];
  cycles.forEach((c, k) => {
    const m = typeof options.monthsUsed === "number" ? options.monthsUsed : options.monthsUsed(c);
    const one = hindcastCase(c, m, k, options);
    if (one) cases.push(one);
  });
  return { cases, summary: summarizeHindcast(cases) };
}

/**
 * One hindcast case of {@link hindcastCycles}: the forecast of cycle `c` from its first
 * `monthsUsed` months, with the seed mixSeed(seed, caseIndex + 1). Separate so that cases can
 * run in parallel with results identical to the sequential loop.
 *
 * @param c the past cycle
 * @param monthsUsed months to use (rounded down; capped at the cycle's length)
 * @param caseIndex position of the case, which selects its random streams
 * @param options forecast options (`monthsUsed` there is ignored)
 * @returns the case, or null when fewer than 12 months are usable or the shape cannot be
 *   fitted to them
 * @throws {RangeError} for bad forecast options
 * @example
 * ```ts
 * import { hindcastCase } from "./cycle_hindcast.ts";
 * import assert from "node:assert/strict";
 * const c = { id: 1, time: [2000, 2000.1], value: [1, 2], start: 2000, maximum: { time: 2004, value: 100 } };
 * assert.equal(hindcastCase(c, 24, 0, { seed: 1 }), null); // only 2 months
 * ```
 */
export function hindcastCase(
  c: HindcastCycle,
  monthsUsed: number,
  caseIndex: number,
  options: Omit<HindcastOptions, "monthsUsed">,
): HindcastCase | null {
  const months = Math.min(Math.floor(monthsUsed), c.time.length);
  if (!(months >= 12)) return null;
  const t = Array.from({ length: months }, (_, i) => c.time[i]);
  const v = Array.from({ length: months }, (_, i) => c.value[i]);
  // the whole cycle's monthly times: the forecast continues the truncated months over them
  const curveTime = Array.from({ length: c.time.length }, (_, i) => c.time[i]);
  let fc;
  try {
    fc = forecastCycle(t, v, {
      ...options,
      seed: mixSeed(options.seed, caseIndex + 1),
      curveTime,
      blockLength: Math.min(options.blockLength ?? 6, months),
      previousCycle: c.previousCycle,
    });
  } catch (e) {
    // a past cycle whose values the shape cannot be fitted to (e.g. no positive values) is no
    // case; bad options still throw
    if (e instanceof InputError && (e.field === "time" || e.field === "value")) return null;
    throw e;
  }
  const p = fc.maximum;
  return {
    id: c.id,
    truncatedAt: t[months - 1],
    monthsUsed: months,
    predicted: p,
    observed: { ...c.maximum },
    error: { time: p.time - c.maximum.time, value: p.value - c.maximum.value },
    covered: {
      time: inside(c.maximum.time, (p.smoothed ?? p).timeInterval),
      value: inside(c.maximum.value, (p.smoothed ?? p).valueInterval),
    },
    coveredByCurveBand: {
      time: inside(c.maximum.time, p.timeInterval),
      value: inside(c.maximum.value, p.valueInterval),
    },
  };
}

const inside = (x: number, [lo, hi]: [number, number]) => x >= lo && x <= hi;

/**
 * Bias, mean absolute error, RMSE and band coverage of hindcast cases.
 *
 * @param cases from {@link hindcastCycles}
 * @returns the summary, or null for no cases
 * @example
 * ```ts
 * import { summarizeHindcast } from "./cycle_hindcast.ts";
 * import assert from "node:assert/strict";
 * assert.equal(summarizeHindcast([]), null);
 * ```
 */
export function summarizeHindcast(cases: readonly HindcastCase[]): HindcastSummary | null {
  const n = cases.length;
  if (n === 0) return null;
  const stats = (e: number[], cov: boolean[]) => ({
    meanError: e.reduce((a, b) => a + b, 0) / n,
    meanAbsoluteError: e.reduce((a, b) => a + Math.abs(b), 0) / n,
    rmse: Math.sqrt(e.reduce((a, b) => a + b * b, 0) / n),
    coverage: cov.filter(Boolean).length / n,
  });
  return {
    cases: n,
    time: stats(cases.map((c) => c.error.time), cases.map((c) => c.covered.time)),
    value: stats(cases.map((c) => c.error.value), cases.map((c) => c.covered.value)),
  };
}

/** Input of {@link hindcastCaseTask}. */
export interface HindcastCaseInput {
  cycle: HindcastCycle;
  monthsUsed: number;
  caseIndex: number;
  options: Omit<HindcastOptions, "monthsUsed">;
}

/**
 * {@link hindcastCase} with its arguments in one structured-clonable object, the shape a
 * worker task takes.
 *
 * @param input cycle, months used, case index and forecast options
 * @param control `shouldStop` (not part of the input: a worker passes its own)
 * @returns the case or null
 * @example
 * ```ts
 * import { hindcastCaseTask } from "./cycle_hindcast.ts";
 * import assert from "node:assert/strict";
 * const cycle = { id: 1, time: [2000], value: [1], start: 2000, maximum: { time: 2004, value: 9 } };
 * assert.equal(hindcastCaseTask({ cycle, monthsUsed: 1, caseIndex: 0, options: { seed: 1 } }), null);
 * ```
 */
export function hindcastCaseTask(
  input: HindcastCaseInput,
  control: StopOptions = {},
): HindcastCase | null {
  return hindcastCase(input.cycle, input.monthsUsed, input.caseIndex, {
    ...input.options,
    shouldStop: control.shouldStop,
  });
}
