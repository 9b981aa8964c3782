/**
 * Worker tasks of the "spectra" analysis: Lomb–Scargle power on a chunk of the frequency grid,
 * and a chunk of Monte Carlo replicates of the periodogram null (names kept so stored runs
 * replay).
 *
 * @module
 */
import type { Task } from "../../runs/kind.ts";
import { lombScargleChunk, monteCarloMaximaChunk } from "../../../core/spectral/mod.ts";

export const spectraTasks: Record<string, Task> = {
  "spectral.monte_carlo_maxima": monteCarloMaximaChunk,
  "spectral.lomb_scargle_chunk": lombScargleChunk,
};
