/**
 * A reference to another run by its id, for analyses that read a run's result (a model, a
 * reconstruction). The run is loaded by the run machinery when the analysis lists it in
 * `runRefs`, and read with `ctx.resultOf(kind, id, pointer)`.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";

/** The form of a run id (UUIDv7, lower-case hex with dashes). */
export const RUN_ID_PATTERN = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

/** A run id field with its description. */
export function runRef(description: string) {
  return z.string().regex(RUN_ID_PATTERN, "must be a run id (UUIDv7)").openapi({
    description,
    example: "0190a5f0-3c2e-7a41-9b1e-6d0c2f7e8a11",
  });
}
