/**
 * Core functions refuse bad input with an `InputError` that names the offending argument
 * (`field`), the reason and, where one element is at fault, its index and value. An analysis
 * maps those fields to the JSON Pointers of its request here, never by reading the wording of
 * the message.
 *
 * @module
 */
import { InputError } from "../../../core/errors.ts";
import { InputProblem } from "../../runs/kind.ts";

/**
 * Where each core field points in the request: a pointer, or a function of the element index
 * (e.g. `(i) => \`/groups/area/${i}\``).
 */
export type FieldPointers = Record<string, string | ((index: number | undefined) => string)>;

/**
 * Run `f`; an `InputError` it throws becomes a 422 problem at the pointer its field maps to
 * (`fallback` for fields not listed), carrying field, reason, index and value. Other errors
 * pass unchanged.
 */
export function withInputPointers<T>(f: () => T, pointers: FieldPointers, fallback: string): T {
  try {
    return f();
  } catch (e) {
    throw toInputProblem(e, pointers, fallback);
  }
}

/** The problem for an error thrown by core (unchanged when it is not an `InputError`). */
export function toInputProblem(e: unknown, pointers: FieldPointers, fallback: string): unknown {
  if (!(e instanceof InputError)) return e;
  const to = pointers[e.field];
  const pointer = typeof to === "function" ? to(e.index) : to ?? fallback;
  const extra: Record<string, unknown> = { field: e.field, reason: e.reason };
  if (e.index !== undefined) extra.index = e.index;
  if (typeof e.value === "number") extra.value = Number.isFinite(e.value) ? e.value : null;
  else if (typeof e.value === "string") extra.value = e.value.slice(0, 200);
  return new InputProblem(pointer, e.message, extra);
}
