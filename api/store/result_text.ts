/**
 * A run's result is serialised once. {@link toPlainJson} builds the result with the keys of
 * every object in RFC 8785 order (sorted by UTF-16 code units) and every number and string
 * already checked, and result keys are snake_case (never array-index-like, which objects would
 * enumerate first), so the native `JSON.stringify` of that value is its RFC 8785 canonical
 * JSON: ECMAScript number formatting and JSON string escaping are what RFC 8785 prescribes
 * (§3.2.2.3, §3.2.2.2). That one text is hashed for the digest, written to the store, and
 * served; a result read back from the store keeps the text it was read from, so a GET splices
 * the stored bytes into its response instead of serialising them again.
 *
 * The text of a result travels beside the object in a WeakMap keyed by the result object
 * (results are never mutated once made), so record types and store signatures stay as they
 * are; an object without a remembered text is serialised as before.
 *
 * @module
 */
import { sha256Hex } from "../canonical.ts";

const texts = new WeakMap<object, string>();

/** Remember `text` as the serialised form of `result` (returns `result`). */
export function rememberResultText<T extends object>(result: T, text: string): T {
  texts.set(result, text);
  return result;
}

/** The remembered text of `result`, or undefined. */
export function resultTextOf(result: object | null | undefined): string | undefined {
  return result ? texts.get(result) : undefined;
}

/** The JSON text of a result: its remembered text, else `JSON.stringify`. */
export function resultJson(result: Record<string, unknown>): string {
  return texts.get(result) ?? JSON.stringify(result);
}

/**
 * The canonical text and digest of a result made by {@link toPlainJson} (keys sorted), once:
 * the text is remembered for the store and the response.
 *
 * @param plain a value returned by `toPlainJson` (or built from such values with sorted keys)
 * @returns the RFC 8785 canonical JSON text and its hex SHA-256
 * @example
 * ```ts
 * import { canonicalResult } from "./result_text.ts";
 * import { toPlainJson } from "../runs/json.ts";
 * import { canonicalJson, sha256Hex } from "../canonical.ts";
 * import assert from "node:assert/strict";
 * const plain = toPlainJson({ z: [1, 2.5e-7], a: { y: "é", b: -0 } }) as Record<string, unknown>;
 * const { text, digest } = canonicalResult(plain);
 * assert.equal(text, canonicalJson(plain));
 * assert.equal(digest, sha256Hex(canonicalJson(plain)));
 * ```
 */
export function canonicalResult(plain: Record<string, unknown>): { text: string; digest: string } {
  const text = JSON.stringify(plain);
  rememberResultText(plain, text);
  return { text, digest: sha256Hex(text) };
}

/** Parse a stored result text and remember the text for serving (null stays null). */
export function parseResult(v: unknown): Record<string, unknown> | null {
  if (v === null || v === undefined) return null;
  const text = String(v);
  return rememberResultText(JSON.parse(text) as Record<string, unknown>, text);
}
