/**
 * Worker tasks of the "spectral-irradiance-reconstructions" analysis: one chunk of ensemble
 * members of every band (core/irradiance/spectral_band_ensemble.ts), mapped over the pool with
 * `ctx.parallel`.
 *
 * @module
 */
import type { Task } from "../../runs/kind.ts";
import { spectralBandEnsembleChunk } from "../../../core/irradiance/mod.ts";

/** Task name of one chunk of spectral members (stored runs replay by it: never rename). */
export const SPECTRAL_ENSEMBLE_CHUNK = "irradiance.spectral_ensemble_chunk";

export const spectralReconstructionTasks: Record<string, Task> = {
  [SPECTRAL_ENSEMBLE_CHUNK]: spectralBandEnsembleChunk,
};
