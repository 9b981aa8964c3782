/**
 * Input refused by core, as a 422 problem naming the request field: a core `InputError` names
 * the offending argument (`field`), and each adapter says which request field that argument
 * came from. The problem carries core's reason (and the index or value when there is one);
 * nothing depends on the wording of core's message.
 *
 * @module
 */
import { InputError } from "../../../core/errors.ts";
import { InputProblem } from "../../runs/kind.ts";

/**
 * Run `f`; a core `InputError` becomes an {@link InputProblem} at the pointer `pointers` gives
 * for its field (else `fallback`), and any other `RangeError` from core one at `fallback`.
 *
 * @param fallback JSON Pointer into the request body for errors of unlisted fields
 * @param f the core call
 * @param pointers request pointer by core argument name, e.g. `{ prominence: "/prominence" }`
 */
export function asInputProblem<T>(
  fallback: string,
  f: () => T,
  pointers: Record<string, string> = {},
): T {
  try {
    return f();
  } catch (e) {
    if (e instanceof InputError) {
      throw new InputProblem(pointers[e.field] ?? fallback, e.message, {
        reason: e.reason,
        ...(e.index !== undefined ? { index: e.index } : {}),
      });
    }
    if (e instanceof RangeError) throw new InputProblem(fallback, e.message);
    throw e;
  }
}
