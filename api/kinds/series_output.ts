/**
 * Functions shared by the series-operation run kinds (resampling, anomalies, alignment):
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

/** Most output periods a series operation returns (its per-period report grows with them). */
export const MAX_PERIODS = 500_000;

/** Refuse a span that would give more than {@link MAX_PERIODS} periods at a resolution. */
export function checkPeriodCount(
  start: number,
  end: number,
  to: "daily" | "monthly" | "annual",
  pointer: string,
): void {
  const per = to === "daily" ? 366 : to === "monthly" ? 12 : 1;
  const n = Math.ceil((end - start) * per) + 1;
  if (n > MAX_PERIODS) {
    throw new InputProblem(
      pointer,
      `the series spans about ${n} ${to} periods, more than the ${MAX_PERIODS} one run returns; ` +
        "choose a coarser resolution or a shorter series",
    );
  }
}
