/**
 * Worker tasks of the "solar-signal-maps" analysis: one block of surrogates × cells of the
 * Monte Carlo field significance (core/field/field_significance_monte_carlo.ts), mapped over
 * the pool (or the worker processes of several machines) with `ctx.parallel`.
 *
 * @module
 */
import type { Task } from "../../runs/kind.ts";
import { fieldSignificanceChunk } from "../../../core/field/mod.ts";
import type { FieldSignificanceChunkInput } from "../../../core/field/mod.ts";

/** Task name of one chunk (stored runs replay by it: never rename). */
export const FIELD_SIGNIFICANCE_CHUNK = "field.significance_chunk";

export const solarSignalMapTasks: Record<string, Task> = {
  [FIELD_SIGNIFICANCE_CHUNK]: (input: FieldSignificanceChunkInput, control) =>
    fieldSignificanceChunk(input, undefined, control),
};
