/**
 * From core's typed input errors to the API's problems: a core function throws
 * `InputError` naming its own argument (`field`), the element's `index` and a `reason`; the
 * adapter that called it knows where that argument came from in the request and says so with a
 * map from field to JSON Pointer. Nothing here reads the wording of a message.
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
 * The problem for a core `InputError` at the pointer of its field (with the machine-readable
 * `reason` beside the message); any other error is returned unchanged.
 *
 * @param e what was thrown
 * @param pointers field → pointer map of this call
 * @returns the InputProblem, or `e` itself when it is not an InputError or its field has no
 *   pointer
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
 * assert.deepEqual(p.extra, { reason: "not_finite" });
 * ```
 */
export function inputProblem(e: unknown, pointers: FieldPointers): unknown {
  if (!(e instanceof InputError)) return e;
  const at = pointers[e.field] ?? pointers["*"];
  if (at === undefined) return e;
  return new InputProblem(typeof at === "string" ? at : at(e), e.message, { reason: e.reason });
}

/**
 * Run a core call; an `InputError` it throws becomes a 422 problem at the pointer of its field.
 *
 * @param pointers field → pointer map of this call
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
