/**
 * Adapter of the "composites" analysis: the epochs (dates or a cycle table), the series on its
 * calendar axis with the trend removed, the superposed epoch analysis from core
 * (core/climate/superposed_epoch.ts, polynomial_trend_residuals.ts), and the result.
 *
 * @module
 */
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import type { StoredSeries } from "../../store/types.ts";
import { polynomialTrendResiduals, superposedEpoch } from "../../../core/climate/mod.ts";
import { resampleMeans } from "../../../core/series/mod.ts";
import { formatIsoTime, parseIsoTime } from "../../../core/time/mod.ts";
import { CAUTION_CORRELATION, CAUTION_REVIEW } from "../common/cautions.ts";
import { withInputPointers } from "../common/input_problem.ts";
import {
  annualCycleLeft,
  deseasonalisedQuantity,
  seasonalAdjustment,
} from "../common/seasonal_cycle.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import { cycleEpochs } from "../common/cycle_epochs.ts";
import type { CompositeParams } from "./request.ts";
import type { CompositeResultIn } from "./result.ts";

/** The epochs of the request as decimal years. */
function epochDates(p: CompositeParams, ctx: RunContext): number[] {
  if (p.epoch_dates && p.cycle_run) {
    throw new InputProblem("/cycle_run", "give epoch_dates or cycle_run, not both");
  }
  if (p.epoch_dates) {
    return p.epoch_dates.map((d, k) => {
      if (typeof d === "number") return d;
      try {
        return parseIsoTime(d).decimalYear;
      } catch (e) {
        throw new InputProblem(`/epoch_dates/${k}`, (e as Error).message);
      }
    });
  }
  if (p.cycle_run) return cycleEpochs(ctx, p.cycle_run, p.cycle_epoch, "/cycle_run");
  throw new InputProblem("/epoch_dates", "give epoch_dates or a cycle_run");
}

/**
 * The series as calendar-period means on the composite's axis, with its monthly climatology
 * (when asked or by default) and the trend removed.
 */
function seriesOnAxis(p: CompositeParams, s: StoredSeries) {
  const to = p.resolution ?? (s.resolution === "annual" ? "annual" : "monthly");
  if (s.resolution === "annual" && to === "monthly") {
    throw new InputProblem(
      "/resolution",
      "the series is annual; a monthly composite would interpolate",
    );
  }
  const grid = withInputPointers({
    minDaysPerMonth: "/min_days_per_month",
    minMonthsPerYear: "/min_months_per_year",
    to: "/resolution",
    "*": "/series",
  }, () =>
    resampleMeans(s, to, {
      minDaysPerMonth: p.min_days_per_month,
      minMonthsPerYear: p.min_months_per_year,
    }));
  const label = { input: "climate", name: s.name, quantity: s.quantity };
  const seasonal = seasonalAdjustment(to, grid.time, [grid.value], [label], p.deseasonalise);
  const degree = { none: null, mean: 0, linear: 1, quadratic: 2 } as const;
  const d = degree[p.preprocess];
  const v = seasonal.values[0];
  const x = d === null
    ? v
    : withInputPointers({ x: "/series" }, () => polynomialTrendResiduals(v, d));
  const left = annualCycleLeft(to, grid.time, [x], [label]).length > 0;
  return { to, step: to === "monthly" ? 1 / 12 : 1, time: grid.time, x, seasonal, left };
}

/** The sample index of each epoch on the axis, and the dates that fall outside it. */
function epochIndices(dates: number[], time: Float64Array, step: number) {
  const inside: number[] = [], outside: number[] = [];
  for (const date of dates) {
    const i = Math.round((date - time[0]) / step);
    if (i < 0 || i >= time.length) outside.push(date);
    else inside.push(i);
  }
  return { inside: [...new Set(inside)], outside };
}

