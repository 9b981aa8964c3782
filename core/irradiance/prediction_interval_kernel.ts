/**
 * The per-cell arithmetic of a reconstruction's prediction interval
 * (./proxy_reconstruction.ts): the total predictive variance Var, the sum over the error
 * model's parts of their squared loadings by source (./reconstruction_error_model.ts), the
 * value ŷ = β₀ + Σ_k β_k·x_k, the SD √Var and the bounds ŷ ∓ z·SD, a block of cells at a
 * time, in WebAssembly SIMD (128-bit f64x2 lanes over pairs of cells).
 *
 * Every number is computed with the operations of the plain TypeScript path
 * (`proxyReconstructionVariance` in ./proxy_reconstruction_errors.ts, then the values and
 * intervals of ./proxy_reconstruction.ts), in the same order, with a rounded product then a
 * rounded sum (IEEE 754 binary64, no fused multiply-add; the square root is correctly rounded
 * in both), so the results are bit-identical to that path and the same on every machine:
 * - a loading that is a linear combination of whole-series columns, l = s·(c₀ + Σ_a x_a·c_a)
 *   summed in the order of a, is +0 where its mask is 0 (a bitwise and with the mask's
 *   all-ones lanes), and its square is added to its source's sum, which starts at +0;
 * - any other loading (curved mappings, the sunspot number's error, residual processes on
 *   cells of unequal lengths) is computed in TypeScript a block at a time and enters as a
 *   one-column part (0 + l·1)·1 = l;
 * - Var = 0 + calibration + residual + mapping + input; cells without a value (mask 0) get
 *   the quiet NaN 0x7ff8000000000000, as TypeScript writes `NaN`.
 *
 * One module is emitted per shape of model (how many parts of how many columns per source,
 * how many regressors; the bands of one spectral model share it) by a small assembler
 * (core/wasm/module_builder.ts), with every part unrolled. In WAT terms, with $t the byte
 * offset of a pair of cells in the block:
 *
 * ```wat
 * (func $cells (param $fp i32) (param $ip i32) (param $end i32)
 *   read c₀, s, c_a of every part, β and z from $fp into f64x2 registers (splat), and the
 *   block addresses of every part's mask and columns, the cell mask, the regressors and the
 *   outputs from $ip into locals
 *   loop over t < $end (16 bytes per pair):
 *     for each source g:  S_g = 0
 *       for each part:    acc = c₀; acc = f64x2.add (acc, f64x2.mul (v128.load (x_a + t), c_a))…
 *                         l = v128.and (f64x2.mul (s, acc), v128.load (mask + t))
 *                         S_g = f64x2.add (S_g, f64x2.mul (l, l))
 *     var = 0 + S_0 + S_1 + S_2 + S_3;  v = β₀ + β₁·x₁ + …;  sd = f64x2.sqrt var
 *     store v, sd, v − z·sd, v + z·sd (v128.bitselect with NaN where the cell mask is 0)
 * )
 * ```
 *
 * Written by hand because no maintained npm package offers these fused float64 passes in
 * WebAssembly (the plain path writes and re-reads about 25 arrays per block of cells), and a
 * BLAS would round differently on different machines. Measured on the 2-core test machine
 * (Deno 2.9.6, 101 band models × 119,000 daily cells of test/bench/spectral_case.ts, one
 * thread, 7 rounds alternating with the plain path, load average 6–7 from other jobs): median
 * 632 ms against 1,509 ms (0.42; per round 0.35–0.46), the same numbers bit for bit (one
 * SHA-256 over every value, SD and bound).
 *
 * @module
 */
import { kernelFunction, wasmModule, wasmOp as op, wasmType } from "../wasm/module_builder.ts";

const { i32, v128 } = wasmType;
/** The quiet NaN JavaScript writes for `NaN` (0x7ff8000000000000), little-endian. */
const NAN_BYTES = [0, 0, 0, 0, 0, 0, 0xf8, 0x7f];

/**
 * The shape of one model's kernel: per source (calibration, residual, mapping, input), the
 * number of columns of each of its parts in model order (a part computed in TypeScript counts
 * as one column: its loading, with c₀ = 0, c = 1, s = 1 and a mask of ones, which gives the
 * loading itself), and the number of regressors.
 */
export interface PredictionShape {
  parts: number[][];
  terms: number;
}

