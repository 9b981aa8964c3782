/**
 * Worker tasks of the "solar-signal-maps" analysis: the map's statistics for one block of cells
 * (core/field/solar_signal_map.ts), and one block of surrogates × cells of the Monte Carlo
 * field significance (core/field/field_significance_monte_carlo.ts), mapped over
 * the pool (or the worker processes of several machines) with `ctx.parallel`. The chunks'
 * float32 products run on the thread's engine (OpenBLAS where it loads and `SUNLAG_BLAS` is not
 * `off`, else WebAssembly: api/workers/openblas_product.ts); the tallies are the same either
 * way.
 *
 * @module
 */
import type { Task } from "../../runs/kind.ts";
import { fieldSignificanceChunk, solarSignalMapCells } from "../../../core/field/mod.ts";
import type { FieldAnalysisInputs, FieldSignificanceChunkInput } from "../../../core/field/mod.ts";
import { productEngine } from "../../workers/openblas_product.ts";

/** Task name of one chunk (stored runs replay by it: never rename). */
export const FIELD_SIGNIFICANCE_CHUNK = "field.significance_chunk";

/** Task name of the map's statistics for a block of cells (never rename). */
export const FIELD_MAP_CELLS = "field.map_cells";

export const solarSignalMapTasks: Record<string, Task> = {
  [FIELD_MAP_CELLS]: (input: FieldAnalysisInputs, control) => solarSignalMapCells(input, control),
  [FIELD_SIGNIFICANCE_CHUNK]: (input: FieldSignificanceChunkInput, control) =>
    fieldSignificanceChunk(input, productEngine(), control),
};
