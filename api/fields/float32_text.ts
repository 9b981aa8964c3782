/**
 * The shortest decimal text that reads back to the same float32 (for CSV of float32 fields:
 * `0.3` rather than the double `0.30000001192092896` of the same bits).
 *
 * @module
 */

/**
 * Shortest decimal that rounds to `x` in float32 (empty text for NaN).
 *
 * @param x a float32 value (any number is first rounded to float32)
 * @returns the text, at most 9 significant digits (enough for every float32)
 * @example
 * ```ts
 * import { float32Text } from "./float32_text.ts";
 * import assert from "node:assert/strict";
 * assert.equal(float32Text(Math.fround(0.3)), "0.3");
 * assert.equal(float32Text(Math.fround(1 / 3)), "0.33333334");
 * assert.equal(float32Text(NaN), "");
 * ```
 */
export function float32Text(x: number): string {
  const f = Math.fround(x);
  if (Number.isNaN(f)) return "";
  if (!Number.isFinite(f) || f === 0) return String(f);
  for (let p = 1; p <= 9; p++) {
    const s = f.toPrecision(p);
    if (Math.fround(Number(s)) === f) return String(Number(s));
  }
  return String(f);
}