/**
 * The kernel module for one shape (see the listing in the module documentation): every
 * constant (c₀, s, c_a of each part, β, z) is read once per call into a register, the column,
 * mask and output addresses into locals, and each pair of cells runs the parts straight
 * through, so the four sums stay in registers.
 *
 * Memory read at call time: from `fp`, per part c₀, s, c_0 … (f64), then β_0 … β_K, z; from
 * `ip`, per part the mask's and the columns' addresses of the block (i32), then the cell mask,
 * the regressors and the output's address (value, SD, lower, upper, `PREDICTION_BLOCK`
 * values apart).
 *
 * @param shape {@link PredictionShape}
 * @returns a WebAssembly module importing `env.memory` and exporting `cells(fp, ip, end)`
 * @example
 * ```ts
 * import { predictionIntervalModule } from "./prediction_interval_kernel.ts";
 * import assert from "node:assert/strict";
 * assert.ok(WebAssembly.validate(predictionIntervalModule({ parts: [[2, 2, 1], [0], [1], []], terms: 2 })));
 * ```
 */
export function predictionIntervalModule(shape: PredictionShape): Uint8Array<ArrayBuffer> {
  const FP = 0, IP = 1, END = 2, T = 3;
  let nI32 = 0, nV = 0;
  const i32Local = () => 4 + nI32++;
  const vLocal = () => {
    const k = nV++;
    return k;
  };
  // locals are numbered after all i32 locals are known: collect first, number later
  type Part = { init: number; scale: number; cs: number[]; mask: number; cols: number[] };
  const parts: Part[][] = shape.parts.map((g) =>
    g.map((ncols) => ({
      init: vLocal(),
      scale: vLocal(),
      cs: Array.from({ length: ncols }, vLocal),
      mask: i32Local(),
      cols: Array.from({ length: ncols }, i32Local),
    }))
  );
  const betas = Array.from({ length: shape.terms + 1 }, vLocal);
  const zv = vLocal(), acc = vLocal(), l = vLocal(), nan = vLocal(), v = vLocal(), sd = vLocal();
  const m = vLocal(), variance = vLocal();
  const sums = [vLocal(), vLocal(), vLocal(), vLocal()];
  const cellMask = i32Local(), outp = i32Local();
  const xs = Array.from({ length: shape.terms }, i32Local);
  const V0 = 4 + nI32; // first v128 local
  const vl = (k: number) => V0 + k;
  const code: number[] = [];
  const emit = (...ps: number[][]) => {
    for (const p of ps) code.push(...p);
  };
  // constants and addresses
  let f = 0, i = 0;
  const f64At = (local: number) =>
    emit(op.localGet(FP), op.v128Load64Splat(8 * f++), op.localSet(vl(local)));
  const i32At = (local: number) => emit(op.localGet(IP), op.i32Load(4 * i++), op.localSet(local));
  for (const g of parts) {
    for (const p of g) {
      f64At(p.init);
      f64At(p.scale);
      p.cs.forEach(f64At);
      i32At(p.mask);
      p.cols.forEach(i32At);
    }
  }
  betas.forEach(f64At);
  f64At(zv);
  i32At(cellMask);
  xs.forEach(i32At);
  i32At(outp);
  emit(op.v128ConstF64x2(NAN_BYTES), op.localSet(vl(nan)));
  emit(op.i32Const(0), op.localSet(T));
  emit(op.block, op.loop); // over pairs of cells
  emit(op.localGet(T), op.localGet(END), op.i32Eq, op.brIf(1));
  const load = (ptr: number) => emit(op.localGet(ptr), op.localGet(T), op.i32Add, op.v128Load(0));
  parts.forEach((g, gi) => {
    const S = vl(sums[gi]);
    emit(op.v128Zero, op.localSet(S));
    for (const p of g) {
      // acc = c₀ + x_0·c_0 + x_1·c_1 + …
      emit(op.localGet(vl(p.init)), op.localSet(vl(acc)));
      p.cols.forEach((col, a) => {
        emit(op.localGet(vl(acc)));
        load(col);
        emit(op.localGet(vl(p.cs[a])), op.f64x2Mul, op.f64x2Add, op.localSet(vl(acc)));
      });
      // l = (s·acc) & mask; S = S + l·l
      emit(op.localGet(vl(p.scale)), op.localGet(vl(acc)), op.f64x2Mul);
      load(p.mask);
      emit(op.v128And, op.localSet(vl(l)));
      emit(op.localGet(S), op.localGet(vl(l)), op.localGet(vl(l)), op.f64x2Mul, op.f64x2Add);
      emit(op.localSet(S));
    }
  });
  // Var = 0 + S_calibration + S_residual + S_mapping + S_input
  emit(op.v128Zero);
  for (const S of sums) emit(op.localGet(vl(S)), op.f64x2Add);
  emit(op.localSet(vl(variance)));
  // ŷ = β₀ + β₁·x₁ + …
  emit(op.localGet(vl(betas[0])), op.localSet(vl(v)));
  xs.forEach((x, k) => {
    emit(op.localGet(vl(v)), op.localGet(vl(betas[k + 1])));
    load(x);
    emit(op.f64x2Mul, op.f64x2Add, op.localSet(vl(v)));
  });
  emit(op.localGet(vl(variance)), op.f64x2Sqrt, op.localSet(vl(sd)));
  load(cellMask);
  emit(op.localSet(vl(m)));
  const store = (k: number, value: number[]) => {
    emit(op.localGet(outp), op.localGet(T), op.i32Add, value);
    emit(op.localGet(vl(nan)), op.localGet(vl(m)), op.v128Bitselect, op.v128Store(k * BLOCK_BYTES));
  };
  const zs = [...op.localGet(vl(zv)), ...op.localGet(vl(sd)), ...op.f64x2Mul];
  store(0, op.localGet(vl(v)));
  store(1, op.localGet(vl(sd)));
  store(2, [...op.localGet(vl(v)), ...zs, ...op.f64x2Sub]);
  store(3, [...op.localGet(vl(v)), ...zs, ...op.f64x2Add]);
  emit(op.localGet(T), op.i32Const(16), op.i32Add, op.localSet(T), op.br(0));
  emit(op.end, op.end);
  return wasmModule({
    name: "cells",
    params: [i32, i32, i32],
    results: [],
    locals: [[1 + nI32, i32], [nV, v128]],
    code,
  });
}

