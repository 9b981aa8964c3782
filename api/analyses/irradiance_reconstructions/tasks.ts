/**
 * Worker tasks of the "irradiance-reconstructions" analysis: one chunk of ensemble members
 * (core/irradiance/reconstruction_ensemble.ts), mapped over the pool with `ctx.parallel`.
 *
 * @module
 */
import type { Task } from "../../runs/kind.ts";
import { reconstructionEnsembleChunk } from "../../../core/irradiance/mod.ts";

/** Task name of one chunk of members (stored runs replay by it: never rename). */
export const RECONSTRUCTION_ENSEMBLE_CHUNK = "irradiance.reconstruction_ensemble_chunk";

export const reconstructionTasks: Record<string, Task> = {
  [RECONSTRUCTION_ENSEMBLE_CHUNK]: reconstructionEnsembleChunk,
};
