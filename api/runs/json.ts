/**
 * Result hygiene before hashing: typed arrays become plain arrays, and a non-finite number
 * anywhere is a bug in the analysis (JSON has no NaN; a silent null would hide it), reported
 * with its JSON Pointer.
 *
 * @module
 */
import { toPointer } from "../problems.ts";

/** Deep-copy `value` into plain JSON; throws Error naming the path of any non-finite number. */
export function toPlainJson(value: unknown, path: (string | number)[] = []): unknown {
  if (value === null || typeof value === "string" || typeof value === "boolean") return value;
  if (typeof value === "number") {
    if (!Number.isFinite(value)) {
      throw new Error(
        `non-finite number (${value}) in result at ${
          toPointer(path) || "/"
        }; use null for undefined values`,
      );
    }
    return Object.is(value, -0) ? 0 : value;
  }
  if (value === undefined) return undefined;
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) {
    return Array.from(
      value as unknown as ArrayLike<number>,
      (v, i) => toPlainJson(v, [...path, i]),
    );
  }
  if (Array.isArray(value)) {
    return value.map((v, i) => {
      const p = toPlainJson(v, [...path, i]);
      return p === undefined ? null : p;
    });
  }
  if (typeof value === "object") {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value as Record<string, unknown>)) {
      const p = toPlainJson(v, [...path, k]);
      if (p !== undefined) out[k] = p;
    }
    return out;
  }
  throw new Error(`value of type ${typeof value} in result at ${toPointer(path) || "/"}`);
}
