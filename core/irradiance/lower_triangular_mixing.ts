/**
 * Correlated innovations e(t) = L·z(t) for many days t at once, L a lower-triangular B × B
 * factor (a Cholesky factor of a correlation matrix) and z(t) independent standard normal
 * vectors: the cross-band mixing of a spectral ensemble's residual processes
 * (./spectral_band_ensemble.ts), which costs B(B + 1)/2 multiply-adds per day and is most of a
 * member's time.
 *
 * Every e_a(t) is the sum Σ_{c ≤ a} L_ac·z_c(t) accumulated in the order c = 0, 1, …, a with a
 * rounded product then a rounded sum (IEEE 754 binary64, no fused multiply-add), so the
 * numbers are bit-identical to the plain loop {@link mixLowerTriangularJs} and the same on
 * every machine. Two engines with that arithmetic:
 * - {@link lowerTriangularMixer}: a WebAssembly SIMD kernel (128-bit f64x2 lanes over pairs of
 *   rows of L): L packed once into panels of 8 rows stored column by column, a register tile
 *   of 8 rows × 2 days accumulated over the columns of the panel (up to its last row; the
 *   packed zeros above the diagonal add +0 to a sum that starts at +0 and so change nothing);
 * - {@link mixLowerTriangularJs}: the same sums in plain TypeScript (the reference in tests,
 *   and the fallback where WebAssembly SIMD is missing).
 *
 * Written by hand because no maintained npm package offers a float64 triangular product in
 * WebAssembly, and a BLAS (through FFI) would round differently on different machines (it may
 * fuse multiply-adds and reorder the sums), so an ensemble's digest would depend on the
 * machine. The relaxed-SIMD fused multiply-add is not used for the same reason. Measured on
 * the 2-core test machine (Deno 2.9.6, B = 100, 119,000 days in blocks of 64, one thread, under
 * load): this kernel 4.7 GFLOP/s, the plain loop one day at a time 1.1; one spectral member of
 * test/bench/spectral_case.ts about 400 ms of CPU against 710 ms with the previous plain loop of
 * four days at a time (five members each, the same numbers bit for bit).
 *
 * The module is emitted from the listing below by a small assembler (a few opcodes of the
 * WebAssembly 2.0 binary format, §5), so the kernel is read and changed here. In WAT terms:
 *
 * ```wat
 * (func $mix (param $lp i32) (param $zp i32) (param $ep i32) (param $pairs i32)
 *            (param $zs i32) (param $es i32) (param $panels i32)  ;; strides in bytes
 *   loop over panels q < $panels (rows 8q … 8q + 7):
 *     cols = min(64 (q + 1), $zs)                     ;; bytes of z the panel reads
 *     loop over day pairs t < $pairs:
 *       acc[v][d] = f64x2 0                           ;; rows 8q + 2v, +1; days 2t + d
 *       loop over columns c:
 *         l[v] = v128.load (lc + 16 v)                ;; L[8q + 2v][c], L[8q + 2v + 1][c]
 *         s[d] = v128.load64_splat (z + d·$zs + 8 c)  ;; z_c of day 2t + d
 *         acc[v][d] = f64x2.add (acc[v][d], f64x2.mul (l[v], s[d]))
 *         lc += 64
 *       v128.store (ep + (2t + d)·$es + 64 q + 16 v) acc[v][d]
 *     lp += 8 · cols
 * )
 * ```
 *
 * @module
 */
import {
  compileKernelOrNull,
  kernelFunction,
  wasmModule,
  wasmOp as op,
  wasmType,
} from "../wasm/module_builder.ts";

/** Rows of L per panel (4 f64x2 vectors). */
const ROWS = 8;

/**
 * The kernel module's bytes (see the module documentation for its listing).
 *
 * @returns a WebAssembly module importing `env.memory` and exporting `mix`
 * @example
 * ```ts
 * import { lowerTriangularMixingModule } from "./lower_triangular_mixing.ts";
 * import assert from "node:assert/strict";
 * assert.ok(WebAssembly.validate(lowerTriangularMixingModule()));
 * ```
 */
