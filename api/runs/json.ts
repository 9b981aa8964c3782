/**
 * Result hygiene before hashing: typed arrays become plain arrays, `-0` becomes `0`, object
 * keys are put in RFC 8785 order (so `JSON.stringify` of the result is its canonical JSON), a
 * string with a lone surrogate is refused as RFC 8785 refuses it, and a
 * non-finite number anywhere is a bug in the analysis (JSON has no NaN; a silent null would
 * hide it), reported with its JSON Pointer. A value undefined by its method is written as a
 * documented null by the analysis (`api/analyses/common/undefined_as_null.ts`) before it gets
 * here. Object keys must follow the key-spelling policy of results (snake_case,
 * `api/analyses/common/keys.ts`); any other key is refused the same way.
 *
 * Written as one pass with a shared path stack (no allocation per element): results can hold
 * hundreds of thousands of numbers.
 *
 * @module
 */
import { toPointer } from "../problems.ts";
import { SNAKE_CASE_KEY } from "../analyses/common/keys.ts";
import { plainNumbers } from "./plain_numbers.ts";
import { joinBytes } from "../bytes.ts";

function fail(value: unknown, path: (string | number)[]): never {
  throw new Error(
    typeof value === "number"
      ? `non-finite number (${value}) in result at ${
        toPointer(path) || "/"
      }; use null for undefined values`
      : `value of type ${typeof value} in result at ${toPointer(path) || "/"}`,
  );
}

function badKey(key: string, path: (string | number)[]): never {
  throw new Error(
    `key "${key.slice(0, 60)}" in result at ${toPointer(path) || "/"} is not snake_case`,
  );
}

function plainNumber(v: number, path: (string | number)[]): number {
  // `v - v === 0` is false exactly for NaN and ±Infinity.
  if (v - v !== 0) fail(v, path);
  return v === 0 ? 0 : v;
}

function badString(path: (string | number)[]): never {
  throw new RangeError(
    `Cannot canonicalise JSON: lone surrogate in a string in result at ${toPointer(path) || "/"}`,
  );
}

function walk(value: unknown, path: (string | number)[], keys: Set<string>): unknown {
  if (typeof value === "string") return value.isWellFormed() ? value : badString(path);
  if (value === null || typeof value === "boolean") return value;
  if (typeof value === "number") return plainNumber(value, path);
  if (value === undefined) return undefined;
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    const a = value as unknown as ArrayLike<number>;
    const out = new Array<number>(a.length);
    for (let i = 0; i < a.length; i++) {
      const v = a[i];
      if (v - v !== 0) fail(v, [...path, i]);
      out[i] = v === 0 ? 0 : v;
    }
    return out;
  }
  if (Array.isArray(value)) {
    const out = new Array<unknown>(value.length);
    for (let i = 0; i < value.length; i++) {
      const v = value[i];
      if (typeof v === "number") {
        if (v - v !== 0) fail(v, [...path, i]);
        out[i] = v === 0 ? 0 : v;
      } else if (typeof v === "string") {
        out[i] = v.isWellFormed() ? v : badString([...path, i]);
      } else if (v === null || typeof v === "boolean") {
        out[i] = v;
      } else {
        path.push(i);
        const p = walk(v, path, keys);
        path.pop();
        out[i] = p === undefined ? null : p;
      }
    }
    return out;
  }
  if (typeof value === "object") {
    const out: Record<string, unknown> = {};
    // RFC 8785 order (UTF-16 code units, the default sort): JSON.stringify of the result is
    // then its canonical JSON (api/store/result_text.ts)
    for (const k of Object.keys(value as object).sort()) {
      // the same keys repeat in every row of a table: test each spelling once
      if (!keys.has(k)) {
        if (!SNAKE_CASE_KEY.test(k)) badKey(k, path);
        keys.add(k);
      }
      path.push(k);
      const p = walk((value as Record<string, unknown>)[k], path, keys);
      path.pop();
      if (p !== undefined) out[k] = p;
    }
    return out;
  }
  return fail(value, path);
}

/**
 * Deep-copy `value` into plain JSON with the keys of every object sorted (RFC 8785 order).
 *
 * @throws {Error} naming the JSON Pointer of any non-finite number, non-JSON value or key that
 *   is not snake_case
 * @example
 * ```ts
 * import { toPlainJson } from "./json.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(toPlainJson({ a: Float64Array.of(1, -0), b: undefined }), { a: [1, 0] });
 * assert.equal(JSON.stringify(toPlainJson({ b: 1, a: { d: 2, c: 3 } })), '{"a":{"c":3,"d":2},"b":1}');
 * assert.throws(() => toPlainJson({ x: [1, NaN] }), /\/x\/1/);
 * assert.throws(() => toPlainJson({ rSquared: 0.5 }), /rSquared/);
 * ```
 */
