/**
 * Cycle detection shared by the cycle analyses (cycles, cycle fits, forecasts): the request
 * fields that decide how extrema are found, and the adapter that loads a sunspot series, puts it
 * on its calendar grid, smooths it, finds its extrema and builds the cycle table
 * (core/cycles/cycle_extrema.ts, cycle_table.ts), refusing what cannot be analysed with a
 * problem naming the field.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import { refId, type SeriesRef, TimeValue } from "../../schemas/series_ref.ts";
import type { StoredSeries } from "../../store/types.ts";
import {
  type CycleRow,
  cycleTable,
  defaultCycleProminence,
  type Extremum,
  findCycleExtrema,
  type RegularGrid,
  versionOneScale,
} from "../../../core/cycles/mod.ts";
import { SUNSPOT_QUANTITIES } from "../../../core/series/quantities.ts";
import { formatIsoTime, parseIsoTime } from "../../../core/time/mod.ts";
import { activityGrid } from "./activity_grid.ts";
import { withInputPointers } from "./input_problem.ts";
import { applySmoothing, SmoothingMethod, type SmoothingMethodName } from "./smoothing_method.ts";

/** Fields that decide how cycle extrema are found; shared by the cycle analyses. */
export const CycleDetectionFields = {
  allow_any_quantity: z.boolean().default(false).openapi({
    description: "Analyse a series whose quantity is not a sunspot measure (sunspot_number, " +
      "sunspot_group_number, sunspot_area); by default such a series is refused",
    example: false,
  }),
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

/** Everything the cycle analyses derive from a series: grid, smoothing, extrema, table. */
export interface CycleAnalysis {
  series: StoredSeries;
  grid: RegularGrid;
  smoothing: SmoothingMethodName;
  smoothed: Float64Array;
  extrema: Extremum[];
  rows: CycleRow[];
  warnings: string[];
  /** Factor to the version 1 scale for the b(a) width and the Waldmeier relation. */
  amplitudeScale: number;
  /** Prominence threshold used (series units). */
  prominence: number;
}

/** Load the series, refusing non-sunspot quantities unless overridden. */
function sunspotSeries(ctx: RunContext, ref: SeriesRef, allowAny: boolean): StoredSeries {
  const s = ctx.series(refId(ref));
  if (!allowAny && !(SUNSPOT_QUANTITIES as readonly string[]).includes(s.quantity)) {
    throw new InputProblem(
      "/series",
      `series quantity is ${s.quantity}, not a sunspot measure (${
        SUNSPOT_QUANTITIES.join(", ")
      }); set allow_any_quantity to true to analyse it anyway`,
      { quantity: s.quantity },
    );
  }
  return s;
}

/** Decimal year of a request time (ISO 8601 string or decimal year). */
function requestTime(v: string | number, pointer: string): number {
  if (typeof v === "number") {
    if (!Number.isFinite(v)) throw new InputProblem(pointer, "time must be a finite decimal year");
    return v;
  }
  return withInputPointers({ "*": pointer }, () => parseIsoTime(v).decimalYear);
}

/** The numbering anchor as core takes it, refused when it lies outside the series. */
function numberingAnchor(p: CycleDetectionParams, grid: RegularGrid) {
  if (!p.anchor) return undefined;
  const t = requestTime(p.anchor.date, "/anchor/date");
  const first = grid.time[0], last = grid.time[grid.time.length - 1];
  if (!(t >= first && t <= last)) {
    throw new InputProblem(
      "/anchor/date",
      `numbering anchor ${p.anchor.date} lies outside the series (${
        formatIsoTime(first, grid.resolution)
      } to ${formatIsoTime(last, grid.resolution)})`,
    );
  }
  return { cycle: p.anchor.cycle, time: t };
}

/** A warning when the minimum nearest the anchor is more than 2 years from it. */
function anchorWarning(minima: Extremum[], anchor: { time: number }, grid: RegularGrid) {
  const nearest = minima.reduce((b, m) =>
    Math.abs(m.time - anchor.time) < Math.abs(b.time - anchor.time) ? m : b
  );
  const gap = Math.abs(nearest.time - anchor.time);
  if (gap <= 2) return [];
  return [
    `the minimum nearest the numbering anchor (${
      formatIsoTime(nearest.time, grid.resolution)
    }) is ${gap.toFixed(1)} years from it: check the anchor`,
  ];
}

/** Load, grid, smooth, find extrema and build the cycle table; domain problems become 422s. */
export function analyseCycles(ctx: RunContext, p: CycleDetectionParams): CycleAnalysis {
  const s = sunspotSeries(ctx, p.series, p.allow_any_quantity);
  const grid = activityGrid(s);
  const smoothing = p.smoothing ?? (grid.resolution === "monthly" ? "13_month" : "none");
  const smoothed = applySmoothing(grid, smoothing, p, "/smoothing");
  const extrema = withInputPointers(
    { minSeparation: "/min_separation_years", "*": "/prominence" },
    () =>
      findCycleExtrema(grid.time, smoothed, {
        minSeparation: p.min_separation_years,
        prominence: p.prominence,
      }),
  );
  const minima = extrema.filter((e) => e.kind === "minimum");
  if (minima.length === 0) {
    throw new InputProblem(
      "/series",
      `found no cycle minimum in ${(grid.time[grid.time.length - 1] - grid.time[0]).toFixed(1)} ` +
        "years of smoothed values: the series is too short, too gappy for the smoothing, or the " +
        "prominence rule is too strict",
      { minima: 0 },
    );
  }
  const anchor = numberingAnchor(p, grid);
  const rows = cycleTable(grid.time, extrema, { activity: grid.value, anchor });
  const warnings = anchor ? anchorWarning(minima, anchor, grid) : [];
  const scale = versionOneScale(s.quantity, s.version);
  if (!scale.known) {
    warnings.push(
      "the series does not declare its sunspot-number version; amplitude-dependent relations " +
        '(b(a), Waldmeier) assume version 1. Declare version "2" for the current scale',
    );
  }
  return {
    series: s,
    grid,
    smoothing,
    smoothed,
    extrema,
    rows,
    warnings,
    amplitudeScale: scale.scale,
    prominence: p.prominence ?? defaultCycleProminence(smoothed),
  };
}
