/**
 * Result hygiene before hashing: typed arrays become plain arrays, `-0` becomes `0`, and a
 * non-finite number anywhere is a bug in the analysis (JSON has no NaN; a silent null would
 * hide it), reported with its JSON Pointer.
 *
 * Written as one pass with a shared path stack (no allocation per element): results can hold
 * hundreds of thousands of numbers.
 *
 * @module
 */
import { toPointer } from "../problems.ts";

function fail(value: unknown, path: (string | number)[]): never {
  throw new Error(
    typeof value === "number"
      ? `non-finite number (${value}) in result at ${
        toPointer(path) || "/"
      }; use null for undefined values`
      : `value of type ${typeof value} in result at ${toPointer(path) || "/"}`,
  );
}

function plainNumber(v: number, path: (string | number)[]): number {
  // `v - v === 0` is false exactly for NaN and ±Infinity.
  if (v - v !== 0) fail(v, path);
  return v === 0 ? 0 : v;
}

function walk(value: unknown, path: (string | number)[]): unknown {
  if (value === null || typeof value === "string" || typeof value === "boolean") return value;
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
      } else if (v === null || typeof v === "string" || typeof v === "boolean") {
        out[i] = v;
      } else {
        path.push(i);
        const p = walk(v, path);
        path.pop();
        out[i] = p === undefined ? null : p;
      }
    }
    return out;
  }
  if (typeof value === "object") {
    const out: Record<string, unknown> = {};
    for (const k of Object.keys(value as object)) {
      path.push(k);
      const p = walk((value as Record<string, unknown>)[k], path);
      path.pop();
      if (p !== undefined) out[k] = p;
    }
    return out;
  }
  return fail(value, path);
}

/**
 * Deep-copy `value` into plain JSON.
 *
 * @throws {Error} naming the JSON Pointer of any non-finite number or non-JSON value
 * @example
 * ```ts
 * import { toPlainJson } from "./json.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(toPlainJson({ a: Float64Array.of(1, -0), b: undefined }), { a: [1, 0] });
 * assert.throws(() => toPlainJson({ x: [1, NaN] }), /\/x\/1/);
 * ```
 */
export function toPlainJson(value: unknown): unknown {
  return walk(value, []);
}
