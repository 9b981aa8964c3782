/**
 * Run kind "resampling": calendar-period means (daily → monthly → annual) with a
 * minimum-coverage rule, reported per output period (core/series/resample_means.ts).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { InputProblem, type RunKind } from "../runs/kind.ts";
import { refId, SeriesRef } from "../schemas/series_ref.ts";
import { resampleMeans } from "../../core/series/mod.ts";
import { formatIsoTime } from "../../core/time/mod.ts";
import { asInputProblem, checkPeriodCount, definedCount, withNulls } from "./series_output.ts";

export const ResampleRequest = z.object({
  series: SeriesRef,
  to: z.enum(["daily", "monthly", "annual"]).openapi({
    description: "Target resolution; not finer than the input's (daily needs irregular input)",
    example: "monthly",
  }),
  min_days_per_month: z.number().int().min(1).max(31).default(20).openapi({
    description: "Daily values a month needs for a monthly mean (daily input)",
    example: 20,
  }),
  min_months_per_year: z.number().int().min(1).max(12).default(10).openapi({
    description: "Monthly values a year needs for an annual mean (monthly input, or daily " +
      "input after the monthly stage)",
    example: 10,
  }),
  max_missing_run_days: z.number().int().min(0).max(31).optional().openapi({
    description: "Daily input: a month whose longest run of consecutive missing days exceeds " +
      "this is a gap, whatever its count (with min_days_per_month = days − 10 and 4 here, the " +
      'common "at most 10 missing, fewer than 5 in a row" practice); default no limit',
    example: 4,
  }),
  min_points_per_period: z.number().int().min(1).max(100_000).default(1).openapi({
    description: "Points a period needs when the input is irregular",
    example: 1,
  }),
}).openapi("ResampleRequest");

export const resampleKind: RunKind<typeof ResampleRequest> = {
  kind: "resampling",
  path: "/v1/resampling",
  algorithmVersion: "1",
  tag: "Series operations",
  summary: "Calendar-period means with a minimum-coverage rule",
  description: "Averages a series into monthly or annual means (daily to monthly to annual; " +
    "daily to annual in two stages). A period with too few values (default: fewer than 20 " +
    "days for a month, 10 months for a year) is a gap (null), never a mean of too few values. " +
    "Each output period reports its count, the count it needed, and whether it was covered. " +
    "Uncertainties, when the input has them, combine as independent errors and exclude " +
    "sampling error. The `resampled` output is saved as a new series derived from the run.",
  request: ResampleRequest,
  result: LegacyResult,
  autoSave: ["resampled"],
  estimateSeconds: () => 0.1,
  compute(params, ctx) {
    const s = ctx.series(refId(params.series));
    checkPeriodCount(s.start, s.end, params.to, "/to");
    const m = asInputProblem("/series", () => {
      try {
        return resampleMeans(s, params.to, {
          from: s.resolution,
          uncertainty: s.uncertainty,
          minDaysPerMonth: params.min_days_per_month,
          minMonthsPerYear: params.min_months_per_year,
          minPointsPerPeriod: params.min_points_per_period,
          maxMissingRunDays: params.max_missing_run_days,
        });
      } catch (e) {
        if (e instanceof RangeError && /only averages into longer periods/.test(e.message)) {
          throw new InputProblem("/to", e.message);
        }
        throw e;
      }
    });
    const value = withNulls(m.value);
    const covered = definedCount(value);
    if (covered < 2) {
      throw new InputProblem(
        "/series",
        `only ${covered} ${params.to} period(s) meet the coverage rule (${m.rule}); ` +
          "a result needs at least 2: lower the thresholds or use a longer series",
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
          ...(m.uncertainty ? { uncertainty: withNulls(m.uncertainty) } : {}),
          description:
            `Resampled from series ${s.id}: ${m.rule}. Gaps (null) where coverage failed.`,
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
  },
};
