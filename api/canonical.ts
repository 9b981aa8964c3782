/**
 * Canonical JSON and hashing: the basis of content ids for series and of run result digests.
 *
 * - {@link canonicalJson}: the JSON Canonicalization Scheme, RFC 8785 (sorted object keys,
 *   ECMAScript number formatting, no whitespace), via the maintained npm `canonicalize`.
 * - {@link sha256Hex}: hex SHA-256 (FIPS 180-4) of the UTF-8 bytes of a string, via
 *   `node:crypto` (synchronous, so large series hash without an extra copy per await).
 *
 * @module
 */
import canonicalize from "canonicalize";
import { createHash } from "node:crypto";

/**
 * RFC 8785 canonical JSON of a JSON value.
 *
 * Typed arrays must be converted to plain arrays first; `undefined` object members are
 * dropped as in `JSON.stringify`.
 *
 * @param value a JSON value: no NaN, no Infinity, no functions, no cycles
 * @returns the canonical JSON text
 * @throws {RangeError} when the value holds a non-finite number or cannot be serialised
 * @example
 * ```ts
 * import { canonicalJson } from "./canonical.ts";
 * import assert from "node:assert/strict";
 * assert.equal(canonicalJson({ b: [1, 2.5e-7], a: "x" }), '{"a":"x","b":[1,2.5e-7]}');
 * assert.equal(canonicalJson({ n: 1e21, m: -0 }), '{"m":0,"n":1e+21}');
 * ```
 */
export function canonicalJson(value: unknown): string {
  let out: string | undefined;
  try {
    out = canonicalize(value);
  } catch (e) {
    throw new RangeError(`Cannot canonicalise JSON: ${(e as Error).message}`);
  }
  if (out === undefined) throw new RangeError("Cannot canonicalise JSON: value is not JSON");
  return out;
}

/**
 * Hex SHA-256 of the UTF-8 encoding of a string.
 *
 * @param text any string
 * @returns 64 lowercase hex digits
 * @example
 * ```ts
 * import { sha256Hex } from "./canonical.ts";
 * import assert from "node:assert/strict";
 * // FIPS 180-4 example message "abc"
 * assert.equal(
 *   sha256Hex("abc"),
 *   "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad",
 * );
 * ```
 */
export function sha256Hex(text: string): string {
  return createHash("sha256").update(text, "utf8").digest("hex");
}
