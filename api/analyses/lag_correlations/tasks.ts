/**
 * Worker tasks of the "lag-correlations" analysis: one chunk of surrogates of the Monte Carlo
 * test (core/climate/surrogate_lag_test.ts), mapped over the pool with `ctx.parallel`.
 *
 * @module
 */
import type { Task } from "../../runs/kind.ts";
import { surrogateLagChunk } from "../../../core/climate/surrogate_lag_test.ts";

/** Task name of one chunk of surrogates (stored runs replay by it: never rename). */
export const SURROGATE_LAG_CHUNK = "climate.surrogate_lag_chunk";

export const lagCorrelationTasks: Record<string, Task> = {
  [SURROGATE_LAG_CHUNK]: surrogateLagChunk,
};
