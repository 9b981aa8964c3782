/**
 * The short label that tells runs apart on charts, in CSV headers and on the page.
 *
 * A run id is a UUIDv7 (RFC 9562 §5.7): its first 48 bits are the creation time in
 * milliseconds, so the first 8 hex digits are shared by every run made within the same ~65 s.
 * The id generator used here (npm `uuidv7`) fills the last 32 bits with fresh random bits for
 * every id, so the last 8 hex digits tell runs apart: two runs share them with probability
 * 2⁻³² (about one pair in 10,000 runs shares a label by the birthday bound: the full id, always
 * given beside the label in descriptions and metadata, stays the reference).
 *
 * @module
 */

/**
 * The label of a run: the last 8 hex digits of its id (its random tail).
 *
 * @param id run id (UUIDv7, lower-case hex with dashes)
 * @returns 8 hex digits; an id of another shape is returned whole
 * @example
 * ```ts
 * import { runLabel } from "./label.ts";
 * import assert from "node:assert/strict";
 * assert.equal(runLabel("01a2360b-1c2d-7e3f-8a4b-5c6d7e8f9a0b"), "7e8f9a0b");
 * assert.equal(runLabel("run:x"), "run:x");
 * ```
 */
export function runLabel(id: string): string {
  return /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/.test(id)
    ? id.slice(-8)
    : id;
}
