/**
 * A reference to another run in a request: its id. The analysis lists such fields in
 * `runRefs`, so the run machinery loads the runs (and a bundle carries them).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";

/** A run id (UUIDv7). */
export const RUN_ID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

/** The id of another run, as a request field. */
export const RunRef = z.string().regex(RUN_ID, "must be a run id (UUIDv7)");
