/**
 * Unknown request fields. zod drops keys a schema does not name, so a misspelt option
 * (`"grid"` for `"periods"`) would silently run with the defaults; instead every key of the
 * raw body that did not survive validation is reported as a 422 naming it.
 *
 * @module
 */
import { type FieldError, pointerToken } from "../problems.ts";

function isPlainObject(v: unknown): v is Record<string, unknown> {
  return v !== null && typeof v === "object" && !Array.isArray(v) && !ArrayBuffer.isView(v);
}

/**
 * Keys present in `raw` but absent from the validated `parsed` value at the same place.
 * Only places where both are plain objects (or both arrays) are compared, so a schema that
 * transforms a value into another shape is never misreported.
 */
export function unknownFields(raw: unknown, parsed: unknown, pointer = ""): FieldError[] {
  const out: FieldError[] = [];
  if (Array.isArray(raw) && Array.isArray(parsed)) {
    const n = Math.min(raw.length, parsed.length);
    for (let i = 0; i < n; i++) out.push(...unknownFields(raw[i], parsed[i], `${pointer}/${i}`));
    return out;
  }
  if (!isPlainObject(raw) || !isPlainObject(parsed)) return out;
  for (const k of Object.keys(raw)) {
    const p = `${pointer}/${pointerToken(k)}`;
    if (!(k in parsed)) {
      out.push({
        pointer: p,
        message: `unknown field "${k}"; the request schema at /v1/openapi.json lists the fields`,
      });
    } else {
      out.push(...unknownFields(raw[k], parsed[k], p));
    }
  }
  return out;
}
