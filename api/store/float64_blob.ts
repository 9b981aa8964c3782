/**
 * Compact storage of point arrays: a Float64Array as a blob of little-endian IEEE 754 doubles,
 * 8 bytes per point, bit-exact (-0, subnormals, NaN payloads survive). Written by hand because
 * it is two lines over `DataView`; no library adds anything here.
 *
 * @module
 */

const LITTLE_ENDIAN = new Uint8Array(new Float64Array([1]).buffer)[7] === 0x3f;

/**
 * Encode doubles as little-endian bytes. On little-endian hosts (all current Deno targets) the
 * result is a copy of the array's bytes; elsewhere each value is swapped through a DataView.
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { float64ToBytesLE } from "./float64_blob.ts";
 * // IEEE 754: 1.0 is 0x3FF0000000000000, little-endian puts 0x3F last
 * assert.deepEqual([...float64ToBytesLE(new Float64Array([1]))], [0, 0, 0, 0, 0, 0, 0xf0, 0x3f]);
 * ```
 */
export function float64ToBytesLE(values: Float64Array): Uint8Array {
  if (LITTLE_ENDIAN) {
    return new Uint8Array(values.buffer, values.byteOffset, values.byteLength).slice();
  }
  const out = new Uint8Array(values.length * 8);
  const view = new DataView(out.buffer);
  for (let i = 0; i < values.length; i++) view.setFloat64(i * 8, values[i], true);
  return out;
}

/**
 * Decode a blob written by {@link float64ToBytesLE}. The bytes are copied into a fresh,
 * 8-byte-aligned buffer, so the result never aliases the driver's memory.
 *
 * @throws {RangeError} when the blob length is not a multiple of 8, or differs from
 * `expectedLength * 8` when that is given (a corrupt row).
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { Buffer } from "node:buffer";
 * import { bytesLEToFloat64, float64ToBytesLE } from "./float64_blob.ts";
 * const x = new Float64Array([-0, 5e-324, 1.7976931348623157e308]);
 * const y = bytesLEToFloat64(float64ToBytesLE(x), 3);
 * assert.ok(Object.is(y[0], -0));
 * assert.deepEqual(y, x);
 * // A driver's Buffer that views part of a larger pool decodes to exactly its own bytes.
 * const pool = float64ToBytesLE(new Float64Array([7, 2.5, 9]));
 * const view = Buffer.from(pool.buffer, 8, 8);
 * assert.deepEqual(bytesLEToFloat64(view), new Float64Array([2.5]));
 * ```
 */
export function bytesLEToFloat64(bytes: Uint8Array, expectedLength?: number): Float64Array {
  if (bytes.byteLength % 8 !== 0) {
    throw new RangeError(
      `Cannot decode point blob: length must be a multiple of 8 bytes, got ${bytes.byteLength}`,
    );
  }
  const n = bytes.byteLength / 8;
  if (expectedLength !== undefined && n !== expectedLength) {
    throw new RangeError(
      `Cannot decode point blob: expected ${expectedLength} points, got ${n}`,
    );
  }
  // Copy through the Uint8Array constructor: a Node Buffer's slice() is a view into a shared
  // pool, so `.buffer` would be the whole pool.
  if (LITTLE_ENDIAN) return new Float64Array(new Uint8Array(bytes).buffer);
  const out = new Float64Array(n);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (let i = 0; i < n; i++) out[i] = view.getFloat64(i * 8, true);
  return out;
}
