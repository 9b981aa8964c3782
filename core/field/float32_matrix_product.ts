/**
 * Single-precision matrix products C = A·B for the Monte Carlo field-significance test, where
 * B (time × cells, the field) is fixed and A (surrogate rows × time) changes.
 *
 * Two engines with one interface:
 * - {@link wasmFloat32Product}: a WebAssembly SIMD kernel (128-bit f32x4 lanes) on packed
 *   panels, the layout of the Goto–van de Geijn GEMM (Goto & van de Geijn 2008, ACM TOMS 34,
 *   12): B packed once into panels of 12 columns, A into blocks of 4 rows interleaved by time,
 *   a 4 × 12 register tile accumulated over the whole time axis.
 * - {@link jsFloat32Product}: the same product in plain TypeScript (a reference for tests and
 *   a fallback where WebAssembly is missing).
 * A BLAS `sgemm` implements the same interface outside core (the service's OpenBLAS engine
 * through Deno's FFI: api/workers/openblas_product.ts); the field-significance decisions do
 * not depend on which engine computes the products.
 *
 * Written by hand because no maintained npm package offers a float32 GEMM in WebAssembly
 * SIMD, and the plain-JS loop below is 16–36 times slower (same shapes, same machine).
 * Measured on the 2-core test machine (Deno 2.9.6, 400 × 600 by 600 × 2,592): this kernel
 * about 37 GFLOP/s on one core;
 * 4 × 12 was the fastest of the tiles 4 × 8, 6 × 8, 4 × 12, 3 × 16, 8 × 4 and 2 × 16. The
 * relaxed-SIMD fused multiply-add gained about 10 % and is not used (its rounding differs
 * between machines).
 *
 * The module is emitted from the listing below by a small assembler (core/wasm/module_builder.ts),
 * so the kernel is read and changed here, not as opaque bytes. In WAT terms the kernel is:
 *
 * ```wat
 * (func $tile (param $ap i32) (param $bp i32) (param $cp i32) (param $k i32)
 *             (param $panels i32) (param $ldc i32)   ;; ldc in bytes
 *   loop over panels p < $panels:
 *     acc[0..3][0..2] = f32x4 0
 *     loop over t < $k:
 *       b[v] = v128.load (bp + 16 v)               ;; 12 columns of B at time t
 *       a    = v128.load32_splat (ap + 4 r)        ;; A[r][t], r = 0..3
 *       acc[r][v] = f32x4.add (acc[r][v], f32x4.mul (a, b[v]))
 *       ap += 16, bp += 48
 *     v128.store (cp + r·ldc + 16 v) acc[r][v]
 *     cp += 48
 * )
 * ```
 *
 * @module
 */

import { kernelFunction, wasmModule, wasmOp as op, wasmType } from "../wasm/module_builder.ts";

/** C = A·B with a fixed right-hand matrix. */
export interface Float32ProductEngine {
  readonly name: string;
  /**
   * Set B, k × n, row-major; kept until the next call.
   * @param b values (k · n)
   * @param k rows (the inner dimension)
   * @param n columns
   */
  setRight(b: Float32Array, k: number, n: number): void;
  /**
   * C = A·B for A of m rows × k, row-major.
   * @returns C row-major with row stride `ldc` ≥ n (valid until the next call)
   */
  multiply(a: Float32Array, m: number): { c: Float32Array; ldc: number };
}

/** Rows per register tile. */
const MR = 4;
/** f32x4 vectors per tile row (12 columns). */
const NV = 3;
const NR = 4 * NV;
/** Panels per kernel call, so a block of B stays in the L2 cache. */
const PANEL_GROUP = 16;

/**
 * The kernel module's bytes (see the module documentation for its listing).
 *
 * @returns a WebAssembly module importing `env.memory` and exporting `tile`
 * @example
 * ```ts
 * import { float32KernelModule } from "./float32_matrix_product.ts";
 * import assert from "node:assert/strict";
 * assert.ok(WebAssembly.validate(float32KernelModule()));
 * ```
 */
