/**
 * A reference to a stored gridded field in a request: its id. Field analyses list such fields
 * in `fieldRefs`, so the run machinery loads the time steps they need, records the field as an
 * input of the run (it cannot be deleted while the run exists) and hands it to compute as
 * `ctx.field(id)`.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { FIELD_ID_PATTERN } from "../../store/field_types.ts";
import { DEMO_FIELD } from "../../schemas/examples.ts";

/** The id of a stored field, as a request field. */
export const FieldId = z.string().regex(
  FIELD_ID_PATTERN,
  "must be a field id: field:sha256:<64 hex> (POST /v1/fields answers it)",
);

/** A field id with its description and an example. */
export function fieldRef(description: string) {
  return FieldId.openapi({
    description,
    example: DEMO_FIELD,
  });
}
