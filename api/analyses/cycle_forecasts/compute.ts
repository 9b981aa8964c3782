/**
 * Adapter of the "cycle-forecasts" analysis: detection from the shared cycle adapter, the
 * observed months of the cycle in progress, its forecast (core/cycles/cycle_forecast.ts), the
 * hindcasts of the past cycles in parallel (cycle_hindcast.ts), the empirical interval and the
 * next-minimum estimate (hindcast_interval.ts, next_minimum.ts), and the result.
 *
 * @module
 */
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import {
  completeCycleWindows,
  type CycleForecast,
  type CycleRow,
  type CycleWindow,
  fitCycleSequence,
  forecastCycle,
  gridIndex,
  type HathawayFit,
  type HindcastCase,
  type HindcastCaseInput,
  type HindcastCycle,
  hindcastInterval,
  type NextMinimumEstimate,
  nextMinimumEstimate,
  pastCycles,
  periodMidpoint,
  type RegularGrid,
  summarizeHindcast,
} from "../../../core/cycles/mod.ts";
import { formatIsoTime } from "../../../core/time/mod.ts";
import type { StoredSeries } from "../../store/types.ts";
import { analyseCycles, type CycleAnalysis } from "../common/cycle_detection.ts";
import { CAUTION_CYCLE_REVIEW, CAUTION_SCALE } from "../common/cycle_cautions.ts";
import { cycleRowJson } from "../common/cycle_row.ts";
import { sunspotInput } from "../common/sunspot_input.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { parallelInRounds } from "../common/parallel_rounds.ts";
import type { CycleForecastsParams } from "./request.ts";
import type { CycleForecastsResultIn, HindcastSetIn } from "./result.ts";

/** Fewest observed months of the cycle in progress for a forecast. */
const MIN_MONTHS = 12;

const month = (t: number) => formatIsoTime(t, "monthly");

/** The cycle in progress and its observed (finite) months, refused when too few. */
function cycleInProgress(grid: RegularGrid, rows: CycleRow[]) {
  const current = rows[rows.length - 1];
  if (!current.inProgress) {
    throw new InputProblem("/series", "internal: the last cycle of the table is not in progress");
  }
  const i0 = gridIndex(grid, current.start.time);
  const time: number[] = [], value: number[] = [];
  for (let i = i0; i < grid.value.length; i++) {
    if (Number.isFinite(grid.value[i])) {
      time.push(grid.time[i]);
      value.push(grid.value[i]);
    }
  }
  if (time.length < MIN_MONTHS || grid.resolution !== "monthly") {
    throw new InputProblem(
      "/series",
      grid.resolution !== "monthly"
        ? "a cycle forecast needs monthly values"
        : `the cycle in progress began at the minimum of ${
          formatIsoTime(current.start.time, grid.resolution)
        }; ${time.length} months observed since, a forecast needs at least ${MIN_MONTHS}`,
      { months_observed: time.length },
    );
  }
  return { current, i0, time, value, monthsSince: grid.value.length - 1 - i0 };
}

/** Monthly curve times from the cycle's start to the longest past cycle (at least 14 years). */
function curveTimes(grid: RegularGrid, i0: number, lengths: number[]): number[] {
  const horizon = Math.max(14, ...lengths);
  const p0 = grid.firstPeriod + i0;
  return Array.from(
    { length: Math.round(horizon * 12) },
    (_, k) => periodMidpoint(p0 + k, "monthly"),
  );
}

/**
 * Hindcast cases of every past cycle at the same phase as the cycle in progress and at half its
 * own rise, computed in parallel with per-case seeds (results independent of the workers).
 */
async function hindcasts(
  ctx: RunContext,
  past: HindcastCycle[],
  complete: CycleRow[],
  monthsObserved: number,
  options: HindcastCaseInput["options"],
) {
  const inputs: HindcastCaseInput[] = [
    ...past.map((c, k) => ({ cycle: c, monthsUsed: monthsObserved, caseIndex: k, options })),
    ...past.map((c, k) => ({
      cycle: c,
      monthsUsed: complete.find((r) => r.index === c.id)!.riseTime! * 12 / 2,
      caseIndex: past.length + k,
      options,
    })),
  ];
  const outs = await parallelInRounds<HindcastCaseInput, HindcastCase | null>(
    ctx,
    "cycles.hindcast_case",
    inputs,
    { progress: [0.2, 0.95] },
  );
  const done = (c: HindcastCase | null): c is HindcastCase => c !== null;
  return {
    same: outs.slice(0, past.length).filter(done),
    mid: outs.slice(past.length).filter(done),
  };
}

