/**
 * The series, runs and gridded fields loaded for a run, looked up by id, and the typed result
 * of a loaded run: what `compute` (through its `RunContext`) and `estimateSeconds` read.
 *
 * @module
 */
import { type EstimateInputs, InputProblem, type RunInputs } from "./kind.ts";

/** Series, runs and fields loaded for a run, by id. */
export type LoadedInputs = RunInputs;

/**
 * Lookups of loaded inputs by id. Asking for one that was not loaded is a defect of the
 * analysis (its request names every input), not bad input: a plain Error. A run's result is
 * read through the result schema of the analysis that made it (`resultOf`): a run of another
 * kind, without a result, or of an older shape is an input problem at `pointer`.
 */
export function loadedInputs(inputs: LoadedInputs): EstimateInputs {
  return {
    series(id) {
      const s = inputs.series[id];
      if (!s) throw new Error(`series ${id} was not loaded for this run`);
      return s;
    },
    run(id) {
      const r = inputs.runs[id];
      if (!r) throw new Error(`run ${id} was not loaded for this run`);
      return r;
    },
    field(id) {
      const f = inputs.fields?.[id];
      if (!f) throw new Error(`field ${id} was not loaded for this run`);
      return f;
    },
    resultOf(kind, id, pointer) {
      const r = inputs.runs[id];
      if (!r) throw new InputProblem(pointer, `run ${id} was not loaded`);
      if (r.kind !== kind.kind) {
        throw new InputProblem(
          pointer,
          `run ${id} is a ${r.kind} run; a ${kind.kind} run is needed`,
          {
            kind: r.kind,
          },
        );
      }
      if (r.status !== "succeeded" || r.result === null) {
        throw new InputProblem(pointer, `run ${id} has no result (status ${r.status})`, {
          status: r.status,
        });
      }
      const parsed = kind.result.safeParse(r.result);
      if (!parsed.success) {
        throw new InputProblem(
          pointer,
          `run ${id} holds a ${kind.kind} result of an older shape; replay it or make a new one`,
          { algorithm_version: r.algorithm_version },
        );
      }
      return parsed.data;
    },
  };
}
