/**
 * CF decoding of stored values: `_Unsigned`, then masking of `_FillValue` and `missing_value`,
 * then unpacking with `scale_factor` and `add_offset` (CF conventions 1.10, §2.5.1 "Missing
 * data, valid and actual range of data" and §8.1 "Packed Data": unpacked = packed ×
 * scale_factor + add_offset; missing values are compared with the packed values, before
 * unpacking; NetCDF Users Guide "Attribute Conventions" for `_Unsigned`).
 *
 * Arithmetic follows xarray 2023.01 (`xarray.coding.variables`, the version Debian 12 ships) so
 * that values agree bit for bit:
 * - masking promotes integers of at most 2 bytes to float32 and wider ones to float64; floats
 *   keep their width (CFMaskCoder with `dtypes.maybe_promote`);
 * - unpacking works in float32 when the data are float32 after masking, or are integers of at
 *   most 2 bytes with no `add_offset`; in float64 otherwise (`_choose_float_dtype`); in float32
 *   each step (× scale_factor, + add_offset) is rounded to float32, with the attributes rounded
 *   to float32 too (numpy's casting of a scalar against a float32 array).
 *
 * `valid_min`, `valid_max` and `valid_range` are not applied, as in xarray.
 *
 * @module
 */
import type { NetcdfType } from "./netcdf_model.ts";

/** The attributes that change stored values. Numbers may come as one-element arrays. */
export interface CfPackingAttributes {
  _FillValue?: number | readonly number[];
  missing_value?: number | readonly number[];
  scale_factor?: number | readonly number[];
  add_offset?: number | readonly number[];
  /** "true" or "false" (NetCDF-3 has no unsigned integer types). */
  _Unsigned?: string;
}

/** The numeric type of decoded values (xarray's dtype). */
export type CfDecodedType = "float32" | "float64" | NetcdfType;

const INT_BYTES: Partial<Record<NetcdfType, number>> = {
  byte: 1,
  ubyte: 1,
  short: 2,
  ushort: 2,
  int: 4,
  uint: 4,
  int64: 8,
  uint64: 8,
};

/**
 * The type values decode to, without decoding them (to size buffers and report dtypes).
 *
 * @param type the stored type
 * @param attributes the variable's attributes
 * @returns `float32`, `float64`, or the stored type when nothing changes values
 * @example
 * ```ts
 * import { cfDecodedType } from "./cf_mask_and_scale.ts";
 * import assert from "node:assert/strict";
 * assert.equal(cfDecodedType("short", { scale_factor: 0.01 }), "float32");
 * assert.equal(cfDecodedType("short", { scale_factor: 0.01, add_offset: 250 }), "float64");
 * assert.equal(
 *   cfDecodedType("short", { scale_factor: 0.01, add_offset: 250, _FillValue: -32767 }),
 *   "float32",
 * );
 * assert.equal(cfDecodedType("int", {}), "int");
 * ```
 */
export function cfDecodedType(type: NetcdfType, attributes: CfPackingAttributes): CfDecodedType {
  return plan(type, attributes).out;
}

interface Plan {
  /** Stored integer reinterpreted: add this to negative values (unsigned) or subtract. */
  unsignedBits: number;
  signedBits: number;
  fills: number[];
  masked: boolean;
  scale: number | undefined;
  offset: number | undefined;
  f32: boolean;
  out: CfDecodedType;
}

function first(v: number | readonly number[] | undefined): number | undefined {
  if (v === undefined) return undefined;
  if (typeof v === "number") return v;
  return v.length ? v[0] : undefined;
}

