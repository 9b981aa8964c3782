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
