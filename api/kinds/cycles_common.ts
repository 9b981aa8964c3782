/**
 * Request fields and helpers shared by the solar-cycle run kinds (smoothing, cycles, spectra,
 * cycle fits, forecasts): the sunspot-quantity check with its override, the regular monthly or
 * annual grid, the smoothing that defines cycle extrema, cycle detection with the numbering
 * anchor, and JSON shapes of cycle rows.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { InputProblem, type RunContext } from "../runs/kind.ts";
import { refId, type SeriesRef, TimeValue } from "../schemas/series_ref.ts";
import type { StoredSeries } from "../store/types.ts";
import {
  type CycleRow,
  cycleTable,
  type Extremum,
  findCycleExtrema,
  gaussianSmooth,
  type RegularGrid,
  runningMean,
  smoothed13Month,
  toRegularGrid,
} from "../../core/cycles/mod.ts";
import { SUNSPOT_QUANTITIES } from "../../core/series/quantities.ts";
import { formatIsoTime, parseIsoTime } from "../../core/time/mod.ts";

export const CAUTION_CYCLE_REVIEW =
  "These results do not replace peer-reviewed assessment or official solar-cycle predictions.";
export const CAUTION_SCALE =
  "Sunspot-number versions differ in scale (version 1 ≈ 0.6 × version 2 before 1947): " +
  "compare amplitudes only within one version.";

export const AllowAnyQuantity = z.boolean().default(false).openapi({
  description: "Analyse a series whose quantity is not a sunspot measure (sunspot_number, " +
    "sunspot_group_number, sunspot_area); by default such a series is refused",
  example: false,
});

export const SmoothingMethod = z.enum(["13_month", "running_mean", "gaussian", "none"]);

/** Fields that decide how cycle extrema are found; shared by the cycle kinds. */
export const CycleDetectionFields = {
  allow_any_quantity: AllowAnyQuantity,
  smoothing: SmoothingMethod.optional().openapi({
    description: "Smoothing that defines the extrema: `13_month` (the standard, monthly " +
      "series only), `running_mean` (`window` samples), `gaussian` (`sigma` samples) or " +
      "`none`. Default: `13_month` for monthly series, `none` for annual ones",
    example: "13_month",
  }),
  window: z.number().int().min(1).max(1200).default(13).openapi({
    description: "Running-mean window in samples (odd or even; even windows use half weights " +
      "at both ends)",
    example: 13,
  }),
  sigma: z.number().positive().max(600).default(6).openapi({
    description: "Gaussian kernel standard deviation in samples (truncated at 3 sigma)",
    example: 6,
  }),
  max_missing_weight: z.number().min(0).max(0.5).default(0).openapi({
    description: "Largest share of a smoothing window's weight that may be missing; above it " +
      "the smoothed value is null (0: complete windows only)",
    example: 0,
  }),
  min_separation_years: z.number().positive().max(100).default(7).openapi({
    description: "Shortest time between two cycle minima, years; of closer candidates the " +
      "lower is kept",
    example: 7,
  }),
  prominence: z.number().positive().optional().openapi({
    description: "Smallest rise around a minimum (series units); default a tenth of the " +
      "smoothed series' range",
    example: 20,
  }),
  anchor: z.object({
    cycle: z.number().int().min(-1000).max(1000),
    date: TimeValue.openapi({
      description: "ISO 8601 time (`1755-02`) or decimal year near the cycle's starting minimum",
      example: "2008-12",
    }),
  }).optional().openapi({
    description: "Numbering: cycle `cycle` began at the minimum nearest `date`. Without it, " +
      "cycles carry no number (only their position in the table)",
    example: { cycle: 24, date: "2008-12" },
  }),
};

const DetectionObject = z.object(CycleDetectionFields);
export type CycleDetectionParams = z.output<typeof DetectionObject> & { series: SeriesRef };

