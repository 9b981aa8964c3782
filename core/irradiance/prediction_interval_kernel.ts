/**
 * The per-cell arithmetic of a reconstruction's prediction interval
 * (./proxy_reconstruction.ts): the total predictive variance Var = Σ over the error model's
 * parts of their squared loadings, summed by source (core/irradiance/reconstruction_error_model.ts),
 * the value ŷ = β₀ + Σ_k β_k·x_k, the SD √Var and the bounds ŷ ∓ z·SD, a block of cells at a
 * time, in WebAssembly SIMD (128-bit f64x2 lanes over pairs of cells).
 *
 * Every number is computed with the operations of the plain TypeScript path
 * (`proxyReconstructionVariance` in ./proxy_reconstruction_errors.ts, then the values and
 * intervals of ./proxy_reconstruction.ts), in the same order, with a rounded product then a
 * rounded sum (IEEE 754 binary64, no fused multiply-add; the square root is correctly rounded
 * in both), so the results are bit-identical to that path and the same on every machine:
 * - a loading that is a linear combination of columns, l = s·(c₀ + Σ_a x_a·c_a) summed in the
 *   order of a, is +0 where its mask is 0 (a bitwise and with the mask's all-ones lanes), and
 *   its square is added to its source's sum, which starts at +0;
 * - any other loading (residual processes, the sunspot number's error, curved mappings) is
 *   computed in TypeScript into the kernel's memory and squared and added there;
 * - Var = 0 + calibration + residual + mapping + input; cells without a value (mask 0) get
 *   the quiet NaN 0x7ff8000000000000, as TypeScript writes `NaN`.
 *
 * Written by hand because no maintained npm package offers these fused float64 passes in
 * WebAssembly, and the plain path writes and re-reads about 25 arrays per cell block. Measured
 * on the 2-core test machine (Deno 2.9.6, 101 band models × 119,000 daily cells, one thread,
 * test/bench/spectral_case.ts): see the commit adding this kernel and the README's speed lines.
 *
 * The three functions are emitted from the listings below by a small assembler
 * (core/wasm/module_builder.ts). In WAT terms, with $t the byte offset of a pair of cells in
 * the block and $off the block's byte offset in the whole series:
 *
 * ```wat
 * (func $combine (param $out $table $ncols $coefs i32) (param $init $scale f64)
 *                (param $mask $off $end i32)
 *   loop over t < $end (16 bytes per pair):
 *     acc = f64x2.splat $init
 *     loop over columns a < $ncols:
 *       acc = f64x2.add (acc, f64x2.mul (v128.load (i32.load ($table + 4a) + $off + t),
 *                                        v128.load64_splat ($coefs + 8a)))
 *     l = v128.and (f64x2.mul (f64x2.splat $scale, acc), v128.load ($mask + $off + t))
 *     v128.store ($out + t) (f64x2.add (v128.load ($out + t), f64x2.mul (l, l)))
 * )
 * (func $square (param $out $src $end i32)
 *   loop over t < $end: $out[t] = f64x2.add ($out[t], f64x2.mul ($src[t], $src[t]))
 * )
 * (func $finish (param $sums $stride $table $nterms $beta $mask $off i32) (param $z f64)
 *               (param $outp $end i32)
 *   loop over t < $end:
 *     var = 0 + sums[0][t] + sums[1][t] + sums[2][t] + sums[3][t]   ;; $stride bytes apart
 *     v = v128.load64_splat $beta; then v = v + β_{k+1}·x_k for k < $nterms (table as above)
 *     s = f64x2.sqrt var; m = v128.load ($mask + $off + t)
 *     out[0..3][t] = v128.bitselect ((v, s, v − z·s, v + z·s), NaN, m)
 * )
 * ```
 *
 * @module
 */
import { wasmModule, wasmOp as op, wasmType } from "../wasm/module_builder.ts";

const { i32, f64, v128 } = wasmType;
/** The quiet NaN JavaScript writes for `NaN` (0x7ff8000000000000), little-endian. */
const NAN_BYTES = [0, 0, 0, 0, 0, 0, 0xf8, 0x7f];

