/**
 * Run kind "cycle-forecasts": the cycle in progress forecast from its observed months by the
 * Hathaway, Wilson & Reichmann (1994) shape function, with a residual-bootstrap band and a
 * hindcast score on past cycles (core/cycles/cycle_forecast.ts, cycle_hindcast.ts).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { snakeKeys } from "./json_keys.ts";
import { quantileSorted } from "d3-array";
import { InputProblem, type RunKind } from "../runs/kind.ts";
import { SeriesRef } from "../schemas/series_ref.ts";
import {
  fitCycleSequence,
  forecastCycle,
  type HindcastCase,
  type HindcastCaseInput,
  type HindcastCycle,
  periodMidpoint,
  summarizeHindcast,
} from "../../core/cycles/mod.ts";
import {
  analyseCycles,
  CAUTION_CYCLE_REVIEW,
  CAUTION_SCALE,
  CycleDetectionFields,
  cycleRowJson,
  iso,
} from "./cycles_common.ts";

const MIN_MONTHS = 12;

export const CycleForecastsRequest = z.object({
  series: SeriesRef,
  ...CycleDetectionFields,
  seed: z.number().int().min(0).max(4294967295).default(1),
  replicates: z.number().int().min(20).max(5000).default(200).openapi({
    description: "Bootstrap replicates of the forecast band",
    example: 200,
  }),
  hindcast_replicates: z.number().int().min(20).max(2000).default(100).openapi({
    description: "Bootstrap replicates of each hindcast case",
    example: 100,
  }),
  block_length: z.number().int().min(1).max(60).default(6).openapi({
    description: "Block length (months) of the moving-block residual bootstrap; 1 = ordinary " +
      "residual bootstrap",
    example: 6,
  }),
  level: z.number().gt(0).lt(1).default(0.9).openapi({
    description: "Central probability of the band",
    example: 0.9,
  }),
  width: z.enum(["amplitude_dependent", "free"]).default("amplitude_dependent").openapi({
    description: "Shape fit: `amplitude_dependent` (a and t0, b = b(a); steadier early in a " +
      "cycle) or `free` (a, t0, b)",
    example: "amplitude_dependent",
  }),
  previous_cycle_overlap: z.boolean().default(true).openapi({
    description: "Remove the fitted tail of the previous cycle before fitting, and add it back " +
      "to the forecast",
    example: true,
  }),
}).openapi("CycleForecastsRequest");

function summaryJson(cases: HindcastCase[], res: "monthly" | "annual") {
  const s = summarizeHindcast(cases);
  return {
    summary: s && snakeKeys({
      cases: s.cases,
      maximum_time_years: s.time,
      maximum_value: s.value,
    }),
    cases: cases.map((c) => ({
      index: c.id,
      truncated_at: iso(c.truncatedAt, res),
      months_used: c.monthsUsed,
      predicted: {
        maximum_date: iso(c.predicted.time, "monthly"),
        maximum_decimal_year: c.predicted.time,
        maximum_value: c.predicted.value,
        date_interval: c.predicted.timeInterval,
        value_interval: c.predicted.valueInterval,
        smoothed_date_interval: c.predicted.smoothed?.timeInterval ?? null,
        smoothed_value_interval: c.predicted.smoothed?.valueInterval ?? null,
      },
      observed: {
        maximum_date: iso(c.observed.time, res),
        maximum_decimal_year: c.observed.time,
        maximum_value: c.observed.value,
      },
      error: { time_years: c.error.time, value: c.error.value },
      covered: c.covered,
      covered_by_curve_band: c.coveredByCurveBand,
    })),
  };
}

/**
 * An empirical interval for the maximum from the same-phase hindcast errors: the forecast
 * minus the (1 ± level)/2 quantiles (R-7) of past errors (predicted − observed), so that it
 * covers past outcomes at the stated rate (an empirical prediction interval; common practice
 * in forecast verification). Null with fewer than 10 hindcast cases.
 */