/** Composite the series around the epochs, with its band and significance. */
export function computeComposites(p: CompositeParams, ctx: RunContext): CompositeResultIn {
  const s = ctx.series(refId(p.series));
  const dates = epochDates(p, ctx);
  const { to, step, time, x, seasonal, left } = seriesOnAxis(p, s);
  const before = Math.round(p.before_years / step), after = Math.round(p.after_years / step);
  const epochIdx = epochIndices(dates, time, step);
  const epochs = p.cycle_run ? "/cycle_run" : "/epoch_dates";
  const composite = (replicates: { bootstrap: number; randomSets: number }) =>
    withInputPointers({
      before: "/before_years",
      after: "/after_years",
      bootstrap: "/bootstrap",
      randomSets: "/random_sets",
      "*": epochs,
    }, () =>
      superposedEpoch(x, epochIdx.inside, {
        before,
        after,
        preEpochBaseline: p.baseline === "pre_epoch",
        ...replicates,
        seed: p.seed,
        shouldStop: ctx.cancelled,
      }));
  // One replicate each meets every input rule of the method (epochs whose window fits, room
  // for random epochs) at negligible cost, before the progress report that ends the input
  // checks (RunContext.progress): a request refused for its epochs is never stored.
  composite({ bootstrap: 1, randomSets: 1 });
  ctx.progress(0.1);
  const r = composite({ bootstrap: p.bootstrap, randomSets: p.random_sets });
  const warnings: string[] = [...seasonal.warnings];
  if (left) {
    warnings.push(
      "an annual cycle remains in the analysed series: the composite mixes it with any solar " +
        "signal and the p-values against random epochs cannot be trusted (random epochs fall " +
        "in other calendar months); set deseasonalise to true",
    );
  }
  const droppedDates = [...epochIdx.outside, ...r.dropped.map((i) => time[i])];
  if (droppedDates.length) {
    warnings.push(
      `${droppedDates.length} epoch(s) left out: their window does not fit inside the series ` +
        `(${droppedDates.map((d) => formatIsoTime(d, to)).join(", ")})`,
    );
  }
  if (r.used.length < 5) warnings.push(`only ${r.used.length} epochs: the composite is noisy`);
  const unit = to === "monthly" ? "months" : "years";
  return {
    resolution: to,
    offset_unit: unit,
    epochs_used: r.used.map((i) => formatIsoTime(time[i], to)),
    epochs_dropped: droppedDates.map((d) => formatIsoTime(d, to)),
    min_spacing: r.minSpacing,
    window: { before, after },
    seasonal_cycle: seasonal.json,
    preprocess: p.preprocess,
    baseline: p.baseline,
    offsets: r.offsets.map((o, j) => ({
      offset: o,
      offset_years: o * step,
      composite: r.composite[j],
      count: r.count[j],
      band_lower: r.lower[j],
      band_upper: r.upper[j],
      p_random_epochs: r.pPerOffset[j],
    })),
    p_family_wise: r.pFamilyWise,
    band: "95 % bootstrap percentile band over epochs",
    random_epochs: "sets of the same number of epochs, uniform within the valid range, " +
      `at least ${r.minSpacing} ${unit} apart (the smallest observed spacing)`,
    outputs: {
      composite: {
        name: `${s.name} composite around ${p.cycle_run ? `solar ${p.cycle_epoch}a` : "epochs"}`,
        quantity: deseasonalisedQuantity(s.quantity, seasonal.json.deseasonalise),
        units: s.units,
        // offsets as time in years from the epoch
        time: r.offsets.map((o) => o * step),
        value: r.composite,
        lower: r.lower,
        upper: r.upper,
        interval: "95 % bootstrap band",
        time_axis: "years_from_epoch",
        description: "time axis: years from the epoch, not calendar years",
      },
      series_preprocessed: {
        name: `${s.name} (${to}, ${
          seasonal.json.deseasonalise ? "monthly climatology and " : ""
        }${p.preprocess} removed)`,
        quantity: deseasonalisedQuantity(s.quantity, seasonal.json.deseasonalise),
        units: s.units,
        time: Array.from(time),
        // NaN marks a period that fails the coverage rule (documented null)
        value: undefinedAsNull(x),
      },
    },
    warnings,
    cautions: [CAUTION_CORRELATION, CAUTION_REVIEW],
  };
}
