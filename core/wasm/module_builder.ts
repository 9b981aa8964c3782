/**
 * A minimal WebAssembly assembler for the hand-written kernels of core (the float32 matrix
 * product and the local-test tally of the field significance test, the lower-triangular mixing
 * of spectral ensembles, the prediction intervals of reconstructions): the few opcodes they use, by their WAT names, and a one-function
 * module importing `env.memory` (WebAssembly 2.0 binary format, §5). Kernels are thus read and
 * changed as listings, not as opaque bytes.
 *
 * @module
 */

/** Unsigned LEB128. */
function uleb(n: number): number[] {
  const out: number[] = [];
  do {
    let b = n & 0x7f;
    n >>>= 7;
    if (n) b |= 0x80;
    out.push(b);
  } while (n);
  return out;
}

/** Signed LEB128. */
function sleb(n: number): number[] {
  const out: number[] = [];
  for (;;) {
    const b = n & 0x7f;
    n >>= 7;
    if ((n === 0 && !(b & 0x40)) || (n === -1 && (b & 0x40))) {
      out.push(b);
      return out;
    }
    out.push(b | 0x80);
  }
}

/** Value types. */
export const wasmType = { i32: 0x7f, f64: 0x7c, v128: 0x7b } as const;

/** The instructions used, by their WAT names (WebAssembly 2.0 binary opcodes). */
export const wasmOp = {
  localGet: (i: number) => [0x20, ...uleb(i)],
  localSet: (i: number) => [0x21, ...uleb(i)],
  localTee: (i: number) => [0x22, ...uleb(i)],
  i32Const: (v: number) => [0x41, ...sleb(v)],
  f64Const0: [0x44, 0, 0, 0, 0, 0, 0, 0, 0],
  i32Add: [0x6a],
  i32Mul: [0x6c],
  i32And: [0x71],
  i32Or: [0x72],
  i32Eq: [0x46],
  i32Ne: [0x47],
  i32Eqz: [0x45],
  i32LtU: [0x49],
  f64Add: [0xa0],
  f64Mul: [0xa2],
  f64Gt: [0x64],
  f64Ge: [0x66],
  f64PromoteF32: [0xbb],
  select: [0x1b],
  block: [0x02, 0x40],
  loop: [0x03, 0x40],
  end: [0x0b],
  br: (depth: number) => [0x0c, depth],
  brIf: (depth: number) => [0x0d, depth],
  /** Scalar loads and stores: natural alignment and a byte offset. */
  i32Load: (offset: number) => [0x28, 2, ...uleb(offset)],
  f32Load: (offset: number) => [0x2a, 2, ...uleb(offset)],
  f64Load: (offset: number) => [0x2b, 3, ...uleb(offset)],
  i32Load8U: (offset: number) => [0x2d, 0, ...uleb(offset)],
  i32Store: (offset: number) => [0x36, 2, ...uleb(offset)],
  i32Store8: (offset: number) => [0x3a, 0, ...uleb(offset)],
  /** v128.load with alignment 2^4 and a byte offset. */
  v128Load: (offset: number) => [0xfd, 0x00, 4, ...uleb(offset)],
  /** v128.load32_splat (alignment 2^2): four copies of one f32. */
  v128Load32Splat: (offset: number) => [0xfd, 0x09, 2, ...uleb(offset)],
  /** v128.load64_splat (alignment 2^3): two copies of one f64. */
  v128Load64Splat: (offset: number) => [0xfd, 0x0a, 3, ...uleb(offset)],
  v128Store: (offset: number) => [0xfd, 0x0b, 4, ...uleb(offset)],
  v128Zero: [0xfd, 0x0c, ...new Array<number>(16).fill(0)],
  /** v128.const of two f64 lanes given by their bytes (little-endian, 8 per lane). */
  v128ConstF64x2: (lane: readonly number[]) => [0xfd, 0x0c, ...lane, ...lane],
  /** v128.load64_zero (alignment 2^3): two f32 (or one f64) into the low half, zeros above. */
  v128Load64Zero: (offset: number) => [0xfd, ...uleb(0x5d), 3, ...uleb(offset)],
  f64x2Splat: [0xfd, ...uleb(0x14)],
  i32x4ExtractLane: (lane: number) => [0xfd, ...uleb(0x1b), lane],
  f64x2ExtractLane: (lane: number) => [0xfd, ...uleb(0x21), lane],
  f64x2Gt: [0xfd, ...uleb(0x4a)],
  f64x2Ge: [0xfd, ...uleb(0x4c)],
  v128And: [0xfd, ...uleb(0x4e)],
  /** v128.andnot a b = a & ~b */
  v128AndNot: [0xfd, ...uleb(0x4f)],
  v128Or: [0xfd, ...uleb(0x50)],
  /** v128.bitselect a b c = (a & c) | (b & ~c) */
  v128Bitselect: [0xfd, ...uleb(0x52)],
  f64x2PromoteLowF32x4: [0xfd, ...uleb(0x5f)],
  i64x2Eq: [0xfd, ...uleb(0xd6)],
  f64x2Sqrt: [0xfd, ...uleb(0xef)],
  f64x2Add: [0xfd, ...uleb(0xf0)],
  f64x2Sub: [0xfd, ...uleb(0xf1)],
  f64x2Mul: [0xfd, ...uleb(0xf2)],
  f32x4Add: [0xfd, ...uleb(228)],
  f32x4Mul: [0xfd, ...uleb(230)],
};