/** Code that leaves the address `i32.load(table + a) + off + t` on the stack. */
const columnAddress = (table: number, a: number, off: number, t: number) => [
  ...op.localGet(table),
  ...op.localGet(a),
  ...op.i32Add,
  ...op.i32Load(0),
  ...op.localGet(off),
  ...op.i32Add,
  ...op.localGet(t),
  ...op.i32Add,
];

/** `combine`: the squared masked linear combination added to a sum (see the listing). */
function combineModule(): Uint8Array<ArrayBuffer> {
  const [OUT, TABLE, NCOLS, COEFS, INIT, SCALE, MASK, OFF, END, T, A, TEND, ACC, L, SI, SS] = Array
    .from({ length: 16 }, (_, i) => i);
  const code: number[] = [];
  const emit = (...parts: number[][]) => {
    for (const p of parts) code.push(...p);
  };
  emit(op.localGet(INIT), op.f64x2Splat, op.localSet(SI));
  emit(op.localGet(SCALE), op.f64x2Splat, op.localSet(SS));
  emit(op.localGet(NCOLS), op.i32Const(4), op.i32Mul, op.localSet(TEND));
  emit(op.i32Const(0), op.localSet(T));
  emit(op.block, op.loop); // over pairs of cells
  emit(op.localGet(T), op.localGet(END), op.i32Eq, op.brIf(1));
  emit(op.localGet(SI), op.localSet(ACC), op.i32Const(0), op.localSet(A));
  emit(op.block, op.loop); // over columns
  emit(op.localGet(A), op.localGet(TEND), op.i32Eq, op.brIf(1));
  emit(op.localGet(ACC), columnAddress(TABLE, A, OFF, T), op.v128Load(0));
  emit(op.localGet(COEFS), op.localGet(A), op.localGet(A), op.i32Add, op.i32Add);
  emit(op.v128Load64Splat(0), op.f64x2Mul, op.f64x2Add, op.localSet(ACC));
  emit(op.localGet(A), op.i32Const(4), op.i32Add, op.localSet(A), op.br(0));
  emit(op.end, op.end);
  emit(op.localGet(SS), op.localGet(ACC), op.f64x2Mul);
  emit(op.localGet(MASK), op.localGet(OFF), op.i32Add, op.localGet(T), op.i32Add);
  emit(op.v128Load(0), op.v128And, op.localSet(L));
  emit(op.localGet(OUT), op.localGet(T), op.i32Add);
  emit(op.localGet(OUT), op.localGet(T), op.i32Add, op.v128Load(0));
  emit(op.localGet(L), op.localGet(L), op.f64x2Mul, op.f64x2Add, op.v128Store(0));
  emit(op.localGet(T), op.i32Const(16), op.i32Add, op.localSet(T), op.br(0));
  emit(op.end, op.end);
  return wasmModule({
    name: "combine",
    params: [i32, i32, i32, i32, f64, f64, i32, i32, i32],
    results: [],
    locals: [[3, i32], [4, v128]],
    code,
  });
}

/** `square`: a loading computed elsewhere, squared and added to a sum. */
function squareModule(): Uint8Array<ArrayBuffer> {
  const [OUT, SRC, END, T, X] = [0, 1, 2, 3, 4];
  const code: number[] = [];
  const emit = (...parts: number[][]) => {
    for (const p of parts) code.push(...p);
  };
  emit(op.i32Const(0), op.localSet(T));
  emit(op.block, op.loop);
  emit(op.localGet(T), op.localGet(END), op.i32Eq, op.brIf(1));
  emit(op.localGet(SRC), op.localGet(T), op.i32Add, op.v128Load(0), op.localSet(X));
  emit(op.localGet(OUT), op.localGet(T), op.i32Add);
  emit(op.localGet(OUT), op.localGet(T), op.i32Add, op.v128Load(0));
  emit(op.localGet(X), op.localGet(X), op.f64x2Mul, op.f64x2Add, op.v128Store(0));
  emit(op.localGet(T), op.i32Const(16), op.i32Add, op.localSet(T), op.br(0));
  emit(op.end, op.end);
  return wasmModule({
    name: "square",
    params: [i32, i32, i32],
    results: [],
    locals: [[1, i32], [1, v128]],
    code,
  });
}

