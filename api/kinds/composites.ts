/**
 * Run kind "composites": superposed epoch analysis of a climate series around epochs (user
 * dates, or the maxima or minima of a cycle-table run), with a bootstrap band and
 * significance against random epochs (core/climate/superposed_epoch.ts).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { InputProblem, type RunKind } from "../runs/kind.ts";
import { refId, SeriesRef, TimeValue } from "../schemas/series_ref.ts";
import { superposedEpoch } from "../../core/climate/mod.ts";
import { ordinaryLeastSquares } from "../../core/stats/mod.ts";
import { resampleMeans } from "../../core/series/mod.ts";
import { formatIsoTime, parseIsoTime } from "../../core/time/mod.ts";
import {
  CAUTION_CORRELATION,
  CAUTION_REVIEW,
  CoverageFields,
  jsonArray,
  RUN_ID,
} from "./climate_common.ts";

export const CompositeRequest = z.object({
  series: SeriesRef.openapi({ description: "The climate series to composite" }),
  epoch_dates: z.array(TimeValue).min(2).max(2000).optional().openapi({
    description: "Key dates: ISO 8601 (`1958-03`) or decimal years",
    example: ["1947-05", "1958-03", "1968-11", "1979-12", "1989-11"],
  }),
  cycle_run: z.string().regex(RUN_ID, "must be a run id (UUIDv7)").optional().openapi({
    description: "Instead of epoch_dates: a run whose result holds a cycle table (`cycles`, " +
      "each with `start` and `maximum`); its maxima or minima become the epochs",
  }),
  cycle_epoch: z.enum(["maximum", "minimum"]).default("maximum"),
  resolution: z.enum(["monthly", "annual"]).optional().openapi({
    description: "Axis of the composite (default: the series' own monthly or annual " +
      "resolution; daily series default to monthly)",
  }),
  ...CoverageFields,
  before_years: z.number().min(0).max(100).default(5),
  after_years: z.number().min(0).max(100).default(5),
  preprocess: z.enum(["none", "mean", "linear", "quadratic"]).default("linear").openapi({
    description: "Removed from the series before compositing (a trend would otherwise make " +
      "late epochs look warmer than early ones)",
  }),
  baseline: z.enum(["none", "pre_epoch"]).default("none").openapi({
    description: "`pre_epoch`: reference each epoch's window to its own mean before the epoch",
  }),
  bootstrap: z.number().int().min(100).max(100_000).default(1000),
  random_sets: z.number().int().min(100).max(100_000).default(1000),
  seed: z.number().int().min(0).max(4294967295).default(1),
}).openapi("CompositeRequest");

type Params = z.output<typeof CompositeRequest>;

function epochsFromRun(
  p: Params,
  run: { id: string; kind: string; result: Record<string, unknown> | null },
) {
  const cycles = run.result?.cycles;
  if (!Array.isArray(cycles)) {
    throw new InputProblem("/cycle_run", `run ${run.id} (${run.kind}) has no cycle table`);
  }
  const out: number[] = [];
  for (const c of cycles as Record<string, unknown>[]) {
    const pt = (p.cycle_epoch === "maximum" ? c.maximum : c.start) as
      | { decimal_year?: number; provisional?: boolean }
      | null
      | undefined;
    if (pt && typeof pt.decimal_year === "number" && !pt.provisional) out.push(pt.decimal_year);
  }
  return out;
}

export const compositeKind: RunKind<typeof CompositeRequest> = {
  kind: "composites",
  path: "/v1/composites",
  algorithmVersion: "2",
  tag: "Solar–climate linkage",
  summary: "Superposed epoch composite around solar maxima, minima or given dates",
  description: "Averages the climate series in a window around each epoch (offsets in " +
    "samples of the monthly or annual axis), with a bootstrap 95 % band over epochs and " +
    "significance against random epochs drawn with the same minimum spacing as the real " +
    "ones: per-offset p-values and a family-wise p-value for the largest |composite| in the " +
    "window.",
  request: CompositeRequest,
  result: LegacyResult,
  runRefs: (p) => (p.cycle_run ? [p.cycle_run] : []),
  estimateSeconds: (p) =>
    0.05 + (p.bootstrap + p.random_sets) * 2e-5 * (p.before_years + p.after_years),
  compute(p, ctx) {
    const s = ctx.series(refId(p.series));
    let dates: number[];
    if (p.epoch_dates && p.cycle_run) {
      throw new InputProblem("/cycle_run", "give epoch_dates or cycle_run, not both");
    }
    if (p.epoch_dates) {
      dates = p.epoch_dates.map((d, k) => {
        if (typeof d === "number") return d;
        try {
          return parseIsoTime(d).decimalYear;
        } catch (e) {
          throw new InputProblem(`/epoch_dates/${k}`, (e as Error).message);
        }
      });
    } else if (p.cycle_run) {
      dates = epochsFromRun(p, ctx.run(p.cycle_run));
    } else {
      throw new InputProblem("/epoch_dates", "give epoch_dates or a cycle_run");
    }
    const to = p.resolution ?? (s.resolution === "annual" ? "annual" : "monthly");
    if (s.resolution === "annual" && to === "monthly") {
      throw new InputProblem(
        "/resolution",
        "the series is annual; a monthly composite would interpolate",
      );
    }
    const grid = resampleMeans(s, to, {
      minDaysPerMonth: p.min_days_per_month,
      minMonthsPerYear: p.min_months_per_year,
    });
    const step = to === "monthly" ? 1 / 12 : 1;
    const before = Math.round(p.before_years / step), after = Math.round(p.after_years / step);
    let x = grid.value;
    if (p.preprocess !== "none") {
      // least-squares polynomial in time over the covered periods (gaps stay gaps)
      const idx: number[] = [];
      for (let i = 0; i < x.length; i++) if (Number.isFinite(x[i])) idx.push(i);
      const degree = p.preprocess === "mean" ? 0 : p.preprocess === "linear" ? 1 : 2;
      if (idx.length < degree + 4) {
        throw new InputProblem("/series", `only ${idx.length} covered ${to} periods`);
      }
      const mid = (x.length - 1) / 2;
      const cols = Array.from(
        { length: degree },
        (_, d) => Float64Array.from(idx, (i) => ((i - mid) / Math.max(mid, 1)) ** (d + 1)),
      );
      const yv = Float64Array.from(idx, (i) => x[i]);
      const fit = ordinaryLeastSquares(cols, yv);
      const y = new Float64Array(x.length).fill(NaN);
      idx.forEach((i, k) => (y[i] = fit.residuals[k]));
      x = y;
    }
    const t0 = grid.time[0];
    const epochIdx: number[] = [];
    const outside: number[] = [];
    for (const d of dates) {
      const i = Math.round((d - t0) / step);
      if (i < 0 || i >= x.length) outside.push(d);
      else epochIdx.push(i);
    }
    let r;
    try {
      r = superposedEpoch(x, [...new Set(epochIdx)], {
        before,
        after,
        preEpochBaseline: p.baseline === "pre_epoch",
        bootstrap: p.bootstrap,
        randomSets: p.random_sets,
        seed: p.seed,
      });
    } catch (e) {
      if (e instanceof RangeError) {
        throw new InputProblem(p.cycle_run ? "/cycle_run" : "/epoch_dates", e.message);
      }
      throw e;
    }
    const warnings: string[] = [];
    const droppedDates = [...outside, ...r.dropped.map((i) => grid.time[i])];
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
      epochs_used: r.used.map((i) => formatIsoTime(grid.time[i], to)),
      epochs_dropped: droppedDates.map((d) => formatIsoTime(d, to)),
      min_spacing: r.minSpacing,
      window: { before, after },
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
          quantity: s.quantity,
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
          name: `${s.name} (${to}, ${p.preprocess} removed)`,
          quantity: s.quantity,
          units: s.units,
          time: Array.from(grid.time),
          value: jsonArray(x),
        },
      },
      warnings,
      cautions: [CAUTION_CORRELATION, CAUTION_REVIEW],
    };
  },
};
