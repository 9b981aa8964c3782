/**
 * The series, runs and gridded fields loaded for a run, looked up by id: what `compute`
 * (through its `RunContext`) and `estimateSeconds` read.
 *
 * @module
 */
import type { EstimateInputs, RunInputs } from "./kind.ts";

/** Series, runs and fields loaded for a run, by id. */
export type LoadedInputs = RunInputs;

/**
 * Lookups of loaded inputs by id. Asking for one that was not loaded is a defect of the
 * analysis (its request names every input), not bad input: a plain Error.
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
  };
}
