/**
 * Adapter of the "alignments" analysis: the common resolution, the alignment from core
 * (core/series/align_series.ts), what was dropped, and the result.
 *
 * @module
 */
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import { alignSeries } from "../../../core/series/mod.ts";
import { formatIsoTime } from "../../../core/time/mod.ts";
import type { StoredSeries } from "../../store/types.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { checkPeriodCount } from "../common/period_count.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import type { AlignParams } from "./request.ts";
import type { AlignResultIn } from "./result.ts";

const RANK = { daily: 0, monthly: 1, annual: 2 } as const;
type Resolution = keyof typeof RANK;

/** The requested resolution, or the coarsest of the regular inputs; never finer than one. */
function commonResolution(params: AlignParams, inputs: StoredSeries[]): Resolution {
  let to = params.resolution;
  if (to === undefined) {
    const regular = inputs.flatMap((s) => s.resolution === "irregular" ? [] : [s.resolution]);
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
  return to;
}

/** Put the series on one calendar axis and report what each lost. */
export function computeAlignments(params: AlignParams, ctx: RunContext): AlignResultIn {
  const inputs = params.series.map((r) => ctx.series(refId(r)));
  const to = commonResolution(params, inputs);
  inputs.forEach((s, k) => checkPeriodCount(s.start, s.end, to, `/series/${k}`));
  const r = withInputPointers({
    series: (e) => e.index === undefined ? "/series" : `/series/${e.index}`,
    to: "/resolution",
    minDaysPerMonth: "/min_days_per_month",
    minMonthsPerYear: "/min_months_per_year",
    minPointsPerPeriod: "/min_points_per_period",
    "*": "/series",
  }, () =>
    alignSeries(inputs, to, {
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
  // a series without a covered value in a period of the common span is NaN in core: a
  // documented null
  const outputs = Object.fromEntries(inputs.map((s, k) => [`aligned_${k}`, {
    name: `${s.name} (aligned, ${to})`,
    quantity: s.quantity,
    units: s.units,
    time: Array.from(r.time),
    value: undefinedAsNull(r.values[k]),
    ...(r.uncertainties[k] ? { uncertainty: undefinedAsNull(r.uncertainties[k]!) } : {}),
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
      period: formatIsoTime(t, to),
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
}