export function lowerTriangularMixingModule(): Uint8Array<ArrayBuffer> {
  // params 0 lp, 1 zp, 2 ep, 3 pairs, 4 zs, 5 es, 6 panels; i32 locals 7 q, 8 cols, 9 lpanel,
  // 10 t, 11 zc, 12 lc, 13 zend, 14 ecur; v128 locals: accumulators, then L, then splats
  const V = ROWS / 2, ACC = 15, L = ACC + 2 * V, S = L + V;
  const [LP, ZP, EP, PAIRS, ZS, ES, PANELS, Q, COLS, LPANEL, T, ZC, LC, ZEND, ECUR] = Array
    .from({ length: 15 }, (_, i) => i);
  const code: number[] = [];
  const emit = (...parts: number[][]) => {
    for (const p of parts) code.push(...p);
  };
  emit(op.i32Const(0), op.localSet(Q), op.localGet(LP), op.localSet(LPANEL));
  emit(op.block, op.loop); // over panels
  emit(op.localGet(Q), op.localGet(PANELS), op.i32Eq, op.brIf(1));
  // cols = min(64 (q + 1), zs)
  emit(op.localGet(Q), op.i32Const(1), op.i32Add, op.i32Const(ROWS * 8), op.i32Mul);
  emit(op.localTee(COLS), op.localGet(ZS), op.localGet(COLS), op.localGet(ZS), op.i32LtU);
  emit(op.select, op.localSet(COLS));
  emit(op.i32Const(0), op.localSet(T));
  emit(op.block, op.loop); // over day pairs
  emit(op.localGet(T), op.localGet(PAIRS), op.i32Eq, op.brIf(1));
  // zc = zp + 2 t zs; zend = zc + cols; lc = lpanel
  emit(op.localGet(ZP), op.localGet(T), op.i32Const(2), op.i32Mul, op.localGet(ZS), op.i32Mul);
  emit(op.i32Add, op.localTee(ZC), op.localGet(COLS), op.i32Add, op.localSet(ZEND));
  emit(op.localGet(LPANEL), op.localSet(LC));
  for (let q = 0; q < 2 * V; q++) emit(op.v128Zero, op.localSet(ACC + q));
  emit(op.block, op.loop); // over columns
  for (let v = 0; v < V; v++) emit(op.localGet(LC), op.v128Load(16 * v), op.localSet(L + v));
  emit(op.localGet(ZC), op.v128Load64Splat(0), op.localSet(S));
  emit(op.localGet(ZC), op.localGet(ZS), op.i32Add, op.v128Load64Splat(0), op.localSet(S + 1));
  for (let d = 0; d < 2; d++) {
    for (let v = 0; v < V; v++) {
      const acc = ACC + d * V + v;
      emit(op.localGet(acc), op.localGet(L + v), op.localGet(S + d), op.f64x2Mul, op.f64x2Add);
      emit(op.localSet(acc));
    }
  }
  emit(op.localGet(LC), op.i32Const(ROWS * 8), op.i32Add, op.localSet(LC));
  emit(op.localGet(ZC), op.i32Const(8), op.i32Add, op.localTee(ZC));
  emit(op.localGet(ZEND), op.i32Ne, op.brIf(0));
  emit(op.end, op.end);
  // ecur = ep + 2 t es + 64 q
  emit(op.localGet(EP), op.localGet(T), op.i32Const(2), op.i32Mul, op.localGet(ES), op.i32Mul);
  emit(op.i32Add, op.localGet(Q), op.i32Const(ROWS * 8), op.i32Mul, op.i32Add, op.localSet(ECUR));
  for (let d = 0; d < 2; d++) {
    for (let v = 0; v < V; v++) {
      emit(op.localGet(ECUR));
      if (d) emit(op.localGet(ES), op.i32Add);
      emit(op.localGet(ACC + d * V + v), op.v128Store(16 * v));
    }
  }
  emit(op.localGet(T), op.i32Const(1), op.i32Add, op.localSet(T), op.br(0));
  emit(op.end, op.end);
  // lpanel += 8 cols (cols/8 columns of 64 bytes)
  emit(op.localGet(LPANEL), op.localGet(COLS), op.i32Const(8), op.i32Mul, op.i32Add);
  emit(op.localSet(LPANEL));
  emit(op.localGet(Q), op.i32Const(1), op.i32Add, op.localSet(Q), op.br(0));
  emit(op.end, op.end);
  const i32 = wasmType.i32;
  return wasmModule({
    name: "mix",
    params: new Array<number>(7).fill(i32),
    results: [],
    locals: [[8, i32], [2 * V + V + 2, wasmType.v128]],
    code,
  });
}

