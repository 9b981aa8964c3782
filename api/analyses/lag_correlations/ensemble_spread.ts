/**
 * The spread of a lag-correlation answer over the members of its solar input's ensemble: the
 * analysis (common axis, preprocessing, lag table) repeated for every member, and the
 * distribution of the best lag, of r at it and at the central best lag, and of its analytic
 * p-value. The Monte Carlo test is run for the central series only (a thousand surrogate tests
 * would cost a thousand times more).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { CancelledError, type RunContext } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import { laggedCorrelationTable, type LagRow } from "../../../core/climate/mod.ts";
import { type AnalysisAxis, analysisAxis } from "../common/analysis_axis.ts";
import { withInputPointers } from "../common/input_problem.ts";
import {
  type SolarEnsemble,
  spreadCounts,
  SpreadQuantiles,
  spreadQuantiles,
} from "../common/solar_ensemble.ts";
import type { LagCorrelationParams } from "./request.ts";

/** The spread part of the result. */
export const LagEnsembleSpread = z.object({
  realizations: z.number().int(),
  seed: z.number().int(),
  best_lag: z.object({
    lags: z.array(z.number().int()),
    members: z.array(z.number().int()).openapi({ description: "Members choosing each lag" }),
  }).openapi({ description: "How often each lag is the best one over the members" }),
  r_at_best: SpreadQuantiles.openapi({ description: "The statistic at each member's best lag" }),
  r_at_central_lag: SpreadQuantiles.openapi({
    description: "The statistic at the central series' best lag",
  }),
  p_analytic_at_best: SpreadQuantiles.nullable().openapi({
    description: "Analytic p-value at each member's best lag (not adjusted for the lag " +
      "search); null when N_eff ≤ 2 for every member",
  }),
  fraction_p_below_0_05: z.number().openapi({
    description: "Share of members whose analytic p-value at their best lag is below 0.05",
  }),
  note: z.string(),
}).openapi("LagCorrelationEnsembleSpread");

/** The spread as `compute` builds it. */
export type LagEnsembleSpreadIn = z.input<typeof LagEnsembleSpread>;

/**
 * Repeat the lag table for every member.
 *
 * @param p the request
 * @param ctx the run context (progress, cancel)
 * @param ensemble the solar input's members
 * @param climate the climate series
 * @param window the lag window of the central answer
 * @param preprocess the central answer's preprocessing of an axis (the same function)
 * @param centralBest index of the central answer's best lag in its rows
 */
export function lagEnsembleSpread(
  p: LagCorrelationParams,
  ctx: RunContext,
  ensemble: SolarEnsemble,
  climate: StoredSeries,
  window: { minLag: number; maxLag: number },
  preprocess: (axis: AnalysisAxis) => { x: Float64Array; y: Float64Array },
  centralBest: number,
): LagEnsembleSpreadIn {
  const stat = (r: LagRow) => (p.normalisation === "full" ? r.r_full : r.r);
  const lags: number[] = [], atBest: number[] = [], atCentral: number[] = [], pBest: number[] = [];
  let significant = 0;
  for (let m = 0; m < ensemble.realizations; m++) {
    if (m % 50 === 0 && ctx.cancelled()) throw new CancelledError();
    const axis = analysisAxis(
      [ensemble.member(m), climate],
      ["/solar_run", "/climate"],
      p.resolution,
      p,
      10,
    );
    const s = preprocess(axis);
    const rows = withInputPointers(
      { "*": "/solar_run" },
      () => laggedCorrelationTable(s.x, s.y, window, p.normalisation),
    );
    const best = rows.reduce((b, r, i) => (Math.abs(stat(r)) > Math.abs(stat(rows[b])) ? i : b), 0);
    lags.push(rows[best].lag);
    atBest.push(stat(rows[best]));
    atCentral.push(stat(rows[Math.min(centralBest, rows.length - 1)]));
    const pa = rows[best].p_analytic;
    if (pa !== null) {
      pBest.push(pa);
      if (pa < 0.05) significant++;
    }
  }
  const counts = spreadCounts(lags);
  return {
    realizations: ensemble.realizations,
    seed: ensemble.seed,
    best_lag: { lags: counts.values, members: counts.members },
    r_at_best: spreadQuantiles(atBest)!,
    r_at_central_lag: spreadQuantiles(atCentral)!,
    p_analytic_at_best: spreadQuantiles(pBest),
    fraction_p_below_0_05: significant / ensemble.realizations,
    note: "The solar input's ensemble members, each put through the same axis, preprocessing " +
      "and lag table as the central series; the spread shows how much of the answer depends " +
      "on the solar input's uncertainty. The Monte Carlo test is run for the central series " +
      "only.",
  };
}
