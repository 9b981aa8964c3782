/**
 * The id patterns of the API, in one place: routes, bundle import and the run machinery check
 * ids with these, so an id that can be stored can always be fetched and put in a header.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
export { SERIES_ID_PATTERN } from "./series_ref.ts";

/** A run id: a UUID in its canonical lowercase 8-4-4-4-12 form (runs get UUIDv7s). */
export const RUN_ID_PATTERN = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

/** A run id in a request. */
export const RunIdString = z.string().regex(RUN_ID_PATTERN, "must be a run id (UUIDv7)");

/** An owner id: a short lowercase name. */
export const OWNER_ID_PATTERN = /^[a-z0-9][a-z0-9_-]{0,62}$/;

/** `{id}` in a run path. */
export const RunIdParam = z.object({
  id: RunIdString.openapi({ param: { name: "id", in: "path" } }),
});