/** Innovations of a block of days: write z, then mix. */
export interface LowerTriangularMixer {
  /** Engine name ("wasm-simd-f64" or "js-f64"). */
  readonly name: string;
  /** B, the order of L. */
  readonly order: number;
  /** The most days one call mixes. */
  readonly maxDays: number;
  /** Where the caller writes z: day t's vector at [t·B, (t + 1)·B) (maxDays · B values). */
  readonly z: Float64Array;
  /** Where `mix` writes e: day t's vector at [t·stride, t·stride + B). */
  readonly e: Float64Array;
  /** Row stride of `e` (≥ B). */
  readonly stride: number;
  /**
   * e(t) = L·z(t) for days t < `days`.
   * @param days how many days of `z` to mix (0 ≤ days ≤ maxDays)
   */
  mix(days: number): void;
}

function checkFactor(lower: Float64Array, order: number, maxDays: number): void {
  if (!Number.isInteger(order) || order < 1 || lower.length !== order * order) {
    throw new RangeError(
      `Cannot mix innovations: the factor must be order × order with order ≥ 1, got ${lower.length} values for order ${order}`,
    );
  }
  if (!Number.isInteger(maxDays) || maxDays < 1) {
    throw new RangeError(
      `Cannot mix innovations: maxDays must be a positive integer, got ${maxDays}`,
    );
  }
}

function checkDays(days: number, maxDays: number): void {
  if (!Number.isInteger(days) || days < 0 || days > maxDays) {
    throw new RangeError(`Cannot mix innovations: days must be in [0, ${maxDays}], got ${days}`);
  }
}

/**
 * The plain TypeScript engine: for each day, e_a = Σ_{c ≤ a} L_ac·z_c in the order of c.
 *
 * @param lower L, order × order, row-major (entries above the diagonal are ignored)
 * @param order B
 * @param maxDays the most days one call mixes @default 64
 * @returns a new engine
 * @throws {RangeError} when L is not order × order or maxDays is not a positive integer
 * @example
 * ```ts
 * import { mixLowerTriangularJs } from "./lower_triangular_mixing.ts";
 * import assert from "node:assert/strict";
 * const m = mixLowerTriangularJs(Float64Array.of(1, 0, 0.5, 2), 2, 1);
 * m.z.set([2, 3]);
 * m.mix(1);
 * assert.deepEqual([m.e[0], m.e[1]], [2, 7]); // [1·2, 0.5·2 + 2·3]
 * ```
 */
export function mixLowerTriangularJs(
  lower: Float64Array,
  order: number,
  maxDays = 64,
): LowerTriangularMixer {
  checkFactor(lower, order, maxDays);
  const B = order, z = new Float64Array(maxDays * B), e = new Float64Array(maxDays * B);
  const L = Float64Array.from(lower);
  return {
    name: "js-f64",
    order,
    maxDays,
    z,
    e,
    stride: B,
    mix(days) {
      checkDays(days, maxDays);
      for (let t = 0; t < days; t++) {
        const zt = t * B;
        for (let a = 0; a < B; a++) {
          const row = a * B;
          let s = 0;
          for (let c = 0; c <= a; c++) s += L[row + c] * z[zt + c];
          e[zt + a] = s;
        }
      }
    },
  };
}

