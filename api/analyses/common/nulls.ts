/**
 * Numbers a method leaves undefined (computed as NaN in core: the ends of a smoothing, times
 * before the first cycle minimum, an unresolved peak width) written as JSON null. Each result
 * schema says where such nulls occur.
 *
 * @module
 */

/** An array with every non-finite value (NaN: undefined by the method) as null. */
export function nulls(a: ArrayLike<number>): (number | null)[] {
  return Array.from(a, (x) => (Number.isFinite(x) ? x : null));
}

/** A number, or null when it is missing or not finite (undefined by the method). */
export function numOrNull(x: number | null | undefined): number | null {
  return x === null || x === undefined || !Number.isFinite(x) ? null : x;
}
