/**
 * Run kind "alignments": several series on one calendar axis, via same-period means and a
 * stated rule, reporting what was dropped (core/series/align_series.ts).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { InputProblem, type RunKind } from "../runs/kind.ts";
import { refId, SeriesRef } from "../schemas/series_ref.ts";
import { alignSeries } from "../../core/series/mod.ts";
import { formatIsoTime } from "../../core/time/mod.ts";
import { asInputProblem, checkPeriodCount, withNulls } from "./series_output.ts";

/** Most series in one alignment. */
export const MAX_ALIGNED = 20;

export const AlignRequest = z.object({
  series: z.array(SeriesRef).min(2).max(MAX_ALIGNED).openapi({
    description: `Two to ${MAX_ALIGNED} series`,
  }),
  resolution: z.enum(["daily", "monthly", "annual"]).optional().openapi({
    description: "Common resolution (default: the coarsest input resolution)",
    example: "monthly",
  }),
  rule: z.enum(["intersection", "common_span"]).default("intersection").openapi({
    description: "`intersection`: only periods where every series has a covered value; " +
      "`common_span`: every period of the overlap, with null where a series lacks a value",
    example: "intersection",
  }),
  min_days_per_month: z.number().int().min(1).max(31).default(20),
  min_months_per_year: z.number().int().min(1).max(12).default(10),
  min_points_per_period: z.number().int().min(1).max(100_000).default(1),
}).openapi("AlignRequest");

const RANK = { daily: 0, monthly: 1, annual: 2 } as const;

export const alignKind: RunKind<typeof AlignRequest> = {
  kind: "alignments",
  path: "/v1/alignments",
  algorithmVersion: "1",
  tag: "Series operations",
  summary: "Align several series on one calendar time axis",
  description: "Turns each series into same-period means at the chosen resolution (with the " +
    "coverage rules of resampling), then keeps the periods the rule allows. The result " +
    "reports, per series, the periods dropped outside the common span and by the " +
    "intersection, and per period the count behind each value. Outputs `aligned_0`, " +
    "`aligned_1`, ... (in request order) are saved as new series.",
  request: AlignRequest,
  result: LegacyResult,
  autoSave: Array.from({ length: MAX_ALIGNED }, (_, k) => `aligned_${k}`),
  estimateSeconds: () => 0.2,
  compute(params, ctx) {
    const inputs = params.series.map((r) => ctx.series(refId(r)));
    let to = params.resolution;
    if (to === undefined) {
      const regular = inputs.map((s) => s.resolution).filter((r) => r !== "irregular") as (
        keyof typeof RANK
      )[];
      if (regular.length === 0) {
        throw new InputProblem("/resolution", "every input is irregular: state the resolution");
      }
      to = regular.reduce((a, b) => (RANK[b] > RANK[a] ? b : a));
    }
    for (const [k, s] of inputs.entries()) {
      if (s.resolution !== "irregular" && RANK[s.resolution] > RANK[to]) {
        throw new InputProblem(
          `/series/${k}`,
          `series ${k} is ${s.resolution}, coarser than the requested ${to}; alignment only averages`,
        );
      }
    }
    inputs.forEach((s, k) => checkPeriodCount(s.start, s.end, to!, `/series/${k}`));
    const r = asInputProblem("/series", () =>
      alignSeries(inputs, to!, {
        rule: params.rule,
        minDaysPerMonth: params.min_days_per_month,
        minMonthsPerYear: params.min_months_per_year,
        minPointsPerPeriod: params.min_points_per_period,
      }));
    if (r.time.length < 2) {
      throw new InputProblem(
        "/series",
        `only ${r.time.length} common ${to} period: an alignment needs at least 2`,
      );
    }
    r.values.forEach((v, k) => {
      if (v.filter(Number.isFinite).length < 2) {
        throw new InputProblem(
          `/series/${k}`,
          `series ${k} has fewer than 2 covered ${to} periods on the common span`,
        );
      }
    });
    const warnings: string[] = [];
    inputs.forEach((s, k) => {
      const rep = r.report[k];
      const dropped = rep.droppedOutsideSpan + rep.droppedByIntersection;
      if (dropped > 0) {
        warnings.push(
          `series ${k} (${s.name}): ${dropped} covered ${to} period(s) dropped ` +
            `(${rep.droppedOutsideSpan} outside the common span, ${rep.droppedByIntersection} by the intersection)`,
        );
      }
    });
    const outputs = Object.fromEntries(inputs.map((s, k) => [`aligned_${k}`, {
      name: `${s.name} (aligned, ${to})`,
      quantity: s.quantity,
      units: s.units,
      time: Array.from(r.time),
      value: withNulls(r.values[k]),
      ...(r.uncertainties[k] ? { uncertainty: withNulls(r.uncertainties[k]!) } : {}),
      description: `Series ${s.id} on the common ${to} axis (${params.rule}); ${r.resampling[k]}.`,
    }]));
    return {
      resolution: to,
      rule: params.rule,
      n: r.time.length,
      start_period: formatIsoTime(r.time[0], to),
      end_period: formatIsoTime(r.time[r.time.length - 1], to),
      inputs: inputs.map((s, k) => ({
        id: s.id,
        name: s.name,
        resolution: s.resolution,
        n: s.n,
        resampling: r.resampling[k],
        points: r.report[k].points,
        covered_periods: r.report[k].covered,
        uncovered_periods: r.report[k].uncovered,
        dropped_outside_span: r.report[k].droppedOutsideSpan,
        dropped_by_intersection: r.report[k].droppedByIntersection,
      })),
      coverage: Array.from(r.time, (t, j) => ({
        period: formatIsoTime(t, to!),
        decimal_year: t,
        counts: r.counts.map((c) => c[j]),
      })),
      outputs,
      warnings,
      cautions: [
        params.rule === "intersection"
          ? "Statistics on the aligned series describe only the periods every series covers, " +
            "which may not represent the full record of any of them."
          : "Gaps (null) remain where a series lacks a covered value; an analysis of these " +
            "series must handle them or use the intersection rule.",
      ],
    };
  },
};