/** Load the series, refusing non-sunspot quantities unless overridden. */
export function sunspotSeries(
  ctx: RunContext,
  ref: SeriesRef,
  allowAny: boolean,
): StoredSeries {
  const s = ctx.series(refId(ref));
  if (!allowAny && !(SUNSPOT_QUANTITIES as readonly string[]).includes(s.quantity)) {
    throw new InputProblem(
      "/series",
      `series quantity is ${s.quantity}, not a sunspot measure (${
        SUNSPOT_QUANTITIES.join(", ")
      }); ` +
        "set allow_any_quantity to true to analyse it anyway",
      { quantity: s.quantity },
    );
  }
  return s;
}

/** The series on a gap-free monthly or annual grid (NaN = missing). */
export function activityGrid(s: StoredSeries): RegularGrid {
  if (s.resolution !== "monthly" && s.resolution !== "annual") {
    throw new InputProblem(
      "/series",
      `series resolution is ${s.resolution}; solar-cycle analyses need monthly or annual ` +
        "values (average daily values first with POST /v1/resampling)",
      { resolution: s.resolution },
    );
  }
  try {
    return toRegularGrid(s.time, s.value, s.resolution);
  } catch (e) {
    if (e instanceof RangeError) throw new InputProblem("/series", e.message);
    throw e;
  }
}

/** Decimal year of a request time (ISO 8601 string or decimal year). */
export function requestTime(v: string | number, pointer: string): number {
  if (typeof v === "number") {
    if (!Number.isFinite(v)) throw new InputProblem(pointer, "time must be a finite decimal year");
    return v;
  }
  try {
    return parseIsoTime(v).decimalYear;
  } catch (e) {
    if (e instanceof RangeError) throw new InputProblem(pointer, e.message);
    throw e;
  }
}

/** Window length in samples of a smoothing, for the too-short check. */
function smoothingSpan(method: string, p: { window: number; sigma: number }): number {
  if (method === "13_month") return 13;
  if (method === "running_mean") return p.window % 2 === 1 ? p.window : p.window + 1;
  if (method === "gaussian") return 2 * Math.ceil(3 * p.sigma) + 1;
  return 1;
}

/**
 * Apply a smoothing to a grid, refusing series shorter than the window (pointer "/series")
 * and the 13-month smoothing on annual data (pointer at `methodPointer`).
 */
export function applySmoothing(
  grid: RegularGrid,
  method: z.output<typeof SmoothingMethod>,
  p: { window: number; sigma: number; max_missing_weight: number },
  methodPointer: string,
): Float64Array {
  if (method === "13_month" && grid.resolution !== "monthly") {
    throw new InputProblem(
      methodPointer,
      "the 13-month smoothing needs monthly values; this series is annual (use running_mean, " +
        "gaussian or none)",
    );
  }
  const span = smoothingSpan(method, p);
  const n = grid.value.length;
  if (n < span) {
    throw new InputProblem(
      "/series",
      `series too short for the requested window: ${method} needs at least ${span} ` +
        `consecutive ${grid.resolution === "monthly" ? "months" : "years"}, the series spans ${n}`,
      { window_points: span, series_points: n },
    );
  }
  const opts = { maxMissingWeight: p.max_missing_weight };
  if (method === "13_month") return smoothed13Month(grid.value, opts);
  if (method === "running_mean") return runningMean(grid.value, p.window, opts);
  if (method === "gaussian") return gaussianSmooth(grid.value, p.sigma, opts);
  return Float64Array.from(grid.value);
}

/** Everything the cycle kinds derive from a series: grid, smoothing, extrema, table. */
export interface CycleAnalysis {
  series: StoredSeries;
  grid: RegularGrid;
  smoothing: z.output<typeof SmoothingMethod>;
  smoothed: Float64Array;
  extrema: Extremum[];
  rows: CycleRow[];
  warnings: string[];
  /** Factor to the version 1 scale for the b(a) width and the Waldmeier relation. */
  amplitudeScale: number;
  /** Prominence threshold used (series units). */
  prominence: number;
}

