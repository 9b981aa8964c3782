/**
 * The ensemble of a reconstruction in the service: members drawn in chunks on the worker pool
 * (core/irradiance/reconstruction_ensemble.ts; member m always from the stream (seed, m), so
 * the chunking and the number of workers do not change a bit), the background scenario added,
 * ready for the band (common/ensemble_members.ts `memberBand`).
 *
 * @module
 */
import type { RunContext } from "../../runs/kind.ts";
import {
  type ReconstructionCells,
  type ReconstructionEnsembleChunk,
  reconstructionEnsemblePlan,
  type ReconstructionModel,
} from "../../../core/irradiance/mod.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { drawMembersOnPool } from "../common/ensemble_members.ts";
import { RECONSTRUCTION_ENSEMBLE_CHUNK } from "./tasks.ts";

/** Members of a drawn ensemble. */
export interface DrawnEnsemble {
  /** realizations × cells, member-major, W m-2 (NaN where the cell has no value). */
  members: Float64Array;
  realizations: number;
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
  const members = await drawMembersOnPool<ReconstructionEnsembleChunk>(
    ctx,
    RECONSTRUCTION_ENSEMBLE_CHUNK,
    N,
    n,
    (first, count) => ({ plan, seed: options.seed, first, count }),
  );
  const bg = options.background;
  if (bg) {
    for (let m = 0; m < N; m++) {
      for (let i = 0; i < n; i++) members[m * n + i] += bg[i];
    }
  }
  return { members, realizations: N };
}
