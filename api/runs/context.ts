/**
 * The RunContext an analysis' `compute` sees, on its own (apart from the run service) so that
 * a compute worker loads it without the service and the store behind it.
 *
 * @module
 */
import type { RunContext, RunInputs } from "./kind.ts";
import { loadedInputs } from "./loaded_inputs.ts";

/** Build the RunContext seen by compute. */
export function makeContext(
  inputs: RunInputs,
  hooks: { progress(f: number): void; isCancelled(): boolean },
  parallel: <I, O>(task: string, chunks: I[]) => Promise<O[]>,
): RunContext {
  let reported = 0;
  return {
    ...loadedInputs(inputs),
    // Progress never goes back (a kind may report 0.05 + 0.9·k/n, then 0.95, and float
    // rounding makes the second smaller than the first).
    progress: (f) => hooks.progress(reported = Math.max(reported, Math.min(1, Math.max(0, f)))),
    cancelled: () => hooks.isCancelled(),
    parallel: (task, chunks) => parallel(task, chunks),
  };
}