function hindcastInterval(
  cases: HindcastCase[],
  m: { time: number; value: number },
  level: number,
) {
  if (cases.length < 10) return null;
  const q = (xs: number[], p: number) => quantileSorted(xs.sort((a, b) => a - b), p) as number;
  const lo = (1 - level) / 2, hi = 1 - lo;
  const et = cases.map((c) => c.error.time), ev = cases.map((c) => c.error.value);
  const t = [m.time - q(et, hi), m.time - q(et, lo)];
  return {
    cases: cases.length,
    date_interval: t.map((x) => iso(x, "monthly")),
    decimal_year_interval: t,
    value_interval: [Math.max(0, m.value - q(ev, hi)), m.value - q(ev, lo)],
    basis: "forecast minus the quantiles of the same-phase hindcast errors",
  };
}

export const cycleForecastsKind: RunKind<typeof CycleForecastsRequest> = {
  kind: "cycle-forecasts",
  path: "/v1/cycle-forecasts",
  algorithmVersion: "2",
  tag: "Solar cycles",
  summary: "Forecast of the cycle in progress, with a bootstrap band and hindcast errors",
  description: "Fits the Hathaway, Wilson & Reichmann (1994) shape function to the months " +
    "observed since the cycle in progress began (its smoothed minimum), after removing the " +
    "fitted tail of the previous cycle, and predicts the date and size of its maximum and its " +
    "curve to the next minimum. The band is the percentile interval of a seeded moving-block " +
    "bootstrap of the residuals (scaled to the fitted level). The same method is run on every " +
    "past cycle truncated at the same number of months after its minimum (`same_phase`) and at " +
    "half its rise (`mid_rise`), and its errors and band coverage are reported, so that you " +
    "can judge how far to trust the forecast; the same-phase errors also give an empirical " +
    "interval for the maximum (`hindcast_interval`). The next minimum is estimated from the lengths " +
    "of the past cycles in the series.",
  request: CycleForecastsRequest,
  result: LegacyResult,
  estimateSeconds: (p) => (p.replicates + 2 * 25 * p.hindcast_replicates) * 0.001,
  async compute(params, ctx) {
    const an = analyseCycles(ctx, params);
    const { grid, rows, series: s } = an;
    const res = grid.resolution;
    const perYear = res === "monthly" ? 12 : 1;
    const idx = (t: number) => Math.round((t - grid.time[0]) * perYear);
    const current = rows[rows.length - 1];
    if (!current.inProgress) {
      throw new InputProblem("/series", "internal: the last cycle of the table is not in progress");
    }
    const i0 = idx(current.start.time);
    const obsT: number[] = [], obsV: number[] = [];
    for (let i = i0; i < grid.value.length; i++) {
      if (Number.isFinite(grid.value[i])) {
        obsT.push(grid.time[i]);
        obsV.push(grid.value[i]);
      }
    }
    const monthsSince = Math.round((grid.time[grid.time.length - 1] - current.start.time) * 12);
    if (obsT.length < MIN_MONTHS || res !== "monthly") {
      throw new InputProblem(
        "/series",
        res !== "monthly"
          ? "a cycle forecast needs monthly values"
          : `the cycle in progress began at the minimum of ${
            iso(current.start.time, res)
          }; ${obsT.length} months observed since, a forecast needs at least ${MIN_MONTHS}`,
        { months_observed: obsT.length },
      );
    }
    const complete = rows.filter((r) => !r.inProgress && r.maximum);
    const windows = complete.map((r) => ({ start: idx(r.start.time), end: idx(r.end!.time) }));
    const fitOpts = { width: params.width, amplitudeScale: an.amplitudeScale };
    let independent: ReturnType<typeof fitCycleSequence>["independent"] = [];
    try {
      if (complete.length) {
        independent = fitCycleSequence(grid.time, grid.value, windows, {
          ...fitOpts,
          passes: 0,
        }).independent;
      }
    } catch (e) {
      if (e instanceof RangeError) throw new InputProblem("/series", e.message);
      throw e;
    }
    const overlap = params.previous_cycle_overlap;
    const previousCycle = overlap && independent.length
      ? independent[independent.length - 1]
      : undefined;
    // forecast curve: monthly from the cycle's start to start + the longest past cycle (or 14 yr)
    const lengths = complete.map((r) => r.length!);
    const horizon = Math.max(14, ...lengths);
    const p0 = grid.firstPeriod + i0;
    const curveTime = Array.from(
      { length: Math.round(horizon * 12) },
      (_, k) => periodMidpoint(p0 + k, "monthly"),
    );
    const fcOpts = {
      seed: params.seed,
      replicates: params.replicates,
      blockLength: Math.min(params.block_length, obsT.length),
      level: params.level,
      ...fitOpts,
    };
    let fc;
    try {
      fc = forecastCycle(obsT, obsV, { ...fcOpts, curveTime, previousCycle });
    } catch (e) {
      if (e instanceof RangeError) throw new InputProblem("/series", e.message);
      throw e;
    }
    ctx.progress(0.2);
    // hindcast cases: every past cycle with a fitted predecessor (when overlap is removed)
    const past: HindcastCycle[] = [];
    complete.forEach((r, k) => {
      if (overlap && k === 0) return;
      const w = windows[k];
      past.push({
        id: r.index,
        time: grid.time.slice(w.start, w.end),
        value: grid.value.slice(w.start, w.end),
        start: r.start.time,
        maximum: { time: r.maximum!.time, value: r.maximum!.value },
        previousCycle: overlap ? independent[k - 1] : undefined,
      });
    });
    // only finite values go into a fit: gaps in past cycles are dropped
    for (const c of past) {
      const keep = Array.from(c.value as Float64Array, (v) => Number.isFinite(v));
      c.time = Float64Array.from((c.time as Float64Array).filter((_, i) => keep[i]));
      c.value = Float64Array.from((c.value as Float64Array).filter((_, i) => keep[i]));
    }
    const hOpts = { ...fcOpts, replicates: params.hindcast_replicates, previousCycle: undefined };
    const inputs: HindcastCaseInput[] = [];
    past.forEach((c, k) => {
      inputs.push({ cycle: c, monthsUsed: obsT.length, caseIndex: k, options: hOpts });
    });
    past.forEach((c, k) => {
      const rise = complete.find((r) => r.index === c.id)!.riseTime! * 12;
      inputs.push({
        cycle: c,
        monthsUsed: rise / 2,
        caseIndex: past.length + k,
        options: hOpts,
      });
    });
    const outs = await ctx.parallel<HindcastCaseInput, HindcastCase | null>(
      "cycles.hindcast_case",
      inputs,
    );
    const same = outs.slice(0, past.length).filter((c): c is HindcastCase => c !== null);
    const mid = outs.slice(past.length).filter((c): c is HindcastCase => c !== null);
    const warnings = [...an.warnings];
    if (complete.length < 3) {
      warnings.push(
        `only ${complete.length} complete cycle(s) in the series: the hindcast score and the ` +
          "next-minimum estimate rest on very few cases",
      );
    }
    if (lengths.length && monthsSince / 12 > Math.max(...lengths)) {
      warnings.push(
        `the cycle in progress has run ${(monthsSince / 12).toFixed(1)} years, longer than any ` +
          "complete cycle in the series: its ending minimum may have passed without being " +
          "detectable yet (a minimum needs the following rise; see prominence)",
      );
    }
    const sameSummary = summarizeHindcast(same);
    if (sameSummary && sameSummary.cases >= 10) {
      const low = [
        ["date", sameSummary.time.coverage],
        ["size", sameSummary.value.coverage],
      ].filter(([, c]) => (c as number) < params.level - 0.2);
      if (low.length) {
        warnings.push(
          `at this phase the bootstrap predictive interval held the observed maximum's ${
            low.map(([w, c]) => `${w} in ${Math.round((c as number) * 100)} %`).join(" and its ")
          } of ${sameSummary.cases} past cycles (nominal ${Math.round(params.level * 100)} %): ` +
            "the intervals are too narrow there; prefer forecast.maximum.hindcast_interval",
        );
      }
    }
    if (fc.failedReplicates > 0) {
      warnings.push(
        `${fc.failedReplicates} bootstrap replicate(s) failed to fit and were left out`,
      );
    }
    const meanLen = lengths.length ? lengths.reduce((a, b) => a + b, 0) / lengths.length : null;
    const sdLen = lengths.length > 1
      ? Math.sqrt(lengths.reduce((a, b) => a + (b - meanLen!) ** 2, 0) / (lengths.length - 1))
      : null;
    const nextMin = meanLen === null ? null : current.start.time + meanLen;
    const pct = `${Math.round(params.level * 100)} %`;
    return {
      input: { id: s.id, name: s.name, quantity: s.quantity, version: s.version, n: s.n },
      cycle_in_progress: {
        ...cycleRowJson(current, res),
        months_observed: obsT.length,
        months_since_minimum: monthsSince,
      },
      method: {
        model: "Hathaway, Wilson & Reichmann 1994 shape function, c = 0.71",
        width: params.width,
        amplitude_scale: an.amplitudeScale,
        previous_cycle_overlap: overlap,
        band: `${pct} percentile interval of a moving-block residual bootstrap ` +
          `(block ${fcOpts.blockLength} months, ${params.replicates} replicates, seed ${params.seed})`,
      },
      forecast: {
        maximum: {
          date: iso(fc.maximum.time, "monthly"),
          decimal_year: fc.maximum.time,
          value: fc.maximum.value,
          date_interval: fc.maximum.timeInterval.map((t) => iso(t, "monthly")),
          decimal_year_interval: fc.maximum.timeInterval,
          value_interval: fc.maximum.valueInterval,
          smoothed_observation: fc.maximum.smoothed && {
            description: "predictive interval of the maximum of the 13-month smoothed " +
              "observations: the observed months continued by each replicate's curve plus " +
              "resampled noise",
            date_interval: fc.maximum.smoothed.timeInterval.map((t) => iso(t, "monthly")),
            decimal_year_interval: fc.maximum.smoothed.timeInterval,
            value_interval: fc.maximum.smoothed.valueInterval,
          },
          level: params.level,
          hindcast_interval: hindcastInterval(same, fc.maximum, params.level),
        },
        next_minimum: nextMin === null ? null : {
          date: iso(nextMin, "monthly"),
          decimal_year: nextMin,
          sd_years: sdLen,
          basis: `start of the cycle in progress + mean length of the ${lengths.length} ` +
            "complete cycles in the series (± their standard deviation)",
        },
        fit: {
          t0: fc.fit.t0,
          a: fc.fit.a,
          b_months: fc.fit.b,
          residual_sd: fc.fit.sigma,
          months_fitted: fc.fit.n,
        },
        failed_replicates: fc.failedReplicates,
      },
      hindcast: {
        description: "the same method on past cycles truncated after the same number of " +
          "months as the cycle in progress (same_phase) and at half their own rise (mid_rise); " +
          "errors are predicted minus observed smoothed maximum (years, series units); " +
          "coverage is the share of observed smoothed maxima inside the predictive interval " +
          "(covered_by_curve_band: inside the band of the fitted curve's maximum)",
        same_phase: { months_used: obsT.length, ...summaryJson(same, res) },
        mid_rise: summaryJson(mid, res),
      },
      outputs: {
        forecast: {
          name: `${s.name} (forecast of the cycle in progress)`,
          quantity: s.quantity,
          units: s.units,
          time: curveTime,
          value: Array.from(fc.curve.value),
          lower: Array.from(fc.curve.lower),
          upper: Array.from(fc.curve.upper),
          interval: `${pct} bootstrap band of the cycle curve (not of monthly values)`,
          description: "fitted cycle curve, plus the previous cycle's tail, from the cycle's " +
            "minimum to the horizon",
        },
      },
      warnings,
      cautions: [
        "A forecast from the cycle's shape assumes the cycle follows that shape; the band " +
        "reflects the fit's residuals only. The hindcast coverage shows how often such bands " +
        "held for past cycles.",
        CAUTION_SCALE,
        CAUTION_CYCLE_REVIEW,
      ],
    };
  },
};
