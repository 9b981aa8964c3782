/**
 * A solar series taken from another run's output (a TSI reconstruction's `tsi`, a forcing
 * run's `forcing`), for the solar–climate analyses that accept a run in place of a series.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import { inferResolution } from "../../../core/time/mod.ts";
import { OutputSeriesSchema } from "./result_parts.ts";

/** Outputs a solar input may be taken from, in order of preference. */
export const SOLAR_OUTPUTS = ["tsi", "forcing"] as const;

/** The outputs part of a result, each output checked against the output contract. */
const SolarOutputs = z.object({
  outputs: z.object({
    tsi: OutputSeriesSchema.optional(),
    forcing: OutputSeriesSchema.optional(),
  }),
});

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
 * @throws {InputProblem} at `pointer` when the run has no such output or it has under 2 points
 */
export function solarSeriesFromRun(ctx: RunContext, id: string, pointer: string): StoredSeries {
  // The reconstruction and forcing analyses do not publish result schemas yet: their outputs
  // are checked here against the shared output contract (ctx.resultOf replaces this once they
  // do).
  const run = ctx.run(id);
  const parsed = SolarOutputs.safeParse(run.result);
  const outputs = parsed.success ? parsed.data.outputs : {};
  const name = SOLAR_OUTPUTS.find((k) => outputs[k]);
  if (!name) {
    throw new InputProblem(
      pointer,
      `run ${id} (${run.kind}) has no ${
        SOLAR_OUTPUTS.join(" or ")
      } output to use as a solar series`,
    );
  }
  const o = outputs[name]!;
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
