/**
 * Unknown request fields. zod drops keys a schema does not name, so a misspelt option
 * (`"grid"` for `"periods"`) would silently run with the defaults; instead every key of the
 * raw body that did not survive validation is reported as a 422 naming it.
 *
 * Bounded: at most `max` fields are named (pointers and messages are built only for those);
 * the others are counted natively (`Object.keys(...).length`), in one walk without recursion
 * that only descends into known fields, so a body with millions of unknown keys gets a problem
 * of fixed size for one enumeration of its keys (about 1 s for two million on this machine,
 * as long as parsing them).
 *
 * @module
 */
import { type FieldError, MAX_FIELD_ERRORS, pointerToken } from "../problems.ts";

function isPlainObject(v: unknown): v is Record<string, unknown> {
  return v !== null && typeof v === "object" && !Array.isArray(v) && !ArrayBuffer.isView(v);
}

/**
 * Keys present in `raw` but absent from the validated `parsed` value at the same place: the
 * first `max` as field errors (each object's own before those inside it), and how many more. Only places where both are plain objects
 * (or both arrays) are compared, so a schema that transforms a value into another shape is
 * never misreported.
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { findUnknownFields } from "./unknown_fields.ts";
 * const raw = { a: 1, b: { c: 2, typo: 3 }, extra: [1] };
 * const found = findUnknownFields(raw, { a: 1, b: { c: 2 } }, 1);
 * assert.deepEqual(found.errors.map((e) => e.pointer), ["/extra"]);
 * assert.equal(found.omitted, 1); // "/b/typo"
 * ```
 */
export function findUnknownFields(
  raw: unknown,
  parsed: unknown,
  max: number = MAX_FIELD_ERRORS,
): { errors: FieldError[]; omitted: number } {
  const errors: FieldError[] = [];
  let omitted = 0;
  // Depth-first, in document order: [raw, parsed, pointer].
  const stack: [unknown, unknown, string][] = [[raw, parsed, ""]];
  while (stack.length) {
    const [r, p, pointer] = stack.pop()!;
    const next: [unknown, unknown, string][] = [];
    if (Array.isArray(r) && Array.isArray(p)) {
      const n = Math.min(r.length, p.length);
      for (let i = 0; i < n; i++) {
        if (typeof r[i] === "object" && r[i] !== null) next.push([r[i], p[i], `${pointer}/${i}`]);
      }
    } else if (isPlainObject(r) && isPlainObject(p)) {
      // The known keys are few (the schema's): count the unknown ones natively and walk the
      // raw keys only until enough are named, so two million unknown keys cost one count.
      let known = 0;
      for (const k in p) {
        if (!Object.hasOwn(p, k) || !Object.hasOwn(r, k)) continue;
        known++;
        if (typeof r[k] === "object" && r[k] !== null) {
          next.push([r[k], p[k], `${pointer}/${pointerToken(k)}`]);
        }
      }
      let unknown = Object.keys(r).length - known;
      if (unknown > 0) {
        for (const k in r) {
          if (errors.length >= max || unknown === 0) break;
          if (!Object.hasOwn(r, k) || Object.hasOwn(p, k)) continue;
          errors.push({
            pointer: `${pointer}/${pointerToken(k)}`,
            message: `unknown field "${k.length > 100 ? k.slice(0, 100) + "…" : k}"; ` +
              "the request schema at /v1/openapi.json lists the fields",
          });
          unknown--;
        }
        omitted += unknown;
      }
    }
    for (let i = next.length - 1; i >= 0; i--) stack.push(next[i]);
  }
  return { errors, omitted };
}

/** The first {@link MAX_FIELD_ERRORS} unknown fields (see {@link findUnknownFields}). */
export function unknownFields(raw: unknown, parsed: unknown): FieldError[] {
  return findUnknownFields(raw, parsed).errors;
}