/** `finish`: the total variance, the value, the SD and the bounds (see the listing). */
function finishModule(): Uint8Array<ArrayBuffer> {
  const [SUMS, STRIDE, TABLE, NTERMS, BETA, MASK, OFF, Z, OUTP, END] = Array.from(
    { length: 10 },
    (_, i) => i,
  );
  const [T, A, TEND, V, S, SZ, NAN, M, VAR] = Array.from({ length: 9 }, (_, i) => 10 + i);
  const code: number[] = [];
  const emit = (...parts: number[][]) => {
    for (const p of parts) code.push(...p);
  };
  /** address base + k·stride + t */
  const at = (base: number, k: number) => {
    const c = [...op.localGet(base)];
    for (let j = 0; j < k; j++) c.push(...op.localGet(STRIDE), ...op.i32Add);
    c.push(...op.localGet(T), ...op.i32Add);
    return c;
  };
  emit(op.localGet(Z), op.f64x2Splat, op.localSet(SZ));
  emit(op.v128ConstF64x2(NAN_BYTES), op.localSet(NAN));
  emit(op.localGet(NTERMS), op.i32Const(4), op.i32Mul, op.localSet(TEND));
  emit(op.i32Const(0), op.localSet(T));
  emit(op.block, op.loop); // over pairs of cells
  emit(op.localGet(T), op.localGet(END), op.i32Eq, op.brIf(1));
  emit(op.v128Zero);
  for (let g = 0; g < 4; g++) emit(at(SUMS, g), op.v128Load(0), op.f64x2Add);
  emit(op.localSet(VAR));
  emit(op.localGet(BETA), op.v128Load64Splat(0), op.localSet(V), op.i32Const(0), op.localSet(A));
  emit(op.block, op.loop); // over terms
  emit(op.localGet(A), op.localGet(TEND), op.i32Eq, op.brIf(1));
  emit(op.localGet(V));
  emit(op.localGet(BETA), op.localGet(A), op.localGet(A), op.i32Add, op.i32Add);
  emit(op.v128Load64Splat(8), columnAddress(TABLE, A, OFF, T), op.v128Load(0));
  emit(op.f64x2Mul, op.f64x2Add, op.localSet(V));
  emit(op.localGet(A), op.i32Const(4), op.i32Add, op.localSet(A), op.br(0));
  emit(op.end, op.end);
  emit(op.localGet(VAR), op.f64x2Sqrt, op.localSet(S));
  emit(op.localGet(MASK), op.localGet(OFF), op.i32Add, op.localGet(T), op.i32Add);
  emit(op.v128Load(0), op.localSet(M));
  const store = (k: number, value: number[]) =>
    emit(at(OUTP, k), value, op.localGet(NAN), op.localGet(M), op.v128Bitselect, op.v128Store(0));
  store(0, op.localGet(V));
  store(1, op.localGet(S));
  const zs = [...op.localGet(SZ), ...op.localGet(S), ...op.f64x2Mul];
  store(2, [...op.localGet(V), ...zs, ...op.f64x2Sub]);
  store(3, [...op.localGet(V), ...zs, ...op.f64x2Add]);
  emit(op.localGet(T), op.i32Const(16), op.i32Add, op.localSet(T), op.br(0));
  emit(op.end, op.end);
  return wasmModule({
    name: "finish",
    params: [i32, i32, i32, i32, i32, i32, i32, f64, i32, i32],
    results: [],
    locals: [[3, i32], [6, v128]],
    code,
  });
}

/**
 * The kernel modules' bytes (see the module documentation for their listings).
 *
 * @returns three WebAssembly modules importing `env.memory`, exporting `combine`, `square`
 *   and `finish`
 * @example
 * ```ts
 * import { predictionIntervalModules } from "./prediction_interval_kernel.ts";
 * import assert from "node:assert/strict";
 * const m = predictionIntervalModules();
 * assert.ok(WebAssembly.validate(m.combine) && WebAssembly.validate(m.square));
 * assert.ok(WebAssembly.validate(m.finish));
 * ```
 */