export function float32KernelModule(): Uint8Array<ArrayBuffer> {
  // params 0 ap, 1 bp, 2 cp, 3 k, 4 panels, 5 ldc; i32 locals 6 a-cursor, 7 b-cursor,
  // 8 panel, 9 a-end, 10 c-cursor; v128 locals: accumulators, then B vectors, then A
  const ACC = 11, B = ACC + MR * NV, A = B + NV;
  const code: number[] = [];
  const emit = (...parts: number[][]) => {
    for (const p of parts) code.push(...p);
  };
  emit(op.i32Const(0), op.localSet(8), op.localGet(1), op.localSet(7));
  emit(op.localGet(2), op.localSet(10));
  emit(op.block, op.loop); // over panels
  emit(op.localGet(8), op.localGet(4), op.i32Eq, op.brIf(1));
  for (let q = 0; q < MR * NV; q++) emit(op.v128Zero, op.localSet(ACC + q));
  emit(op.localGet(0), op.localSet(6));
  emit(op.localGet(0), op.localGet(3), op.i32Const(MR * 4), op.i32Mul, op.i32Add, op.localSet(9));
  emit(op.block, op.loop); // over time
  for (let v = 0; v < NV; v++) emit(op.localGet(7), op.v128Load(16 * v), op.localSet(B + v));
  for (let r = 0; r < MR; r++) {
    emit(op.localGet(6), op.v128Load32Splat(4 * r), op.localSet(A));
    for (let v = 0; v < NV; v++) {
      const acc = ACC + r * NV + v;
      emit(op.localGet(acc), op.localGet(A), op.localGet(B + v), op.f32x4Mul, op.f32x4Add);
      emit(op.localSet(acc));
    }
  }
  emit(op.localGet(7), op.i32Const(NR * 4), op.i32Add, op.localSet(7));
  emit(op.localGet(6), op.i32Const(MR * 4), op.i32Add, op.localTee(6));
  emit(op.localGet(9), op.i32Ne, op.brIf(0));
  emit(op.end, op.end);
  for (let r = 0; r < MR; r++) {
    for (let v = 0; v < NV; v++) {
      emit(op.localGet(10), op.localGet(5), op.i32Const(r), op.i32Mul, op.i32Add);
      emit(op.localGet(ACC + r * NV + v), op.v128Store(16 * v));
    }
  }
  emit(op.localGet(10), op.i32Const(NR * 4), op.i32Add, op.localSet(10));
  emit(op.localGet(8), op.i32Const(1), op.i32Add, op.localSet(8), op.br(0));
  emit(op.end, op.end);
  const i32 = wasmType.i32;
  return wasmModule({
    name: "tile",
    params: [i32, i32, i32, i32, i32, i32],
    results: [],
    locals: [[5, i32], [MR * NV + NV + 1, wasmType.v128]],
    code,
  });
}

let kernelModule: WebAssembly.Module | null = null;

/**
 * The WebAssembly SIMD engine (see the module documentation).
 *
 * @returns a new engine with its own memory
 * @example
 * ```ts
 * import { wasmFloat32Product } from "./float32_matrix_product.ts";
 * import assert from "node:assert/strict";
 * const e = wasmFloat32Product();
 * e.setRight(Float32Array.of(1, 2, 3, 4), 2, 2); // [[1, 2], [3, 4]]
 * const { c, ldc } = e.multiply(Float32Array.of(1, 1), 1); // [1, 1]·B = [4, 6]
 * assert.deepEqual([c[0], c[1]], [4, 6]);
 * assert.ok(ldc >= 2);
 * ```
 */
