/**
 * Named pure tasks that run-kind computations may farm out with `ctx.parallel(name, inputs)`.
 * Each task is a pure function of its (structured-clonable) input; the worker pool and the
 * in-thread fallback both call these same functions, so results never depend on where they ran.
 * Register a task by adding one entry (precise edits only; several areas add tasks here).
 *
 * @module
 */

import { surrogateLagChunk } from "../../core/climate/surrogate_lag_test.ts";

// deno-lint-ignore no-explicit-any
export type Task = (input: any) => any;

export const TASKS: Record<string, Task> = {
  "climate.surrogate_lag_chunk": surrogateLagChunk,
};
