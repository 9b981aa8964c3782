/**
 * The series and runs loaded for a run, looked up by id: what `compute` (through its
 * `RunContext`) and `estimateSeconds` read.
 *
 * @module
 */
import type { RunRecord, StoredSeries } from "../store/types.ts";
import type { EstimateInputs } from "./kind.ts";

/** Series and runs loaded for a run, by id. */
export interface LoadedInputs {
  series: Record<string, StoredSeries>;
  runs: Record<string, RunRecord>;
}

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
  };
}