/** Hindcast cases and their error summary as JSON. */
function hindcastSetJson(cases: HindcastCase[], res: "monthly" | "annual"): HindcastSetIn {
  const s = summarizeHindcast(cases);
  const stats = (e: NonNullable<typeof s>["time"]) => ({
    mean_error: e.meanError,
    mean_absolute_error: e.meanAbsoluteError,
    rmse: e.rmse,
    coverage: e.coverage,
  });
  return {
    summary: s &&
      { cases: s.cases, maximum_time_years: stats(s.time), maximum_value: stats(s.value) },
    cases: cases.map((c) => ({
      index: c.id,
      truncated_at: formatIsoTime(c.truncatedAt, res),
      months_used: c.monthsUsed,
      predicted: {
        maximum_date: month(c.predicted.time),
        maximum_decimal_year: c.predicted.time,
        maximum_value: c.predicted.value,
        date_interval: c.predicted.timeInterval,
        value_interval: c.predicted.valueInterval,
        smoothed_date_interval: c.predicted.smoothed?.timeInterval ?? null,
        smoothed_value_interval: c.predicted.smoothed?.valueInterval ?? null,
      },
      observed: {
        maximum_date: formatIsoTime(c.observed.time, res),
        maximum_decimal_year: c.observed.time,
        maximum_value: c.observed.value,
      },
      error: { time_years: c.error.time, value: c.error.value },
      covered: c.covered,
      covered_by_curve_band: c.coveredByCurveBand,
    })),
  };
}

/** Warnings on few cycles, a long cycle in progress, low hindcast coverage, failed replicates. */
function forecastWarnings(
  an: CycleAnalysis,
  p: { complete: number; lengths: number[]; monthsSince: number; level: number },
  same: HindcastCase[],
  fc: CycleForecast,
): string[] {
  const warnings = [...an.warnings];
  if (p.complete < 3) {
    warnings.push(
      `only ${p.complete} complete cycle(s) in the series: the hindcast score and the ` +
        "next-minimum estimate rest on very few cases",
    );
  }
  if (p.lengths.length && p.monthsSince / 12 > Math.max(...p.lengths)) {
    warnings.push(
      `the cycle in progress has run ${(p.monthsSince / 12).toFixed(1)} years, longer than any ` +
        "complete cycle in the series: its ending minimum may have passed without being " +
        "detectable yet (a minimum needs the following rise; see prominence)",
    );
  }
  const s = summarizeHindcast(same);
  if (s && s.cases >= 10) {
    const low = ([["date", s.time.coverage], ["size", s.value.coverage]] as const)
      .filter(([, c]) => c < p.level - 0.2);
    if (low.length) {
      warnings.push(
        `at this phase the bootstrap predictive interval held the observed maximum's ${
          low.map(([w, c]) => `${w} in ${Math.round(c * 100)} %`).join(" and its ")
        } of ${s.cases} past cycles (nominal ${Math.round(p.level * 100)} %): ` +
          "the intervals are too narrow there; prefer forecast.maximum.hindcast_interval",
      );
    }
  }
  if (fc.failedReplicates > 0) {
    warnings.push(`${fc.failedReplicates} bootstrap replicate(s) failed to fit and were left out`);
  }
  return warnings;
}

/** The forecast's maximum as JSON, with its intervals. */
function maximumJson(fc: CycleForecast, level: number, same: HindcastCase[]) {
  const m = fc.maximum;
  const h = hindcastInterval(same, m, level);
  return {
    date: month(m.time),
    decimal_year: m.time,
    value: m.value,
    date_interval: [month(m.timeInterval[0]), month(m.timeInterval[1])] as [string, string],
    decimal_year_interval: m.timeInterval,
    value_interval: m.valueInterval,
    smoothed_observation: m.smoothed && {
      description: "predictive interval of the maximum of the 13-month smoothed " +
        "observations: the observed months continued by each replicate's curve plus " +
        "resampled noise",
      date_interval: [month(m.smoothed.timeInterval[0]), month(m.smoothed.timeInterval[1])] as [
        string,
        string,
      ],
      decimal_year_interval: m.smoothed.timeInterval,
      value_interval: m.smoothed.valueInterval,
    },
    level,
    hindcast_interval: h && {
      cases: h.cases,
      date_interval: [month(h.timeInterval[0]), month(h.timeInterval[1])] as [string, string],
      decimal_year_interval: h.timeInterval,
      value_interval: h.valueInterval,
      basis: "forecast minus the quantiles of the same-phase hindcast errors",
    },
  };
}

/** "90 %" for a level of 0.9. */
const pct = (level: number) => `${Math.round(level * 100)} %`;

