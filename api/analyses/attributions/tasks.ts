/**
 * Worker tasks of the "attributions" analysis: one chunk of surrogates of the test that pays
 * for the solar lag search (core/climate/lag_search_surrogate_test.ts), mapped over the pool
 * with `ctx.parallel`.
 *
 * @module
 */
import type { Task } from "../../runs/kind.ts";
import { lagSearchSurrogateChunk } from "../../../core/climate/lag_search_surrogate_test.ts";

/** Task name of one chunk of surrogates (stored runs replay by it: never rename). */
export const LAG_SEARCH_CHUNK = "climate.lag_search_chunk";

export const attributionTasks: Record<string, Task> = {
  [LAG_SEARCH_CHUNK]: lagSearchSurrogateChunk,
};