/** Load, grid, smooth, find extrema and build the cycle table; domain problems become 422s. */
export function analyseCycles(ctx: RunContext, p: CycleDetectionParams): CycleAnalysis {
  const s = sunspotSeries(ctx, p.series, p.allow_any_quantity);
  const grid = activityGrid(s);
  const smoothing = p.smoothing ?? (grid.resolution === "monthly" ? "13_month" : "none");
  const smoothed = applySmoothing(grid, smoothing, p, "/smoothing");
  const warnings: string[] = [];
  let extrema: Extremum[];
  try {
    extrema = findCycleExtrema(grid.time, smoothed, {
      minSeparation: p.min_separation_years,
      prominence: p.prominence,
    });
  } catch (e) {
    if (e instanceof RangeError) throw new InputProblem("/prominence", e.message);
    throw e;
  }
  const minima = extrema.filter((e) => e.kind === "minimum");
  if (minima.length === 0) {
    throw new InputProblem(
      "/series",
      `found no cycle minimum in ${(grid.time[grid.time.length - 1] - grid.time[0]).toFixed(1)} ` +
        "years of smoothed values: the series is too short, too gappy for the smoothing, or the " +
        "prominence rule is too strict",
    );
  }
  let anchor: { cycle: number; time: number } | undefined;
  if (p.anchor) {
    const t = requestTime(p.anchor.date, "/anchor/date");
    if (!(t >= grid.time[0] && t <= grid.time[grid.time.length - 1])) {
      throw new InputProblem(
        "/anchor/date",
        `numbering anchor ${p.anchor.date} lies outside the series (${
          iso(grid.time[0], grid.resolution)
        } to ${iso(grid.time[grid.time.length - 1], grid.resolution)})`,
      );
    }
    anchor = { cycle: p.anchor.cycle, time: t };
  }
  const rows = cycleTable(grid.time, extrema, { activity: grid.value, anchor });
  if (anchor) {
    const nearest = minima.reduce((b, m) =>
      Math.abs(m.time - anchor!.time) < Math.abs(b.time - anchor!.time) ? m : b
    );
    if (Math.abs(nearest.time - anchor.time) > 2) {
      warnings.push(
        `the minimum nearest the numbering anchor (${iso(nearest.time, grid.resolution)}) is ${
          Math.abs(nearest.time - anchor.time).toFixed(1)
        } years from it: check the anchor`,
      );
    }
  }
  let amplitudeScale = 1;
  if (s.quantity === "sunspot_number") {
    if (s.version === "2") amplitudeScale = 0.6;
    else if (s.version !== "1") {
      warnings.push(
        "the series does not declare its sunspot-number version; amplitude-dependent relations " +
          '(b(a), Waldmeier) assume version 1. Declare version "2" for the current scale',
      );
    }
  }
  let lo = Infinity, hi = -Infinity;
  for (const v of smoothed) {
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  const prominence = p.prominence ?? 0.1 * (hi - lo);
  return {
    series: s,
    grid,
    smoothing,
    smoothed,
    extrema,
    rows,
    warnings,
    amplitudeScale,
    prominence,
  };
}

/** ISO 8601 label of a grid time. */
export function iso(t: number, resolution: "monthly" | "annual"): string {
  return formatIsoTime(t, resolution);
}

/** JSON number or null. */
export function num(x: number | null | undefined): number | null {
  return x === null || x === undefined || !Number.isFinite(x) ? null : x;
}

/** A Float64Array with NaN as null. */
export function nulls(a: ArrayLike<number>): (number | null)[] {
  return Array.from(a, (x) => (Number.isFinite(x) ? x : null));
}

/** A cycle row as JSON, with ISO dates beside decimal years. */
export function cycleRowJson(r: CycleRow, res: "monthly" | "annual") {
  const pt = (p: { time: number; value: number } | null) =>
    p && { date: iso(p.time, res), decimal_year: p.time, value: p.value };
  return {
    index: r.index,
    number: r.number,
    in_progress: r.inProgress,
    start: pt(r.start),
    maximum: r.maximum && { ...pt(r.maximum)!, provisional: r.maximum.provisional },
    end: pt(r.end),
    length_years: num(r.length),
    rise_years: num(r.riseTime),
    decline_years: num(r.declineTime),
    amplitude: num(r.amplitude),
    mean_activity: num(r.meanActivity),
    integrated_activity: num(r.integratedActivity),
    samples: r.samples,
  };
}