export function toPlainJson(value: unknown): unknown {
  return walk(value, [], new Set());
}

/**
 * UTF-8 bytes fed with strings: small pieces are joined and encoded together, a large piece (an
 * array of numbers: one-byte text) is encoded on its own, and the encoded pieces are copied once
 * into a buffer of the exact length at the end. No string of the whole result is ever built (V8
 * would make it two bytes per character as soon as one non-Latin-1 character appears, and encode
 * all of it again), and no buffer is grown by doubling: against a buffer that doubled and was
 * trimmed at the end, 186 ms instead of 210 ms for a 34 MB result and 0.86 ms instead of 0.94 ms
 * for a 0.3 MB one (test/bench/canonical_bytes_bench.ts, 3 alternating runs, medians).
 */
class Utf8Sink {
  #chunks: Uint8Array[] = [];
  #len = 0;
  #parts: string[] = [];
  #pending = 0;
  static #encoder = new TextEncoder();

  push(s: string): void {
    this.#parts.push(s);
    this.#pending += s.length;
    if (this.#pending > 1 << 15) this.flush();
  }

  /** Append a large piece: pending pieces first, then this one on its own. */
  pushLarge(s: string): void {
    this.flush();
    this.#encode(s);
  }

  flush(): void {
    if (this.#parts.length === 0) return;
    const s = this.#parts.length === 1 ? this.#parts[0] : this.#parts.join("");
    this.#parts = [];
    this.#pending = 0;
    this.#encode(s);
  }

  #encode(s: string): void {
    const b = Utf8Sink.#encoder.encode(s);
    this.#chunks.push(b);
    this.#len += b.length;
  }

  /**
   * The bytes written, in a buffer of their own length: a `SharedArrayBuffer` when there are at
   * least `sharedFrom` of them, else an ArrayBuffer.
   */
  bytes(sharedFrom = Infinity): Uint8Array {
    this.flush();
    const chunks = this.#chunks;
    this.#chunks = [];
    const shared = this.#len >= sharedFrom;
    if (!shared && chunks.length === 1 && chunks[0].byteLength === chunks[0].buffer.byteLength) {
      return chunks[0];
    }
    return shared ? joinBytes(chunks, new SharedArrayBuffer(this.#len)) : joinBytes(chunks);
  }
}

/** Arrays at least this long are checked, then serialised by one `JSON.stringify` call. */
const LARGE = 256;

/**
 * What one serialisation remembers: the text of the last long flat arrays written, so an array
 * repeated in a result (the same time axis under several outputs) is formatted once.
 */
interface Written {
  texts: { a: ArrayLike<unknown>; text: string }[];
}

/** How many long flat arrays one serialisation remembers the text of. */
const REMEMBERED = 16;
/**
 * Texts longer than this are not remembered: kept to the end of a 38 MB result (21 arrays of
 * 153,000 numbers, none repeated), they made its POST 80–140 ms slower over HTTP
 * (test/bench/http_peers.ts, interleaved), where a repeated time axis is short (3,000 months:
 * 51 kB).
 */
const REMEMBERED_CHARS = 1 << 20;

/** True when two flat arrays hold the same primitives (so their JSON is the same text). */
function sameItems(a: ArrayLike<unknown>, b: ArrayLike<unknown>): boolean {
  const n = a.length;
  if (n !== b.length) return false;
  // the last and middle items first: arrays that share a long beginning (outputs alike before
  // some date) differ there, and a scan to the point where they part cost a 38 MB result
  // 5 % of its serialisation
  if (a[n - 1] !== b[n - 1] || a[n >> 1] !== b[n >> 1]) return false;
  for (let i = 0; i < n; i++) if (a[i] !== b[i]) return false;
  return true;
}

function writeArrayLike(
  a: ArrayLike<unknown>,
  path: (string | number)[],
  keys: Set<string>,
  sink: Utf8Sink,
  done: Written,
): void {
  // primitives only (the common case: numbers): check each, then one native stringify
  let flat = true;
  for (let i = 0; i < a.length; i++) {
    const v = a[i];
    if (typeof v === "number") {
      if (v - v !== 0) fail(v, [...path, i]);
    } else if (typeof v === "string") {
      if (!v.isWellFormed()) badString([...path, i]);
    } else if (v !== null && typeof v !== "boolean" && v !== undefined) {
      flat = false;
      break;
    }
  }
  // an own toJSON would be called by JSON.stringify, not by the plain copy
  if (flat && !("toJSON" in a)) {
    // JSON.stringify writes -0 as 0 and a hole or undefined in an array as null, as the plain
    // copy would hold them; a typed array is copied to an Array first (it would be an object)
    if (a.length < LARGE) {
      sink.push(JSON.stringify(Array.isArray(a) ? a : plainNumbers(a as ArrayLike<number>)));
      return;
    }
    // items compared with ===: -0 and 0 are both written 0, and no NaN is left (checked)
    let text = done.texts.find((t) => t.a === a || sameItems(t.a, a))?.text;
    if (text === undefined) {
      text = JSON.stringify(Array.isArray(a) ? a : plainNumbers(a as ArrayLike<number>));
      // the last few only: a result of many long rows compares each with a bounded number
      if (text.length <= REMEMBERED_CHARS && done.texts.push({ a, text }) > REMEMBERED) {
        done.texts.shift();
      }
    }
    sink.pushLarge(text);
    return;
  }
  sink.push("[");
  for (let i = 0; i < a.length; i++) {
    if (i > 0) sink.push(",");
    const v = a[i];
    if (v === undefined) {
      sink.push("null");
      continue;
    }
    path.push(i);
    write(v, path, keys, sink, done);
    path.pop();
  }
  sink.push("]");
}

function write(
  value: unknown,
  path: (string | number)[],
  keys: Set<string>,
  sink: Utf8Sink,
  done: Written,
) {
  if (typeof value === "string") {
    sink.push(JSON.stringify(value.isWellFormed() ? value : badString(path)));
  } else if (value === null) sink.push("null");
  else if (typeof value === "boolean") sink.push(value ? "true" : "false");
  else if (typeof value === "number") sink.push(JSON.stringify(plainNumber(value, path)));
  else if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    writeArrayLike(value as unknown as ArrayLike<number>, path, keys, sink, done);
  } else if (Array.isArray(value)) writeArrayLike(value, path, keys, sink, done);
  else if (typeof value === "object") {
    sink.push("{");
    let first = true;
    for (const k of Object.keys(value as object).sort()) {
      if (!keys.has(k)) {
        if (!SNAKE_CASE_KEY.test(k)) badKey(k, path);
        keys.add(k);
      }
      const v = (value as Record<string, unknown>)[k];
      if (v === undefined) continue;
      sink.push(first ? JSON.stringify(k) + ":" : "," + JSON.stringify(k) + ":");
      first = false;
      path.push(k);
      write(v, path, keys, sink, done);
      path.pop();
    }
    sink.push("}");
  } else fail(value, path);
}

/**
 * The UTF-8 bytes of `JSON.stringify(toPlainJson(value))` (RFC 8785 canonical JSON of a
 * result, see api/store/result_text.ts), written in one pass without the plain copy or a string
 * of the whole: the same checks and errors as {@link toPlainJson}, and arrays of primitives
 * serialised by the native `JSON.stringify`, so every number is formatted exactly as there.
 * A 153,000-day reconstruction (38 MB): about half the time of copy, stringify and encode
 * (test/bench/http_peers.ts).
 *
 * @throws {Error} as {@link toPlainJson}
 * @example
 * ```ts
 * import { canonicalJsonBytes, toPlainJson } from "./json.ts";
 * import assert from "node:assert/strict";
 * const v = { b: Float64Array.of(1, -0, 2.5e-7), a: [{ y: "é", x: undefined }, null, -0] };
 * const text = new TextDecoder().decode(canonicalJsonBytes(v));
 * assert.equal(text, JSON.stringify(toPlainJson(v)));
 * assert.equal(text, '{"a":[{"y":"é"},null,0],"b":[1,0,2.5e-7]}');
 * ```
 */
export function canonicalJsonBytes(value: unknown): Uint8Array<ArrayBuffer>;
/** As above, in shared memory (a `SharedArrayBuffer`) when there are `sharedFrom` bytes or more. */
export function canonicalJsonBytes(value: unknown, sharedFrom: number): Uint8Array;
export function canonicalJsonBytes(value: unknown, sharedFrom = Infinity): Uint8Array {
  const sink = new Utf8Sink();
  if (value === undefined) fail(value, []);
  write(value, [], new Set(), sink, { texts: [] });
  return sink.bytes(sharedFrom);
}