/** Cells per block (the block's outputs and loadings stay in the processor's cache). */
export const PREDICTION_BLOCK = 2048;
const BLOCK_BYTES = PREDICTION_BLOCK * 8;

/** A linear loading: s·(c₀ + Σ_a x_a·c_a) where mask ≠ 0, else 0. */
export interface LinearLoading {
  init: number;
  xs: readonly Float64Array[];
  cs: readonly number[];
  mask: Uint8Array;
  scale: number;
}

/** The four outputs of a reconstruction. */
export interface PredictionOutputs {
  value: Float64Array;
  sd: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
}

/**
 * The kernel with its own memory: whole-series columns and masks copied in once (and reused
 * by every model that reads the same arrays), the loadings computed in TypeScript, and the
 * block's four outputs.
 */
export interface PredictionIntervalKernel {
  /**
   * Bind one model: per source, its parts in model order (null: a loading computed in
   * TypeScript into `scratch(j)`, j counting the null parts from 0), the regressors, β, the
   * cells with a value (mask ≠ 0) and the interval's quantile.
   * @returns false (nothing bound) when the model has more parts than the kernel holds (more
   *   than 16 TypeScript loadings, or more than 1,024 constants or addresses): the caller
   *   then uses the plain path
   */
  bind(
    groups: readonly (LinearLoading | null)[][],
    xs: readonly Float64Array[],
    beta: readonly number[],
    mask: Uint8Array,
    z: number,
  ): boolean;
  /** Where the bound model's j-th TypeScript loading of a block goes (PREDICTION_BLOCK values). */
  scratch(j: number): Float64Array;
  /** Var, ŷ, √Var and ŷ ∓ z·√Var of the bound model on cells [i0, i0 + m) into out at i0. */
  cells(i0: number, m: number, out: PredictionOutputs): void;
}