export function wasmFloat32Product(): Float32ProductEngine {
  kernelModule ??= new WebAssembly.Module(float32KernelModule());
  const memory = new WebAssembly.Memory({ initial: 1 });
  const tile = kernelFunction<
    (ap: number, bp: number, cp: number, k: number, panels: number, ldc: number) => void
  >(kernelModule, memory, "tile");
  let k = 0, n = 0, panels = 0, bBytes = 0;
  let bPacked: Float32Array | null = null;
  const ensure = (bytes: number) => {
    const have = memory.buffer.byteLength;
    if (bytes > have) memory.grow(Math.ceil((bytes - have) / 65536));
  };
  return {
    name: "wasm-simd-f32",
    setRight(b, kk, nn) {
      if (b.length < kk * nn) {
        throw new RangeError(`Cannot set matrix: needs ${kk * nn} values, got ${b.length}`);
      }
      k = kk;
      n = nn;
      panels = Math.ceil(n / NR);
      bBytes = panels * k * NR * 4;
      ensure(bBytes);
      bPacked = new Float32Array(memory.buffer, 0, panels * k * NR);
      bPacked.fill(0);
      for (let p = 0; p < panels; p++) {
        const c0 = p * NR, w = Math.min(NR, n - c0);
        for (let t = 0; t < k; t++) {
          const dst = (p * k + t) * NR, src = t * n + c0;
          for (let l = 0; l < w; l++) bPacked[dst + l] = b[src + l];
        }
      }
    },
    multiply(a, m) {
      if (!bPacked) throw new RangeError("Cannot multiply: call setRight first");
      if (a.length < m * k) {
        throw new RangeError(`Cannot multiply: A needs ${m * k} values, got ${a.length}`);
      }
      const blocks = Math.ceil(m / MR);
      const ldc = panels * NR;
      const aOff = bBytes, aBytes = blocks * k * MR * 4;
      const cOff = aOff + aBytes;
      ensure(cOff + blocks * MR * ldc * 4);
      const ap = new Float32Array(memory.buffer, aOff, blocks * k * MR);
      for (let rb = 0; rb < blocks; rb++) {
        for (let r = 0; r < MR; r++) {
          const row = rb * MR + r, base = rb * k * MR + r;
          if (row < m) {
            const src = row * k;
            for (let t = 0; t < k; t++) ap[base + t * MR] = a[src + t];
          } else {
            for (let t = 0; t < k; t++) ap[base + t * MR] = 0;
          }
        }
      }
      for (let p0 = 0; p0 < panels; p0 += PANEL_GROUP) {
        const np = Math.min(PANEL_GROUP, panels - p0);
        for (let rb = 0; rb < blocks; rb++) {
          tile(
            aOff + rb * k * MR * 4,
            p0 * k * NR * 4,
            cOff + (rb * MR * ldc + p0 * NR) * 4,
            k,
            np,
            ldc * 4,
          );
        }
      }
      return { c: new Float32Array(memory.buffer, cOff, m * ldc), ldc };
    },
  };
}

/**
 * The plain TypeScript engine (row-major i–t–j loops with float32 rounding of every
 * accumulation, like the SIMD kernel, though not in the same order).
 *
 * @returns a new engine
 * @example
 * ```ts
 * import { jsFloat32Product } from "./float32_matrix_product.ts";
 * import assert from "node:assert/strict";
 * const e = jsFloat32Product();
 * e.setRight(Float32Array.of(1, 2, 3, 4), 2, 2);
 * const { c } = e.multiply(Float32Array.of(1, 1), 1);
 * assert.deepEqual([c[0], c[1]], [4, 6]);
 * ```
 */
export function jsFloat32Product(): Float32ProductEngine {
  let b = new Float32Array(0), k = 0, n = 0;
  return {
    name: "js-f32",
    setRight(bb, kk, nn) {
      if (bb.length < kk * nn) {
        throw new RangeError(`Cannot set matrix: needs ${kk * nn} values, got ${bb.length}`);
      }
      b = Float32Array.from(bb.subarray(0, kk * nn));
      k = kk;
      n = nn;
    },
    multiply(a, m) {
      if (a.length < m * k) {
        throw new RangeError(`Cannot multiply: A needs ${m * k} values, got ${a.length}`);
      }
      const c = new Float32Array(m * n);
      for (let i = 0; i < m; i++) {
        const row = c.subarray(i * n, (i + 1) * n);
        for (let t = 0; t < k; t++) {
          const av = a[i * k + t];
          if (av === 0) continue;
          const o = t * n;
          for (let j = 0; j < n; j++) row[j] = Math.fround(row[j] + Math.fround(av * b[o + j]));
        }
      }
      return { c, ldc: n };
    },
  };
}
