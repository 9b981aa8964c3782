/**
 * The spread of an attribution's solar answer over the members of its solar regressor's
 * ensemble: the regression (common axis, lag search, coefficients) repeated for every member,
 * and the distribution of the solar sensitivity, its lag, its p-value and the implied
 * maximum-minus-minimum response.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { CancelledError, type RunContext } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import type { AttributionResult } from "../../../core/climate/mod.ts";
import {
  type SolarEnsemble,
  spreadCounts,
  SpreadQuantiles,
  spreadQuantiles,
} from "../common/solar_ensemble.ts";

/** The spread part of the result. */
export const AttributionEnsembleSpread = z.object({
  realizations: z.number().int(),
  seed: z.number().int(),
  sensitivity: SpreadQuantiles.openapi({
    description: "The solar coefficient over the members, in the result's sensitivity units",
  }),
  lag: z.object({
    lags: z.array(z.number().int()),
    members: z.array(z.number().int()).openapi({ description: "Members choosing each lag" }),
  }).openapi({ description: "How often each solar lag is chosen over the members" }),
  p_value: SpreadQuantiles.nullable().openapi({
    description: "The solar coefficient's naive p-value over the members (the chosen lag " +
      "taken as fixed; only the central run pays for the lag search); null when undefined",
  }),
  fraction_p_below_0_05: z.number(),
  max_minus_min: SpreadQuantiles.openapi({
    description: "Sensitivity × each member's cycle amplitude (or the requested one)",
  }),
  note: z.string(),
}).openapi("AttributionEnsembleSpread");

/** The spread as `compute` builds it. */
export type AttributionEnsembleSpreadIn = z.input<typeof AttributionEnsembleSpread>;

/** What one member's regression gives. */
export interface MemberFit {
  fit: AttributionResult;
  /** The member's cycle amplitude (or the requested one). */
  amplitude: number;
}

/**
 * Repeat the regression for every member, with the solar regressor replaced by the member.
 *
 * @param ctx the run context (cancel)
 * @param ensemble the solar regressor's members
 * @param solarIndex index of the solar regressor among the request's regressors
 * @param name its name
 * @param fitWith the central answer's regression for a given list of regressor series
 * @param series the central regressor series
 */
export function attributionEnsembleSpread(
  ctx: RunContext,
  ensemble: SolarEnsemble,
  solarIndex: number,
  name: string,
  fitWith: (series: StoredSeries[]) => MemberFit,
  series: StoredSeries[],
): AttributionEnsembleSpreadIn {
  const sens: number[] = [], lags: number[] = [], pv: number[] = [], mm: number[] = [];
  let significant = 0;
  for (let m = 0; m < ensemble.realizations; m++) {
    if (m % 20 === 0 && ctx.cancelled()) throw new CancelledError();
    const withMember = series.map((s, k) => (k === solarIndex ? ensemble.member(m) : s));
    const { fit, amplitude } = fitWith(withMember);
    const c = fit.coefficients[solarIndex + 1];
    sens.push(c.estimate);
    lags.push(fit.lags[name]);
    mm.push(c.estimate * amplitude);
    if (c.pValue !== null && Number.isFinite(c.pValue)) {
      pv.push(c.pValue);
      if (c.pValue < 0.05) significant++;
    }
  }
  const counts = spreadCounts(lags);
  return {
    realizations: ensemble.realizations,
    seed: ensemble.seed,
    sensitivity: spreadQuantiles(sens)!,
    lag: { lags: counts.values, members: counts.members },
    p_value: spreadQuantiles(pv),
    fraction_p_below_0_05: significant / ensemble.realizations,
    max_minus_min: spreadQuantiles(mm)!,
    note: "The solar regressor's ensemble members, each put through the same axis, lag " +
      "search and regression as the central series: the spread shows how much of the solar " +
      "answer depends on the solar input's uncertainty (its sensitivity interval does not " +
      "include it).",
  };
}