/** One exported function of {@link wasmModule}. */
export interface WasmFunction {
  /** Export name. */
  name: string;
  /** Parameter and result types (wasmType values). */
  params: number[];
  results: number[];
  /** Local declarations after the parameters: [count, type]. */
  locals: [number, number][];
  /** The body's instructions, without the final `end`. */
  code: number[];
}

/**
 * The bytes of a module importing `env.memory` (at least one page) and exporting one function.
 *
 * @param fn the function
 * @returns the module's bytes
 * @example
 * ```ts
 * import { wasmModule, wasmOp, wasmType } from "./module_builder.ts";
 * import assert from "node:assert/strict";
 * const bytes = wasmModule({
 *   name: "twice",
 *   params: [wasmType.i32],
 *   results: [wasmType.i32],
 *   locals: [],
 *   code: [...wasmOp.localGet(0), ...wasmOp.localGet(0), ...wasmOp.i32Add],
 * });
 * const memory = new WebAssembly.Memory({ initial: 1 });
 * const m = new WebAssembly.Instance(new WebAssembly.Module(bytes), { env: { memory } });
 * assert.equal((m.exports.twice as (x: number) => number)(21), 42);
 * ```
 */
export function wasmModule(fn: WasmFunction): Uint8Array<ArrayBuffer> {
  const body = [
    ...uleb(fn.locals.length),
    ...fn.locals.flatMap(([count, type]) => [...uleb(count), type]),
    ...fn.code,
    0x0b,
  ];
  const name = (s: string) => {
    const b = [...new TextEncoder().encode(s)];
    return [...uleb(b.length), ...b];
  };
  const section = (id: number, items: number[][]) => {
    const content = [...uleb(items.length), ...items.flat()];
    return [id, ...uleb(content.length), ...content];
  };
  const vec = (types: number[]) => [...uleb(types.length), ...types];
  return new Uint8Array([
    0x00,
    0x61,
    0x73,
    0x6d,
    1,
    0,
    0,
    0,
    ...section(1, [[0x60, ...vec(fn.params), ...vec(fn.results)]]), // type
    ...section(2, [[...name("env"), ...name("memory"), 0x02, 0x00, 1]]), // memory, min 1 page
    ...section(3, [[0]]), // function 0 has type 0
    ...section(7, [[...name(fn.name), 0x00, 0]]), // export
    ...section(10, [[...uleb(body.length), ...body]]),
  ]);
}

/**
 * The compiled module of `bytes`, or null where this runtime has no WebAssembly or rejects the
 * module (e.g. no SIMD); the kernels then take their plain path.
 *
 * @param bytes a module from {@link wasmModule}
 * @returns the module, or null
 * @example
 * ```ts
 * import { compileKernelOrNull } from "./module_builder.ts";
 * import assert from "node:assert/strict";
 * assert.equal(compileKernelOrNull(new Uint8Array([1, 2, 3])), null);
 * ```
 */
export function compileKernelOrNull(bytes: Uint8Array<ArrayBuffer>): WebAssembly.Module | null {
  return typeof WebAssembly === "object" && WebAssembly.validate(bytes)
    ? new WebAssembly.Module(bytes)
    : null;
}

/**
 * Instantiate a kernel module from {@link wasmModule} on `memory` (its `env.memory` import)
 * and return its one exported function.
 *
 * @param module the compiled kernel
 * @param memory the memory it works in
 * @param name the exported function's name
 * @returns the function
 * @example
 * ```ts
 * import { kernelFunction, wasmModule, wasmOp, wasmType } from "./module_builder.ts";
 * import assert from "node:assert/strict";
 * const bytes = wasmModule({
 *   name: "one",
 *   params: [],
 *   results: [wasmType.i32],
 *   locals: [],
 *   code: [...wasmOp.i32Const(1)],
 * });
 * const memory = new WebAssembly.Memory({ initial: 1 });
 * const one = kernelFunction<() => number>(new WebAssembly.Module(bytes), memory, "one");
 * assert.equal(one(), 1);
 * ```
 */
export function kernelFunction<F>(
  module: WebAssembly.Module,
  memory: WebAssembly.Memory,
  name: string,
): F {
  return new WebAssembly.Instance(module, { env: { memory } }).exports[name] as F;
}
