/**
 * A reference to another run in a request: its id. The analysis lists such fields in
 * `runRefs`, so the run machinery loads the runs (and a bundle carries them), and reads them
 * with `ctx.resultOf(kind, id, pointer)`.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { EXAMPLE_RUN_ID } from "../../schemas/examples.ts";

/** The form of a run id (UUIDv7, lower-case hex with dashes). */
export const RUN_ID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

/** The id of another run, as a request field. */
export const RunRef = z.string().regex(RUN_ID, "must be a run id (UUIDv7)");

/**
 * A run id field with its description and an example: the placeholder that is plainly not a
 * real run (a run id cannot be stable, see `api/schemas/examples.ts`).
 */
export function runRef(description: string) {
  return RunRef.openapi({ description, example: EXAMPLE_RUN_ID });
}
