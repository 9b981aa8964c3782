/**
 * A solar series taken from another run's output (a TSI reconstruction's `tsi`, a forcing
 * run's `forcing`), for the solar–climate analyses that accept a run in place of a series.
 * The output is read through the result schema of the analysis that made the run
 * (`ctx.resultOf`), chosen by the run's kind.
 *
 * @module
 */
import { InputProblem, type OutputSeries, type RunContext } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import { inferResolution } from "../../../core/time/mod.ts";
import { irradianceReconstructions } from "../irradiance_reconstructions/mod.ts";
import { forcing } from "../forcing/mod.ts";

/** The analyses whose runs can stand for a solar series, and the output each gives. */
export const SOLAR_RUN_OUTPUTS = {
  [irradianceReconstructions.kind]: "tsi",
  [forcing.kind]: "forcing",
} as const;

/** The output of a run that stands for a solar series, by the run's kind; null for others. */
function solarOutput(
  ctx: RunContext,
  id: string,
  pointer: string,
): { name: string; o: OutputSeries } | null {
  const kind = ctx.run(id).kind;
  if (kind === irradianceReconstructions.kind) {
    return { name: "tsi", o: ctx.resultOf(irradianceReconstructions, id, pointer).outputs.tsi };
  }
  if (kind === forcing.kind) {
    return { name: "forcing", o: ctx.resultOf(forcing, id, pointer).outputs.forcing };
  }
  return null;
}

/**
 * The `tsi` (else `forcing`) output of run `id` as a series-like object for the alignment.
 * Cells without a value (null) are left out, as gaps are in a stored series, so the alignment's
 * coverage rules decide what a gap does to a month or a year (a year with 9 months is no
 * annual value).
 *
 * @param ctx the run context (the run must be listed by the analysis' `runRefs`)
 * @param id run id
 * @param pointer JSON Pointer of the request field, for problems
 * @returns the output as a series with id `run:<id>/<output>`
 * @throws {InputProblem} at `pointer` when the run is of another kind, has no result of the
 *   current shape, or its output has under 2 points
 */
export function solarSeriesFromRun(ctx: RunContext, id: string, pointer: string): StoredSeries {
  const run = ctx.run(id);
  const found = solarOutput(ctx, id, pointer);
  if (!found) {
    throw new InputProblem(
      pointer,
      `run ${id} is a ${run.kind} run; a solar series comes from a ${
        Object.keys(SOLAR_RUN_OUTPUTS).join(" or ")
      } run`,
      { kind: run.kind, accepted_kinds: Object.keys(SOLAR_RUN_OUTPUTS) },
    );
  }
  const { name, o } = found;
  const keep = o.value.flatMap((v, i) => (v === null ? [] : [i]));
  if (keep.length < 2) {
    throw new InputProblem(
      pointer,
      `output ${name} of run ${id} has ${keep.length} value(s); at least 2 are needed`,
    );
  }
  const time = Float64Array.from(keep, (i) => o.time[i]);
  const value = Float64Array.from(keep, (i) => o.value[i]!);
  return {
    id: `run:${id}/${name}`,
    name: o.name,
    quantity: o.quantity,
    units: o.units,
    description: o.description ?? null,
    source: `output ${name} of run ${id}`,
    version: null,
    resolution: inferResolution(time),
    n: time.length,
    start: time[0],
    end: time[time.length - 1],
    derived_from: id,
    created_at: run.created_at,
    time,
    value,
    uncertainty: null,
  };
}