/** The forecast as JSON: its maximum with intervals, the next minimum, the fit. */
function forecastJson(
  fc: CycleForecast,
  level: number,
  same: HindcastCase[],
  next: NextMinimumEstimate | null,
) {
  return {
    maximum: maximumJson(fc, level, same),
    next_minimum: next && {
      date: month(next.time),
      decimal_year: next.time,
      sd_years: next.sdLength,
      basis: `start of the cycle in progress + mean length of the ${next.n} ` +
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
  };
}

/** The shape fitted to the observed months and its bootstrap band, after the previous tail. */
function forecastInProgress(
  an: CycleAnalysis,
  obs: ReturnType<typeof cycleInProgress>,
  past: { rows: CycleRow[]; windows: CycleWindow[] },
  params: CycleForecastsParams,
  stop: () => boolean,
) {
  const { grid } = an;
  const fitOpts = { width: params.width, amplitudeScale: an.amplitudeScale };
  // independent fits of the past cycles: each cycle's predecessor, whose tail overlaps it
  const independent: HathawayFit[] = past.rows.length
    ? withInputPointers(
      { "*": "/series" },
      () =>
        fitCycleSequence(grid.time, grid.value, past.windows, {
          ...fitOpts,
          passes: 0,
          shouldStop: stop,
        }),
    )
      .independent
    : [];
  const lengths = past.rows.map((r) => r.length!);
  const curveTime = curveTimes(grid, obs.i0, lengths);
  const options = {
    seed: params.seed,
    replicates: params.replicates,
    blockLength: Math.min(params.block_length, obs.time.length),
    level: params.level,
    ...fitOpts,
  };
  const previousCycle = params.previous_cycle_overlap && independent.length
    ? independent[independent.length - 1]
    : undefined;
  const fc = withInputPointers(
    { "*": "/series" },
    () =>
      forecastCycle(obs.time, obs.value, {
        ...options,
        curveTime,
        previousCycle,
        shouldStop: stop,
      }),
  );
  return { fc, independent, lengths, curveTime, options };
}

/** The forecast curve with its band as a series-like output. */
function forecastOutput(s: StoredSeries, curveTime: number[], fc: CycleForecast, level: number) {
  return {
    name: `${s.name} (forecast of the cycle in progress)`,
    quantity: s.quantity,
    units: s.units,
    time: curveTime,
    value: Array.from(fc.curve.value),
    lower: Array.from(fc.curve.lower),
    upper: Array.from(fc.curve.upper),
    interval: `${pct(level)} bootstrap band of the cycle curve (not of monthly values)`,
    description: "fitted cycle curve, plus the previous cycle's tail, from the cycle's " +
      "minimum to the horizon",
  };
}

const HINDCAST_DESCRIPTION = "the same method on past cycles truncated after the same number " +
  "of months as the cycle in progress (same_phase) and at half their own rise (mid_rise); " +
  "errors are predicted minus observed smoothed maximum (years, series units); " +
  "coverage is the share of observed smoothed maxima inside the predictive interval " +
  "(covered_by_curve_band: inside the band of the fitted curve's maximum)";

const CAUTIONS = [
  "A forecast from the cycle's shape assumes the cycle follows that shape; the band " +
  "reflects the fit's residuals only. The hindcast coverage shows how often such bands " +
  "held for past cycles.",
  CAUTION_SCALE,
  CAUTION_CYCLE_REVIEW,
];

/** Forecast the cycle in progress and score the method on the past cycles. */
export async function computeCycleForecasts(
  params: CycleForecastsParams,
  ctx: RunContext,
): Promise<CycleForecastsResultIn> {
  const an = analyseCycles(ctx, params);
  const { grid, series: s } = an;
  const obs = cycleInProgress(grid, an.rows);
  const complete = completeCycleWindows(grid, an.rows);
  const f = forecastInProgress(an, obs, complete, params, ctx.cancelled);
  ctx.progress(0.2);
  const overlap = params.previous_cycle_overlap;
  const past = pastCycles(
    grid,
    complete.rows,
    complete.windows,
    overlap ? f.independent : undefined,
  );
  const hOpts = { ...f.options, replicates: params.hindcast_replicates, previousCycle: undefined };
  const { same, mid } = await hindcasts(ctx, past, complete.rows, obs.time.length, hOpts);
  const next = nextMinimumEstimate(obs.current.start.time, f.lengths);
  return {
    input: sunspotInput(s),
    cycle_in_progress: {
      ...cycleRowJson(obs.current, grid.resolution),
      months_observed: obs.time.length,
      months_since_minimum: obs.monthsSince,
    },
    method: {
      model: "Hathaway, Wilson & Reichmann 1994 shape function, c = 0.71",
      width: params.width,
      amplitude_scale: an.amplitudeScale,
      previous_cycle_overlap: overlap,
      band: `${pct(params.level)} percentile interval of a moving-block residual bootstrap ` +
        `(block ${f.options.blockLength} months, ${params.replicates} replicates, seed ${params.seed})`,
    },
    forecast: forecastJson(f.fc, params.level, same, next),
    hindcast: {
      description: HINDCAST_DESCRIPTION,
      same_phase: { months_used: obs.time.length, ...hindcastSetJson(same, grid.resolution) },
      mid_rise: hindcastSetJson(mid, grid.resolution),
    },
    outputs: { forecast: forecastOutput(s, f.curveTime, f.fc, params.level) },
    warnings: forecastWarnings(
      an,
      {
        complete: complete.rows.length,
        lengths: f.lengths,
        monthsSince: obs.monthsSince,
        level: params.level,
      },
      same,
      f.fc,
    ),
    cautions: CAUTIONS,
  };
}
