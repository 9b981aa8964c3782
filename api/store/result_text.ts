/**
 * A run's result is serialised once. {@link toPlainJson} builds the result with the keys of
 * every object in RFC 8785 order (sorted by UTF-16 code units) and every number and string
 * already checked, and result keys are snake_case (never array-index-like, which objects would
 * enumerate first), so the native `JSON.stringify` of that value is its RFC 8785 canonical
 * JSON: ECMAScript number formatting and JSON string escaping are what RFC 8785 prescribes
 * (§3.2.2.3, §3.2.2.2). That one text, as UTF-8 bytes, is hashed for the digest, written to the
 * store, and served.
 *
 * The bytes are made where the result is computed (a compute worker transfers them, so a large
 * result never crosses threads as an object graph) and travel beside the result object in a
 * WeakMap keyed by it (results are never mutated once made), so record types and store
 * signatures stay as they are. A result that arrives as bytes (from a worker or from the store)
 * is a {@link lazyResult}: it is parsed only when a field of it is read, so a run whose result
 * is only stored and served is never parsed in the request thread. An object without remembered
 * bytes or text is serialised as before.
 *
 * @module
 */
import { createHash } from "node:crypto";
import { sha256Hex } from "../canonical.ts";

/**
 * A result's canonical bytes count as large from this size on (a daily reconstruction since
 * 1610 has 38 MB; most results have kilobytes). Large ones are made in memory shared between
 * threads (a `SharedArrayBuffer`: the request thread and the SQLite writer worker read them
 * without copies), written by the writer worker without the automatic WAL checkpoint
 * (api/store/sqlite.ts), and stored while their response is sent (api/runs/service.ts).
 */
export const LARGE_RESULT_BYTES = 4 << 20;

const texts = new WeakMap<object, string>();
const bytesOf = new WeakMap<object, Uint8Array>();
const encoder = new TextEncoder();
const decoder = new TextDecoder();

/** Remember `text` as the serialised form of `result` (returns `result`). */
export function rememberResultText<T extends object>(result: T, text: string): T {
  texts.set(result, text);
  return result;
}

/** The remembered text of `result` (decoded from its bytes when it has bytes), or undefined. */
export function resultTextOf(result: object | null | undefined): string | undefined {
  if (!result) return undefined;
  const t = texts.get(result);
  if (t !== undefined) return t;
  const b = bytesOf.get(result);
  return b ? decoder.decode(b) : undefined;
}

/** The remembered UTF-8 bytes of `result` (encoded from its text when it has text), or undefined. */
export function resultBytesOf(
  result: object | null | undefined,
): Uint8Array | undefined {
  if (!result) return undefined;
  const b = bytesOf.get(result);
  if (b) return b;
  const t = texts.get(result);
  return t === undefined ? undefined : encoder.encode(t);
}

/** The JSON text of a result: its remembered text or bytes, else `JSON.stringify`. */
export function resultJson(result: Record<string, unknown>): string {
  return resultTextOf(result) ?? JSON.stringify(result);
}

/** The JSON of a result as UTF-8 bytes: its remembered bytes or text, else `JSON.stringify`. */
export function resultBytes(result: Record<string, unknown>): Uint8Array {
  return resultBytesOf(result) ?? encoder.encode(JSON.stringify(result));
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

/** A result's canonical JSON as UTF-8 bytes, with their hex SHA-256. */
export interface CanonicalBytes {
  bytes: Uint8Array;
  digest: string;
}

/**
 * The canonical JSON of a result made by {@link toPlainJson} as UTF-8 bytes, and their hex
 * SHA-256 (the same digest as {@link canonicalResult}'s: SHA-256 is taken over the UTF-8
 * encoding either way). The JS string is dropped at once: only the bytes are kept.
 *
 * @example
 * ```ts
 * import { canonicalBytes, canonicalResult } from "./result_text.ts";
 * import assert from "node:assert/strict";
 * const plain = { a: [1, 0.5], b: "é" };
 * const { bytes, digest } = canonicalBytes(plain);
 * assert.equal(new TextDecoder().decode(bytes), '{"a":[1,0.5],"b":"é"}');
 * assert.equal(digest, canonicalResult(plain).digest);
 * ```
 */
export function canonicalBytes(plain: Record<string, unknown>): CanonicalBytes {
  const bytes = encoder.encode(JSON.stringify(plain));
  return { bytes, digest: createHash("sha256").update(bytes).digest("hex") };
}

/**
 * A result held as its JSON bytes, parsed on first use: reading any field (or keys, or
 * `JSON.stringify`) parses the bytes once and answers from the parsed object; storing and
 * serving use the bytes as they are ({@link resultBytesOf}). Results are never mutated, so the
 * object behaves as the parsed result does for every reader. It cannot be sent by structured
 * clone: {@link plainResult} gives the parsed object for that.
 *
 * @example
 * ```ts
 * import { lazyResult, resultBytesOf } from "./result_text.ts";
 * import assert from "node:assert/strict";
 * const bytes = new TextEncoder().encode('{"a":[1,2],"b":null}');
 * const r = lazyResult(bytes);
 * assert.equal(resultBytesOf(r), bytes);
 * assert.deepEqual(Object.keys(r), ["a", "b"]);
 * assert.equal(JSON.stringify(r), '{"a":[1,2],"b":null}');
 * ```
 */
export function lazyResult(bytes: Uint8Array): Record<string, unknown> {
  let parsed: Record<string, unknown> | null = null;
  const real = () => (parsed ??= JSON.parse(decoder.decode(bytes)) as Record<string, unknown>);
  const proxy = new Proxy<Record<string, unknown>>({}, {
    get: (_t, k) => (k === LAZY ? real : Reflect.get(real(), k)),
    has: (_t, k) => Reflect.has(real(), k),
    ownKeys: () => Reflect.ownKeys(real()),
    getOwnPropertyDescriptor: (_t, k) => Reflect.getOwnPropertyDescriptor(real(), k),
    set: () => false,
    defineProperty: () => false,
    deleteProperty: () => false,
  });
  bytesOf.set(proxy, bytes);
  return proxy;
}

const LAZY = Symbol("lazy result");

/** The parsed object of a {@link lazyResult} (remembering its bytes); any other value as it is. */
export function plainResult<T>(result: T): T {
  if (result === null || typeof result !== "object") return result;
  const real = (result as Record<symbol, unknown>)[LAZY] as (() => T) | undefined;
  if (!real) return result;
  const plain = real();
  const b = bytesOf.get(result as object);
  if (b) bytesOf.set(plain as object, b);
  return plain;
}

/**
 * A stored result (JSON text, or its UTF-8 bytes) as a {@link lazyResult}: parsed when a field
 * is read, served from the stored bytes (null stays null).
 */
export function parseResult(v: unknown): Record<string, unknown> | null {
  if (v === null || v === undefined) return null;
  if (v instanceof Uint8Array) {
    return lazyResult(v.buffer instanceof ArrayBuffer ? v as Uint8Array<ArrayBuffer> : v.slice());
  }
  return lazyResult(encoder.encode(String(v)));
}
