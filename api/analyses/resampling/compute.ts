/**
 * Adapter of the "resampling" analysis: calendar-period means with coverage rules from core
 * (core/series/resample_means.ts), reported per output period.
 *
 * @module
 */
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import { resampleMeans } from "../../../core/series/mod.ts";
import { formatIsoTime } from "../../../core/time/mod.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { checkPeriodCount } from "../common/period_count.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import type { ResampleParams } from "./request.ts";
import type { ResampleResultIn } from "./result.ts";

/** Average the series into the requested calendar periods. */
export function computeResampling(params: ResampleParams, ctx: RunContext): ResampleResultIn {
  const s = ctx.series(refId(params.series));
  checkPeriodCount(s.start, s.end, params.to, "/to");
  const m = withInputPointers({
    to: "/to",
    minDaysPerMonth: "/min_days_per_month",
    minMonthsPerYear: "/min_months_per_year",
    minPointsPerPeriod: "/min_points_per_period",
    maxMissingRunDays: "/max_missing_run_days",
    "*": "/series",
  }, () =>
    resampleMeans(s, params.to, {
      from: s.resolution,
      uncertainty: s.uncertainty,
      minDaysPerMonth: params.min_days_per_month,
      minMonthsPerYear: params.min_months_per_year,
      minPointsPerPeriod: params.min_points_per_period,
      maxMissingRunDays: params.max_missing_run_days,
    }));
  // a period that fails the coverage rule is NaN in core: a documented null
  const value = undefinedAsNull(m.value);
  const covered = value.filter((v) => v !== null).length;
  if (covered < 2) {
    throw new InputProblem(
      "/series",
      `only ${covered} ${params.to} period(s) meet the coverage rule (${m.rule}); ` +
        "a result needs at least 2: lower the thresholds or use a longer series",
      { covered },
    );
  }
  const gaps = m.time.length - covered;
  const warnings: string[] = [];
  if (gaps > 0) {
    warnings.push(
      `${gaps} of ${m.time.length} ${params.to} periods failed the coverage rule and are gaps (null)`,
    );
  }
  if (s.resolution === "irregular") {
    warnings.push(
      "the input is irregular: each period's mean weights its points equally, however they " +
        `are spaced; a period needs at least ${m.required} point(s)`,
    );
  }
  if (s.resolution === params.to) {
    warnings.push(`the series is already ${params.to}: each period is its own value`);
  }
  return {
    input: { id: s.id, name: s.name, resolution: s.resolution, n: s.n },
    to: params.to,
    rule: m.rule,
    required: m.required,
    periods: m.time.length,
    covered,
    gaps,
    coverage: Array.from(m.time, (t, j) => ({
      period: formatIsoTime(t, params.to),
      decimal_year: t,
      start: m.start[j],
      end: m.end[j],
      count: m.count[j],
      points: m.points[j],
      required: m.required,
      ...(m.longestMissingRun ? { longest_missing_run: m.longestMissingRun[j] } : {}),
      covered: m.covered[j] === 1,
    })),
    outputs: {
      resampled: {
        name: `${s.name} (${params.to} means)`,
        quantity: s.quantity,
        units: s.units,
        time: Array.from(m.time),
        value,
        ...(m.uncertainty ? { uncertainty: undefinedAsNull(m.uncertainty) } : {}),
        description: `Resampled from series ${s.id}: ${m.rule}. Gaps (null) where coverage failed.`,
      },
    },
    warnings,
    cautions: [
      "A period that passes the coverage rule can still be biased when its missing values " +
      "cluster in one part of it (for example the first half of a month).",
      ...(m.uncertainty
        ? [
          "Uncertainties of the means combine the point uncertainties as independent errors; " +
          "they leave out sampling error from missing values and correlation between points.",
        ]
        : []),
    ],
  };
}
