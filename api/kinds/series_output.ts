/**
 * Helpers shared by the series-operation run kinds (resampling, anomalies, alignment):
 * typed arrays with NaN gaps → JSON arrays with null, and core RangeErrors → InputProblems.
 *
 * @module
 */
import { InputProblem } from "../runs/kind.ts";

/** A Float64Array with NaN gaps as a JSON array with null gaps. */
export function withNulls(a: ArrayLike<number>): (number | null)[] {
  return Array.from(a, (x) => (Number.isFinite(x) ? x : null));
}

/** Run `f`; a RangeError from core becomes a 422 InputProblem at `pointer`. */
export function asInputProblem<T>(pointer: string, f: () => T): T {
  try {
    return f();
  } catch (e) {
    if (e instanceof RangeError) throw new InputProblem(pointer, e.message);
    throw e;
  }
}

/** Count the defined (non-null) values of an output; outputs need 2 to be stored. */
export function definedCount(v: (number | null)[]): number {
  let n = 0;
  for (const x of v) if (x !== null) n++;
  return n;
}