let kernelsOk: boolean | undefined;
const shapes = new Map<string, WebAssembly.Module>();

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
 * // one calibration part (0.5 + 2x) and no other source
 * assert.ok(k.bind([[{ init: 0.5, xs: [x], cs: [2], mask, scale: 1 }], [], [], []], [x], [1, 10], mask, 2));
 * const out = { value: new Float64Array(3), sd: new Float64Array(3),
 *   lower: new Float64Array(3), upper: new Float64Array(3) };
 * k.cells(0, 3, out);
 * assert.deepEqual([...out.value.subarray(0, 2)], [11, 21]);
 * assert.deepEqual([...out.sd.subarray(0, 2)], [2.5, 4.5]);
 * assert.deepEqual([...out.lower.subarray(0, 2)], [6, 12]);
 * assert.ok(Number.isNaN(out.upper[2]));
 * ```
 */
export function predictionIntervalKernel(n: number): PredictionIntervalKernel | null {
  if (kernelsOk === undefined) {
    kernelsOk = typeof WebAssembly === "object" &&
      WebAssembly.validate(predictionIntervalModule({ parts: [[1], [0], [], []], terms: 1 }));
  }
  if (!kernelsOk) return null;
  const B = PREDICTION_BLOCK, MAX_SCRATCH = 16;
  // fixed region: outputs (4 blocks), ones (one block), TypeScript loadings (16 blocks),
  // constants (f64) and addresses (i32); then whole-series columns and masks, n + 1 values
  // each (the last pair of an odd series reads one value past its end)
  const OUTP = 0, ONES = 4 * BLOCK_BYTES, SCRATCH = 5 * BLOCK_BYTES;
  const FP = SCRATCH + MAX_SCRATCH * BLOCK_BYTES, F_SLOTS = 1024, IP = FP + 8 * F_SLOTS;
  const I_SLOTS = 1024, FIXED = IP + 4 * I_SLOTS;
  const columnBytes = Math.ceil(((n + 1) * 8) / 16) * 16;
  let top = FIXED;
  const memory = new WebAssembly.Memory({ initial: Math.ceil(FIXED / 65536) });
  new Int32Array(memory.buffer, ONES, 2 * B).fill(-1);
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
  // the bound model: its kernel, the address slots rebased per block (slot, series address)
  type Cells = (fp: number, ip: number, end: number) => void;
  let run: Cells | null = null;
  let rebase: number[] = [];
  let fs: Float64Array = new Float64Array(0), is: Int32Array = new Int32Array(0);
  let out4: Float64Array = new Float64Array(0);
  const views = () => {
    fs = new Float64Array(memory.buffer, FP, F_SLOTS);
    is = new Int32Array(memory.buffer, IP, I_SLOTS);
    out4 = new Float64Array(memory.buffer, OUTP, 4 * B);
  };
  return {
    bind(groups, xs, beta, mask, z) {
      run = null;
      let jsParts = 0, nConsts = xs.length + 2, nAddresses = xs.length + 2;
      for (const g of groups) {
        for (const p of g) {
          jsParts += p ? 0 : 1;
          nConsts += p ? 2 + p.xs.length : 3;
          nAddresses += p ? 1 + p.xs.length : 2;
        }
      }
      if (jsParts > MAX_SCRATCH || nConsts > F_SLOTS || nAddresses > I_SLOTS) return false;
      const shape: PredictionShape = {
        parts: groups.map((g) => g.map((p) => (p ? p.xs.length : 1))),
        terms: xs.length,
      };
      // addresses first: the memory may grow
      const address: (readonly [number, boolean])[] = []; // [address, rebased per block]
      const consts: number[] = [];
      let scratchUsed = 0;
      for (const g of groups) {
        for (const p of g) {
          if (p) {
            consts.push(p.init, p.scale, ...p.cs);
            address.push([maskAt(p.mask), true], ...p.xs.map((x) => [column(x), true] as const));
          } else {
            consts.push(0, 1, 1);
            address.push([ONES, false], [SCRATCH + BLOCK_BYTES * scratchUsed++, false]);
          }
        }
      }
      consts.push(...beta.slice(0, xs.length + 1), z);
      address.push([maskAt(mask), true], ...xs.map((x) => [column(x), true] as const));
      address.push([OUTP, false]);
      views();
      fs.set(consts);
      rebase = [];
      address.forEach(([a, r], k) => {
        is[k] = a;
        if (r) rebase.push(k, a);
      });
      const key = JSON.stringify(shape);
      let module = shapes.get(key);
      if (!module) {
        shapes.set(key, module = new WebAssembly.Module(predictionIntervalModule(shape)));
      }
      run = kernelFunction<Cells>(module, memory, "cells");
      return true;
    },
    scratch: (j) => new Float64Array(memory.buffer, SCRATCH + BLOCK_BYTES * j, B),
    cells(i0, m, out) {
      for (let k = 0; k < rebase.length; k += 2) is[rebase[k]] = rebase[k + 1] + 8 * i0;
      run!(FP, IP, Math.ceil(m / 2) * 16);
      out.value.set(out4.subarray(0, m), i0);
      out.sd.set(out4.subarray(B, B + m), i0);
      out.lower.set(out4.subarray(2 * B, 2 * B + m), i0);
      out.upper.set(out4.subarray(3 * B, 3 * B + m), i0);
    },
  };
}