let kernelModule: WebAssembly.Module | null | undefined;

/**
 * The WebAssembly SIMD engine (see the module documentation), or the plain engine where
 * WebAssembly SIMD is missing.
 *
 * @param lower L, order × order, row-major (entries above the diagonal are ignored)
 * @param order B
 * @param maxDays the most days one call mixes @default 64
 * @returns a new engine with its own memory
 * @throws {RangeError} when L is not order × order or maxDays is not a positive integer
 * @example
 * ```ts
 * import { lowerTriangularMixer, mixLowerTriangularJs } from "./lower_triangular_mixing.ts";
 * import assert from "node:assert/strict";
 * const B = 11, L = new Float64Array(B * B);
 * for (let a = 0; a < B; a++) for (let c = 0; c <= a; c++) L[a * B + c] = 1 / (1 + a + c);
 * const w = lowerTriangularMixer(L, B, 3), j = mixLowerTriangularJs(L, B, 3);
 * for (let i = 0; i < 3 * B; i++) w.z[i] = j.z[i] = Math.sin(i);
 * w.mix(3);
 * j.mix(3);
 * for (let t = 0; t < 3; t++) {
 *   for (let a = 0; a < B; a++) assert.equal(w.e[t * w.stride + a], j.e[t * B + a]); // bit-identical
 * }
 * ```
 */
export function lowerTriangularMixer(
  lower: Float64Array,
  order: number,
  maxDays = 64,
): LowerTriangularMixer {
  checkFactor(lower, order, maxDays);
  if (kernelModule === undefined) kernelModule = compileKernelOrNull(lowerTriangularMixingModule());
  if (!kernelModule) return mixLowerTriangularJs(lower, order, maxDays);
  const B = order, panels = Math.ceil(B / ROWS), stride = panels * ROWS;
  const pairs = Math.ceil(maxDays / 2);
  // packed L: panel q holds columns c < min(8 (q + 1), B), each as 8 rows
  let packedLength = 0;
  for (let q = 0; q < panels; q++) packedLength += Math.min(ROWS * (q + 1), B) * ROWS;
  const zOff = packedLength * 8, eOff = zOff + 2 * pairs * B * 8;
  const bytes = eOff + 2 * pairs * stride * 8;
  const memory = new WebAssembly.Memory({ initial: Math.ceil(bytes / 65536) });
  const mix = kernelFunction<
    (
      lp: number,
      zp: number,
      ep: number,
      pairs: number,
      zs: number,
      es: number,
      panels: number,
    ) => void
  >(kernelModule, memory, "mix");
  const packed = new Float64Array(memory.buffer, 0, packedLength);
  let at = 0;
  for (let q = 0; q < panels; q++) {
    const cols = Math.min(ROWS * (q + 1), B);
    for (let c = 0; c < cols; c++) {
      for (let i = 0; i < ROWS; i++) {
        const a = q * ROWS + i;
        packed[at++] = a < B && c <= a ? lower[a * B + c] : 0;
      }
    }
  }
  const zAll = new Float64Array(memory.buffer, zOff, 2 * pairs * B);
  return {
    name: "wasm-simd-f64",
    order,
    maxDays,
    z: zAll.subarray(0, maxDays * B),
    e: new Float64Array(memory.buffer, eOff, 2 * pairs * stride),
    stride,
    mix(days) {
      checkDays(days, maxDays);
      if (days % 2) zAll.fill(0, days * B, (days + 1) * B); // the partner of the last day
      mix(0, zOff, eOff, Math.ceil(days / 2), B * 8, stride * 8, panels);
    },
  };
}
