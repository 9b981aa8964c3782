/**
 * From core's typed input errors to the API's problems: a core function throws
 * `InputError` naming its own argument (`field`), the reason and, where one element is at
 * fault, its `index` and `value`; the adapter that called it knows where that argument came
 * from in the request and says so with a map from field to JSON Pointer. Nothing here reads
 * the wording of a message.
 *
 * @module
 */
import { InputError } from "../../../core/errors.ts";
import { InputProblem } from "../../runs/kind.ts";

/**
 * Where the arguments of a core call sit in the request body: the argument's name to a JSON
 * Pointer, or to a function of the error (for an indexed argument such as the k-th series).
 * The key `"*"` catches every other field.
 */
export type FieldPointers = Record<string, string | ((e: InputError) => string)>;

/**
 * The problem for a core `InputError` at the pointer of its field, carrying the field, the
 * machine-readable reason and, when known, the index and a short value. A plain `RangeError`
 * (a core precondition not yet typed) goes to the `"*"` pointer when there is one. Any other
 * error (or an `InputError` whose field has no pointer) is returned unchanged.
 *
 * @param e what was thrown
 * @param pointers field → pointer map of this call
 * @returns the InputProblem, or `e` itself
 * @example
 * ```ts
 * import { InputError } from "../../../core/errors.ts";
 * import { InputProblem } from "../../runs/kind.ts";
 * import { inputProblem } from "./input_problem.ts";
 * import assert from "node:assert/strict";
 * const e = new InputError("Cannot align series: series 1 ...", {
 *   field: "series",
 *   reason: "not_finite",
 *   index: 1,
 * });
 * const p = inputProblem(e, { series: (e) => `/series/${e.index}` });
 * assert.ok(p instanceof InputProblem);
 * assert.equal(p.pointer, "/series/1");
 * assert.deepEqual(p.extra, { field: "series", reason: "not_finite", index: 1 });
 * ```
 */
export function inputProblem(e: unknown, pointers: FieldPointers): unknown {
  if (!(e instanceof InputError)) {
    // A core precondition not yet typed (a plain RangeError) is still the request's fault:
    // it goes to the call's catch-all field rather than to a problem without a pointer.
    const all = pointers["*"];
    if (e instanceof RangeError && typeof all === "string") {
      return new InputProblem(all, e.message, { reason: "invalid" });
    }
    return e;
  }
  const at = pointers[e.field] ?? pointers["*"];
  if (at === undefined) return e;
  const extra: Record<string, unknown> = { field: e.field, reason: e.reason };
  if (e.index !== undefined) extra.index = e.index;
  if (typeof e.value === "number") extra.value = Number.isFinite(e.value) ? e.value : null;
  else if (typeof e.value === "string") extra.value = e.value.slice(0, 200);
  return new InputProblem(typeof at === "string" ? at : at(e), e.message, extra);
}

/**
 * Run a core call; an `InputError` it throws becomes a 422 problem at the pointer of its field.
 *
 * @param pointers field → pointer map of this call (`"*"` for every other field)
 * @param f the call
 * @returns what `f` returns
 * @throws {InputProblem} for an InputError whose field is mapped; anything else unchanged
 * @example
 * ```ts
 * import { resampleMeans } from "../../../core/series/mod.ts";
 * import { withInputPointers } from "./input_problem.ts";
 * import assert from "node:assert/strict";
 * assert.throws(
 *   () => withInputPointers({ to: "/to", "*": "/series" }, () =>
 *     resampleMeans({ time: [2000.5, 2001.5], value: [1, 2] }, "monthly")),
 *   { name: "InputProblem", pointer: "/to" },
 * );
 * ```
 */
export function withInputPointers<T>(pointers: FieldPointers, f: () => T): T {
  try {
    return f();
  } catch (e) {
    throw inputProblem(e, pointers);
  }
}
