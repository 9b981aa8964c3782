/**
 * The common calendar axis of the solar–climate analyses (lag correlations, attributions):
 * request fields for its resolution and coverage rules, and bringing several series onto it
 * (same-period means, then the longest gap-free stretch; core/series/align_series.ts and
 * core/series/longest_complete_run.ts).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { InputProblem } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import { alignSeries, longestCompleteRun } from "../../../core/series/mod.ts";
import { formatIsoTime } from "../../../core/time/mod.ts";
import { withInputPointers } from "./input_problem.ts";

/** Resolution of the common axis of a solar–climate analysis. */
export const AnalysisResolution = z.enum(["monthly", "annual"]).optional().openapi({
  description: "Common time axis: calendar-month or calendar-year means (default: the " +
    "coarsest input resolution). Finer inputs are averaged with the coverage rules below.",
  example: "monthly",
});

/** Coverage rules passed to the alignment (the same defaults as resampling). */
export const CoverageFields = {
  min_days_per_month: z.number().int().min(1).max(31).default(20).openapi({
    description: "Daily values a month needs for a monthly mean (daily inputs)",
  }),
  min_months_per_year: z.number().int().min(1).max(12).default(10).openapi({
    description: "Monthly values a year needs for an annual mean",
  }),
};

const RANK = { daily: 0, monthly: 1, annual: 2 } as const;

/** Series on one gap-free calendar axis. */
export interface AnalysisAxis {
  resolution: "monthly" | "annual";
  /** Sampling step in years (1/12 or 1). */
  step: number;
  /** Unit of lags and windows in samples. */
  lagUnit: "months" | "years";
  /** Period middles, decimal years. */
  time: Float64Array;
  /** One array per input, no gaps. */
  values: Float64Array[];
  start_period: string;
  end_period: string;
  warnings: string[];
}

/**
 * Align `inputs` on one monthly or annual axis (same-period means with coverage rules), then
 * keep the longest stretch of consecutive periods where every series has a value. Gaps are
 * never filled; what is dropped is reported in `warnings`.
 *
 * @param inputs the stored series
 * @param pointers JSON Pointer of each input in the request (for problems)
 * @param requested requested resolution, or undefined for the coarsest input resolution
 * @param coverage coverage thresholds
 * @param minPoints fewest common periods accepted
 * @throws {InputProblem} at the input's pointer when it is coarser than the axis or cannot be
 *   averaged, at the second input's when the series do not overlap in enough periods
 */
export function analysisAxis(
  inputs: StoredSeries[],
  pointers: string[],
  requested: "monthly" | "annual" | undefined,
  coverage: { min_days_per_month: number; min_months_per_year: number },
  minPoints = 10,
): AnalysisAxis {
  const to = requested ??
    (inputs.some((s) => s.resolution === "annual") ? "annual" : "monthly");
  inputs.forEach((s, k) => {
    if (s.resolution !== "irregular" && RANK[s.resolution] > RANK[to]) {
      throw new InputProblem(
        pointers[k],
        `series "${s.name}" is ${s.resolution}, coarser than the requested ${to} axis; ` +
          "the analysis only averages, it never interpolates",
      );
    }
  });
  const overlap = pointers[1] ?? pointers[0];
  const aligned = withInputPointers({
    series: (e) => e.reason === "no_overlap" ? overlap : pointers[e.index ?? 1] ?? overlap,
    "*": overlap,
  }, () =>
    alignSeries(inputs, to, {
      rule: "common_span",
      minDaysPerMonth: coverage.min_days_per_month,
      minMonthsPerYear: coverage.min_months_per_year,
    }));
  const n = aligned.time.length;
  const run = longestCompleteRun(aligned.values);
  if (run.length < minPoints) {
    throw new InputProblem(
      overlap,
      `the series overlap in only ${run.length} consecutive ${to} period(s) with values; ` +
        `the analysis needs at least ${minPoints}`,
      { periods: run.length, min_periods: minPoints },
    );
  }
  const warnings: string[] = [];
  if (run.length < n) {
    warnings.push(
      `${n - run.length} ${to} period(s) of the common span were left out: gaps are not ` +
        `filled, so the analysis uses the longest gap-free stretch (${run.length} periods)`,
    );
  }
  const end = run.start + run.length;
  const time = aligned.time.slice(run.start, end);
  return {
    resolution: to,
    step: to === "monthly" ? 1 / 12 : 1,
    lagUnit: to === "monthly" ? "months" : "years",
    time,
    values: aligned.values.map((v) => v.slice(run.start, end)),
    start_period: formatIsoTime(time[0], to),
    end_period: formatIsoTime(time[time.length - 1], to),
    warnings,
  };
}
