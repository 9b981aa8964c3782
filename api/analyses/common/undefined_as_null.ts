/**
 * The documented null of a result: a number its method leaves undefined (a cell without a
 * proxy, a point outside the reference period) is NaN in core and `null` in JSON, and the
 * result schema says when. Use it only for such arrays: a NaN anywhere else is a defect, and
 * the serializer refuses it.
 *
 * @module
 */

/** NaN (undefined by the method) → null; every other number unchanged. */
export function undefinedAsNull(x: ArrayLike<number>): (number | null)[] {
  const out = new Array<number | null>(x.length);
  for (let i = 0; i < x.length; i++) out[i] = Number.isNaN(x[i]) ? null : x[i];
  return out;
}
