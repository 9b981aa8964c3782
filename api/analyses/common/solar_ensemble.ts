/**
 * A solar input's ensemble: when a solar–climate analysis takes its solar series from a
 * reconstruction or forcing run that drew members, each member as a series (for the analysis
 * to be repeated member by member), and the summary of an answer's spread over the members
 * (the band statement reaches the run through the inherited cautions of its input runs).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { quantileSorted } from "d3-array";
import type { RunContext } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import { checkStoredMembers } from "./ensemble_members.ts";
import { irradianceReconstructions } from "../irradiance_reconstructions/mod.ts";
import { forcing } from "../forcing/mod.ts";

/** The members of a solar run, each available as a series like its central one. */
export interface SolarEnsemble {
  realizations: number;
  seed: number;
  /** Member m as a series with the central series' times and metadata. */
  member(m: number): StoredSeries;
}

/**
 * The ensemble of run `id` (a reconstruction's or a forcing run's, read through its result
 * schema), beside its central series (`solarSeriesFromRun`); null when the run has none.
 *
 * @param ctx the run context
 * @param id run id
 * @param central the central series taken from the run
 * @param pointer JSON Pointer of the request field
 * @throws {InputProblem} at `pointer` when the members do not match the central series
 */
export function solarEnsembleFromRun(
  ctx: RunContext,
  id: string,
  central: StoredSeries,
  pointer: string,
): SolarEnsemble | null {
  const kind = ctx.run(id).kind;
  const found = kind === irradianceReconstructions.kind
    ? (({ ensemble, outputs }) => ({ e: ensemble, o: outputs.tsi }))(
      ctx.resultOf(irradianceReconstructions, id, pointer),
    )
    : kind === forcing.kind
    ? (({ ensemble, outputs }) => ({ e: ensemble, o: outputs.forcing }))(
      ctx.resultOf(forcing, id, pointer),
    )
    : null;
  if (!found?.e) return null;
  const { e, o } = found;
  // the central series leaves out the output's empty cells: the members leave out the same
  const keep = o.value.flatMap((v, i) => (v === null ? [] : [i]));
  checkStoredMembers(e, keep.length === central.n ? o.value.length : -1, pointer, id);
  return {
    realizations: e.realizations,
    seed: e.seed,
    member: (m) => ({
      ...central,
      id: `${central.id}#member${m}`,
      value: Float64Array.from(keep, (i) => e.members[m][i] ?? NaN),
    }),
  };
}

/** The 2.5 %, 50 % and 97.5 % points of an answer over the members. */
export const SpreadQuantiles = z.object({
  p025: z.number(),
  median: z.number(),
  p975: z.number(),
}).openapi("SpreadQuantiles");

/**
 * Quantiles (R's type 7, d3-array) of the finite values; null when there is none.
 *
 * @param values one answer per member
 */
export function spreadQuantiles(values: readonly number[]): z.input<typeof SpreadQuantiles> | null {
  const v = values.filter(Number.isFinite).sort((a, b) => a - b);
  if (v.length === 0) return null;
  return {
    p025: quantileSorted(v, 0.025)!,
    median: quantileSorted(v, 0.5)!,
    p975: quantileSorted(v, 0.975)!,
  };
}

/** How many members chose each value (e.g. a best lag), in increasing order of the value. */
export function spreadCounts(values: readonly number[]): { values: number[]; members: number[] } {
  const counts = new Map<number, number>();
  for (const v of values) counts.set(v, (counts.get(v) ?? 0) + 1);
  const keys = [...counts.keys()].sort((a, b) => a - b);
  return { values: keys, members: keys.map((k) => counts.get(k)!) };
}
