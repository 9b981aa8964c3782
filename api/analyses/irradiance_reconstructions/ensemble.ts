/**
 * The ensemble of a reconstruction in the service: members drawn in chunks on the worker pool
 * (core/irradiance/reconstruction_ensemble.ts; member m always from the stream (seed, m), so
 * the chunking and the number of workers do not change a bit), the background scenario added,
 * ready for the band (common/ensemble_members.ts `memberBand`).
 *
 * @module
 */
import { CancelledError, type RunContext } from "../../runs/kind.ts";
import {
  type ReconstructionCells,
  type ReconstructionEnsembleChunk,
  reconstructionEnsemblePlan,
  type ReconstructionModel,
} from "../../../core/irradiance/mod.ts";
import { inputProblem, withInputPointers } from "../common/input_problem.ts";
import { RECONSTRUCTION_ENSEMBLE_CHUNK } from "./tasks.ts";

/** Members of a drawn ensemble. */
export interface DrawnEnsemble {
  /** realizations × cells, member-major, W m-2 (NaN where the cell has no value). */
  members: Float64Array;
  realizations: number;
}

/**
 * Members per chunk: up to 8 chunks, so the pool is busy and progress moves between rounds.
 *
 * @param realizations the members of the ensemble (≥ 1)
 * @returns [first member, count] of each chunk, in order
 */
export function chunkSizes(realizations: number): [number, number][] {
  const per = Math.ceil(realizations / Math.min(8, realizations));
  const out: [number, number][] = [];
  for (let a = 0; a < realizations; a += per) out.push([a, Math.min(per, realizations - a)]);
  return out;
}

/**
 * Draw the ensemble of the reconstruction on the pool and add the background scenario (NaN
 * where it is missing).
 *
 * @param ctx the run context (its pool, progress and cancel flag)
 * @param model the calibrated model
 * @param cells the cells as the reconstruction used them
 * @param options realizations, seed and the background per cell (or null)
 */
export async function drawEnsemble(
  ctx: RunContext,
  model: ReconstructionModel,
  cells: ReconstructionCells,
  options: {
    realizations: number;
    seed: number;
    background: Float64Array | null;
  },
): Promise<DrawnEnsemble> {
  const plan = withInputPointers(
    { "*": "/model" },
    () => reconstructionEnsemblePlan(model, cells),
  );
  const n = plan.cells, N = options.realizations;
  const chunks: ReconstructionEnsembleChunk[] = chunkSizes(N).map(([first, count]) => ({
    plan,
    seed: options.seed,
    first,
    count,
  }));
  const members = new Float64Array(N * n);
  let done = 0;
  // in rounds of 4 chunks, so that a cancel is seen between rounds
  for (let c = 0; c < chunks.length; c += 4) {
    const round = chunks.slice(c, c + 4);
    let outs: Float64Array[];
    try {
      outs = await ctx.parallel<ReconstructionEnsembleChunk, Float64Array>(
        RECONSTRUCTION_ENSEMBLE_CHUNK,
        round,
      );
    } catch (e) {
      // a saturating mapping without an admissible draw is a property of the model run
      throw inputProblem(e, { "*": "/model" });
    }
    outs.forEach((o, j) => members.set(o, round[j].first * n));
    done += round.reduce((s, r) => s + r.count, 0);
    if (ctx.cancelled()) throw new CancelledError();
    ctx.progress(0.1 + (0.8 * done) / N);
  }
  const bg = options.background;
  if (bg) {
    for (let m = 0; m < N; m++) {
      for (let i = 0; i < n; i++) members[m * n + i] += bg[i];
    }
  }
  return { members, realizations: N };
}
