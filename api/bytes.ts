/**
 * Byte pieces joined into one buffer.
 *
 * @module
 */

/**
 * The bytes of `parts` in order, copied once into a buffer of their total length: a new
 * ArrayBuffer, or `buffer` when given (a `SharedArrayBuffer` of that length, say).
 *
 * @example
 * ```ts
 * import { joinBytes } from "./bytes.ts";
 * import assert from "node:assert/strict";
 * const b = joinBytes([Uint8Array.of(1, 2), new Uint8Array(0), Uint8Array.of(3)]);
 * assert.deepEqual([...b], [1, 2, 3]);
 * assert.ok(joinBytes([Uint8Array.of(4)], new SharedArrayBuffer(1)).buffer instanceof SharedArrayBuffer);
 * ```
 */
export function joinBytes(parts: readonly Uint8Array[]): Uint8Array<ArrayBuffer>;
export function joinBytes<B extends ArrayBufferLike>(
  parts: readonly Uint8Array[],
  buffer: B,
): Uint8Array<B>;
export function joinBytes(parts: readonly Uint8Array[], buffer?: ArrayBufferLike): Uint8Array {
  const out = new Uint8Array(buffer ?? new ArrayBuffer(parts.reduce((n, p) => n + p.length, 0)));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.length;
  }
  return out;
}