function plan(type: NetcdfType, a: CfPackingAttributes): Plan {
  let t: NetcdfType = type;
  let unsignedBits = 0, signedBits = 0;
  const bytes = INT_BYTES[type];
  const unsigned = typeof a._Unsigned === "string" ? a._Unsigned.trim().toLowerCase() : undefined;
  if (bytes !== undefined && bytes <= 4) {
    if (unsigned === "true" && (type === "byte" || type === "short" || type === "int")) {
      unsignedBits = 8 * bytes;
      t = type === "byte" ? "ubyte" : type === "short" ? "ushort" : "uint";
    } else if (unsigned === "false" && (type === "ubyte" || type === "ushort" || type === "uint")) {
      signedBits = 8 * bytes;
      t = type === "ubyte" ? "byte" : type === "ushort" ? "short" : "int";
    }
  }
  const reinterpret = (v: number) =>
    unsignedBits && v < 0
      ? v + 2 ** unsignedBits
      : signedBits && v >= 2 ** (signedBits - 1)
      ? v - 2 ** signedBits
      : v;
  const fills: number[] = [];
  for (const src of [a.missing_value, a._FillValue]) {
    if (src === undefined) continue;
    for (const v of typeof src === "number" ? [src] : src) {
      if (!Number.isNaN(v) && !fills.includes(reinterpret(v))) fills.push(reinterpret(v));
    }
  }
  const tb = INT_BYTES[t];
  // After masking (xarray dtypes.maybe_promote): small integers → float32, others → float64.
  let cur: CfDecodedType = t === "float" ? "float32" : t === "double" ? "float64" : t;
  const masked = fills.length > 0;
  if (masked && tb !== undefined) cur = tb <= 2 ? "float32" : "float64";
  const scale = first(a.scale_factor), offset = first(a.add_offset);
  if (scale !== undefined || offset !== undefined) {
    // xarray _choose_float_dtype on the (possibly masked) dtype.
    const ib = INT_BYTES[cur as NetcdfType];
    cur = cur === "float32" || (ib !== undefined && ib <= 2 && offset === undefined)
      ? "float32"
      : "float64";
  }
  const f32 = cur === "float32";
  return {
    unsignedBits,
    signedBits,
    fills: f32 ? fills.map(Math.fround) : fills,
    masked,
    scale,
    offset,
    f32,
    out: cur,
  };
}

/**
 * Decode stored values the way xarray's `open_dataset` does (mask and scale): NaN where a
 * value equals `_FillValue` or `missing_value` (compared with the packed value), the rest
 * unpacked as `packed × scale_factor + add_offset`.
 *
 * @param raw the stored values (any numeric array: Int16Array, Float32Array, number[] ...)
 * @param type their NetCDF type
 * @param attributes the variable's attributes
 * @param into optional output of `raw.length` to fill (a Float32Array rounds float64 results)
 * @returns the decoded values and their type (`float32` values are exact in the Float64Array)
 * @throws {RangeError} when `into` has the wrong length
 * @example
 * ```ts
 * import { cfMaskAndScale } from "./cf_mask_and_scale.ts";
 * import assert from "node:assert/strict";
 * const raw = Int16Array.from([0, 583, -32767]);
 * const d = cfMaskAndScale(raw, "short", {
 *   _FillValue: -32767,
 *   scale_factor: Math.fround(0.001),
 *   add_offset: 1360,
 * });
 * assert.equal(d.type, "float32");
 * // float32: 583 × 0.001f rounded, then + 1360 rounded to float32 (numpy gives 1360.5830078125)
 * assert.deepEqual(Array.from(d.values), [1360, 1360.5830078125, NaN]);
 * ```
 */
export function cfMaskAndScale(
  raw: ArrayLike<number>,
  type: NetcdfType,
  attributes: CfPackingAttributes,
  into?: Float64Array | Float32Array,
): { values: Float64Array | Float32Array; type: CfDecodedType } {
  const n = raw.length;
  if (into && into.length !== n) {
    throw new RangeError(
      `Cannot decode values: the output has length ${into.length}, the input ${n}`,
    );
  }
  const p = plan(type, attributes);
  const out = into ?? new Float64Array(n);
  const { fills, f32, scale, offset, unsignedBits, signedBits } = p;
  const nf = fills.length;
  const fill0 = nf > 0 ? fills[0] : NaN, fill1 = nf > 1 ? fills[1] : NaN;
  const s = scale === undefined ? undefined : f32 ? Math.fround(scale) : scale;
  const o = offset === undefined ? undefined : f32 ? Math.fround(offset) : offset;
  if (nf === 0 && s === undefined && o === undefined && !unsignedBits && !signedBits) {
    out.set(raw); // nothing to decode: a typed-array copy (rounds only into a Float32Array)
    return { values: out, type: p.out };
  }
  const uMod = unsignedBits ? 2 ** unsignedBits : 0;
  const sHalf = signedBits ? 2 ** (signedBits - 1) : 0, sMod = signedBits ? 2 ** signedBits : 0;
  for (let i = 0; i < n; i++) {
    let v = raw[i];
    if (uMod && v < 0) v += uMod;
    else if (sMod && v >= sHalf) v -= sMod;
    if (f32) v = Math.fround(v);
    if (nf > 0 && (v === fill0 || v === fill1 || (nf > 2 && fills.includes(v)))) {
      out[i] = NaN;
      continue;
    }
    if (s !== undefined) v = f32 ? Math.fround(v * s) : v * s;
    if (o !== undefined) v = f32 ? Math.fround(v + o) : v + o;
    out[i] = v;
  }
  return { values: out, type: p.out };
}