export function predictionIntervalModules(): Record<
  "combine" | "square" | "finish",
  Uint8Array<ArrayBuffer>
> {
  return { combine: combineModule(), square: squareModule(), finish: finishModule() };
}

/** Cells per block (the block's sums and outputs stay in the processor's cache). */
export const PREDICTION_BLOCK = 2048;

/** A linear loading: s·(c₀ + Σ_a x_a·c_a) where mask ≠ 0, else 0. */
export interface LinearLoading {
  init: number;
  xs: readonly Float64Array[];
  cs: readonly number[];
  mask: Uint8Array;
  scale: number;
}

/**
 * The kernel with its own memory: whole-series columns and masks copied in once (and reused by
 * every model that reads the same arrays), a block's four source sums, one scratch loading and
 * the block's four outputs.
 */
export interface PredictionIntervalKernel {
  /** Whether `combine` can read these arrays (columns and mask copied in, or copyable). */
  register(part: LinearLoading): void;
  /** Zero the four source sums of a block. */
  clear(): void;
  /** Add a linear loading's squares on cells [i0, i0 + m) to source sum g. */
  combine(g: number, part: LinearLoading, i0: number, m: number): void;
  /** Where a loading computed in TypeScript goes (PREDICTION_BLOCK values). */
  scratch(): Float64Array;
  /** Add the scratch loading's squares (m cells) to source sum g. */
  square(g: number, m: number): void;
  /**
   * Var, ŷ = β₀ + Σ β_k·x_k, √Var and ŷ ∓ z·√Var on cells [i0, i0 + m) into the outputs
   * at i0; NaN where mask = 0.
   */
  finish(
    xs: readonly Float64Array[],
    beta: readonly number[],
    mask: Uint8Array,
    z: number,
    i0: number,
    m: number,
    out: { value: Float64Array; sd: Float64Array; lower: Float64Array; upper: Float64Array },
  ): void;
}

let modules: Record<"combine" | "square" | "finish", WebAssembly.Module> | null | undefined;

/**
 * A new kernel for series of n cells, or null where WebAssembly SIMD is missing (the caller
 * then keeps the plain TypeScript path).
 *
 * @param n cells of the series
 * @returns the kernel, or null
 * @example
 * ```ts
 * import { predictionIntervalKernel } from "./prediction_interval_kernel.ts";
 * import assert from "node:assert/strict";
 * const k = predictionIntervalKernel(3)!;
 * const x = Float64Array.of(1, 2, 3), mask = Uint8Array.of(1, 1, 0);
 * const part = { init: 0.5, xs: [x], cs: [2], mask, scale: 1 };
 * k.register(part);
 * k.clear();
 * k.combine(0, part, 0, 3); // calibration: (0.5 + 2x)²
 * const out = { value: new Float64Array(3), sd: new Float64Array(3),
 *   lower: new Float64Array(3), upper: new Float64Array(3) };
 * k.finish([x], [1, 10], mask, 2, 0, 3, out);
 * assert.deepEqual([...out.value.subarray(0, 2)], [11, 21]);
 * assert.deepEqual([...out.sd.subarray(0, 2)], [2.5, 4.5]);
 * assert.deepEqual([...out.lower.subarray(0, 2)], [6, 12]);
 * assert.ok(Number.isNaN(out.upper[2]));
 * ```
 */
