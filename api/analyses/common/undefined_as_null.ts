/**
 * The one bridge from core's numbers to a result's JSON numbers, and the service's one
 * non-finite policy:
 *
 * - Core marks a value its method leaves undefined with NaN (a gap in a calendar mean, the
 *   ends of a smoothing window, the AIC of a lag combination whose regressors are collinear).
 *   Such a value is written as `null`, and the result schema's description of the field says
 *   when it is null. {@link undefinedAsNull} is the only function that turns a non-finite
 *   number into null: call it only for fields whose schema documents the null.
 * - A NaN or infinity anywhere else is a defect of the analysis: the serializer
 *   (`api/runs/json.ts`) refuses the whole result with the JSON Pointer of the number, so a
 *   computed NaN is never silently stored as null.
 *
 * Typed arrays need no conversion for JSON (the serializer copies them); use this function
 * only where a value may be undefined by its method.
 *
 * @module
 */

/**
 * A number that its method may leave undefined (NaN or ±Infinity from core) as a JSON number
 * or `null`; arrays element by element.
 *
 * @param x a number (null and undefined pass as null) or an array-like of numbers
 * @returns the number, or null where it is not finite
 * @example
 * ```ts
 * import { undefinedAsNull } from "./undefined_as_null.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(undefinedAsNull(Float64Array.of(1, NaN, -Infinity)), [1, null, null]);
 * assert.equal(undefinedAsNull(2.5), 2.5);
 * assert.equal(undefinedAsNull(NaN), null);
 * assert.equal(undefinedAsNull(undefined), null);
 * ```
 */
export function undefinedAsNull(x: number | null | undefined): number | null;
export function undefinedAsNull(x: ArrayLike<number>): (number | null)[];
export function undefinedAsNull(
  x: number | null | undefined | ArrayLike<number>,
): number | null | (number | null)[] {
  if (x === null || x === undefined) return null;
  if (typeof x === "number") return Number.isFinite(x) ? x : null;
  const out = new Array<number | null>(x.length);
  for (let i = 0; i < x.length; i++) out[i] = Number.isFinite(x[i]) ? x[i] : null;
  return out;
}
