/**
 * Worker tasks of the "field-composites" analysis: one block of random epoch sets × cells of
 * the Monte Carlo field significance (core/field/field_composite.ts).
 *
 * @module
 */
import type { Task } from "../../runs/kind.ts";
import { fieldCompositeChunk } from "../../../core/field/mod.ts";

/** Task name of one chunk (stored runs replay by it: never rename). */
export const FIELD_COMPOSITE_CHUNK = "field.composite_chunk";

export const fieldCompositeTasks: Record<string, Task> = {
  [FIELD_COMPOSITE_CHUNK]: fieldCompositeChunk,
};