export function predictionIntervalKernel(n: number): PredictionIntervalKernel | null {
  if (modules === undefined) {
    const b = predictionIntervalModules();
    const ok = typeof WebAssembly === "object" && WebAssembly.validate(b.combine) &&
      WebAssembly.validate(b.square) && WebAssembly.validate(b.finish);
    modules = ok
      ? {
        combine: new WebAssembly.Module(b.combine),
        square: new WebAssembly.Module(b.square),
        finish: new WebAssembly.Module(b.finish),
      }
      : null;
  }
  if (!modules) return null;
  const B = PREDICTION_BLOCK, blockBytes = B * 8;
  // fixed region: 4 sums, 1 scratch loading, 4 outputs, a table of 64 column addresses and
  // 64 coefficients; then whole-series columns and masks, n + 1 values each (the last pair of
  // an odd series reads one value past its end)
  const SUMS = 0, SCRATCH = 4 * blockBytes, OUTP = 5 * blockBytes, TABLE = 9 * blockBytes;
  const COEFS = TABLE + 256, FIXED = COEFS + 512;
  const columnBytes = Math.ceil(((n + 1) * 8) / 16) * 16;
  let top = FIXED;
  const memory = new WebAssembly.Memory({ initial: Math.ceil(FIXED / 65536) + 1 });
  const inst = (m: WebAssembly.Module) =>
    new WebAssembly.Instance(m, { env: { memory } }).exports as Record<string, CallableFunction>;
  const combine = inst(modules.combine).combine as (...a: number[]) => void;
  const square = inst(modules.square).square as (...a: number[]) => void;
  const finish = inst(modules.finish).finish as (...a: number[]) => void;
  const columns = new Map<Float64Array, number>();
  const masks = new Map<Uint8Array, number>();
  const reserve = (): number => {
    const at = top;
    top += columnBytes;
    const have = memory.buffer.byteLength;
    if (top > have) memory.grow(Math.ceil((top - have) / 65536));
    return at;
  };
  const column = (x: Float64Array): number => {
    let at = columns.get(x);
    if (at === undefined) {
      if (x.length !== n) throw new RangeError(`column of ${x.length} values, ${n} cells`);
      at = reserve();
      new Float64Array(memory.buffer, at, n + 1).set(x);
      columns.set(x, at);
    }
    return at;
  };
  const maskAt = (mask: Uint8Array): number => {
    let at = masks.get(mask);
    if (at === undefined) {
      if (mask.length !== n) throw new RangeError(`mask of ${mask.length} values, ${n} cells`);
      at = reserve();
      const w = new Int32Array(memory.buffer, at, 2 * (n + 1));
      for (let i = 0; i < n; i++) if (mask[i]) w[2 * i] = w[2 * i + 1] = -1;
      masks.set(mask, at);
    }
    return at;
  };
  const table = (xs: readonly Float64Array[], cs: readonly number[] | null) => {
    if (xs.length > 64) throw new RangeError(`${xs.length} columns, at most 64`);
    const t = new Int32Array(memory.buffer, TABLE, 64);
    xs.forEach((x, a) => (t[a] = column(x)));
    if (cs) new Float64Array(memory.buffer, COEFS, 64).set(cs);
  };
  const pairs = (m: number) => Math.ceil(m / 2) * 16;
  return {
    register(part) {
      part.xs.forEach(column);
      maskAt(part.mask);
    },
    clear() {
      new Float64Array(memory.buffer, SUMS, 4 * B).fill(0);
    },
    combine(g, part, i0, m) {
      table(part.xs, part.cs);
      combine(
        SUMS + g * blockBytes,
        TABLE,
        part.xs.length,
        COEFS,
        part.init,
        part.scale,
        maskAt(part.mask),
        i0 * 8,
        pairs(m),
      );
    },
    scratch: () => new Float64Array(memory.buffer, SCRATCH, B),
    square(g, m) {
      square(SUMS + g * blockBytes, SCRATCH, pairs(m));
    },
    finish(xs, beta, mask, z, i0, m, out) {
      table(xs, beta);
      finish(SUMS, blockBytes, TABLE, xs.length, COEFS, maskAt(mask), i0 * 8, z, OUTP, pairs(m));
      const o = new Float64Array(memory.buffer, OUTP, 4 * B);
      out.value.set(o.subarray(0, m), i0);
      out.sd.set(o.subarray(B, B + m), i0);
      out.lower.set(o.subarray(2 * B, 2 * B + m), i0);
      out.upper.set(o.subarray(3 * B, 3 * B + m), i0);
    },
  };
}
