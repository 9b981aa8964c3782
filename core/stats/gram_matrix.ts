/**
 * The Gram matrix G_ij = Σ_t a_i(t)·a_j(t) of m columns of length n (the cross-product
 * matrix AᵀA), the cost of the residual cross-correlation of many spectral bands
 * (./residual_cross_correlation.ts): m(m + 1)/2 dot products of length n.
 *
 * Every G_ij is accumulated in the order t = 0, 1, …, n − 1 from +0 with a rounded product
 * then a rounded sum (IEEE 754 binary64, no fused multiply-add), so the numbers are
 * bit-identical to the plain loop {@link gramMatrixJs} and the same on every machine. Two
 * engines with that arithmetic:
 * - {@link gramMatrix}: a WebAssembly SIMD kernel (128-bit f64x2 lanes over pairs of columns
 *   j, j + 1): the columns are copied, a block of rows of A at a time, into a row-major buffer
 *   (row t holds a_0(t) … a_{m−1}(t), padded to a multiple of 8 columns with zeros), and a
 *   register tile of 2 rows i, i + 1 × 8 columns of G is accumulated over the rows of the
 *   block; the tile's sums are kept in G between blocks, so each sum still runs in the order
 *   of t (blocks keep the buffer in the processor's cache);
 * - {@link gramMatrixJs}: the same sums in plain TypeScript (the reference in tests, and the
 *   fallback where WebAssembly SIMD is missing).
 *
 * Written by hand because no maintained npm package offers a float64 AᵀA in WebAssembly, and
 * a BLAS (through FFI) would round differently on different machines (it may fuse
 * multiply-adds and reorder the sums), so a calibration's digest would depend on the machine.
 * Measured on the 2-core test machine (Deno 2.9.6, m = 100 columns of 17,000 points, one
 * thread, medians of 9 alternating runs under light load): this kernel 19.5 ms per Gram
 * matrix, the plain loop of four columns at a time 64 ms (the same numbers bit for bit).
 *
 * The module is emitted from the listing below by a small assembler (a few opcodes of the
 * WebAssembly 2.0 binary format, §5, core/wasm/module_builder.ts). In WAT terms:
 *
 * ```wat
 * (func $gram (param $pp i32) (param $gp i32) (param $n i32) (param $rs i32) (param $rows i32)
 *   ;; $pp: a block of $n rows of A, $rs bytes apart; $gp: G, rows $rs bytes apart
 *   loop over row pairs i = 0, 2, … < $rows:
 *     loop over panels of 8 columns q while 8q ≤ i + 1:
 *       acc[r][v] = v128.load (gp + (i + r)·$rs + 64 q + 16 v)  ;; G[i + r][8q + 2v], +1
 *       loop over the block's rows t < $n:
 *         s[r] = v128.load64_splat (pp + t·$rs + 8 (i + r))    ;; a_{i + r}(t)
 *         b[v] = v128.load (pp + t·$rs + 64 q + 16 v)           ;; a_{8q + 2v}(t), +1
 *         acc[r][v] = f64x2.add (acc[r][v], f64x2.mul (s[r], b[v]))
 *       v128.store (gp + (i + r)·$rs + 64 q + 16 v) acc[r][v]
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

/** Columns of G per panel (4 f64x2 vectors). */
const COLS = 8;
/** Bytes of A one kernel call reads (a block of rows), to stay in the processor's cache. */
const BLOCK_BYTES = 96 * 1024;

/**
 * The kernel module's bytes (see the module documentation for its listing).
 *
 * @returns a WebAssembly module importing `env.memory` and exporting `gram`
 * @example
 * ```ts
 * import { gramMatrixModule } from "./gram_matrix.ts";
 * import assert from "node:assert/strict";
 * assert.ok(WebAssembly.validate(gramMatrixModule()));
 * ```
 */
export function gramMatrixModule(): Uint8Array<ArrayBuffer> {
  // params 0 pp, 1 gp, 2 n, 3 rs, 4 rows; i32 locals 5 i, 6 qb, 7 qend, 8 g0, 9 a, 10 b,
  // 11 aend; v128 locals: accumulators (row r, vector v at ACC + 4r + v), then b, then splats
  const V = COLS / 2, ACC = 12, B = ACC + 2 * V, S = B + V;
  const [PP, GP, N, RS, ROWS, I, QB, QEND, G0, A, BP, AEND] = Array.from(
    { length: 12 },
    (_, k) => k,
  );
  const code: number[] = [];
  const emit = (...parts: number[][]) => {
    for (const p of parts) code.push(...p);
  };
  emit(op.i32Const(0), op.localSet(I));
  emit(op.block, op.loop); // over row pairs
  emit(op.localGet(I), op.localGet(ROWS), op.i32LtU, op.i32Eqz, op.brIf(1));
  // qend = 8 (i + 2): the panels whose first column is ≤ i + 1
  emit(op.localGet(I), op.i32Const(2), op.i32Add, op.i32Const(8), op.i32Mul, op.localSet(QEND));
  emit(op.i32Const(0), op.localSet(QB));
  emit(op.block, op.loop); // over panels
  emit(op.localGet(QB), op.localGet(QEND), op.i32LtU, op.i32Eqz, op.brIf(1));
  // g0 = gp + i rs + qb
  emit(op.localGet(GP), op.localGet(I), op.localGet(RS), op.i32Mul, op.i32Add);
  emit(op.localGet(QB), op.i32Add, op.localSet(G0));
  for (let r = 0; r < 2; r++) {
    for (let v = 0; v < V; v++) {
      emit(op.localGet(G0));
      if (r) emit(op.localGet(RS), op.i32Add);
      emit(op.v128Load(16 * v), op.localSet(ACC + r * V + v));
    }
  }
  // a = pp + 8 i; b = pp + qb; aend = a + n rs
  emit(op.localGet(PP), op.localGet(I), op.i32Const(8), op.i32Mul, op.i32Add, op.localTee(A));
  emit(op.localGet(N), op.localGet(RS), op.i32Mul, op.i32Add, op.localSet(AEND));
  emit(op.localGet(PP), op.localGet(QB), op.i32Add, op.localSet(BP));
  emit(op.block, op.loop); // over the block's rows (n ≥ 1)
  emit(op.localGet(A), op.v128Load64Splat(0), op.localSet(S));
  emit(op.localGet(A), op.v128Load64Splat(8), op.localSet(S + 1));
  for (let v = 0; v < V; v++) emit(op.localGet(BP), op.v128Load(16 * v), op.localSet(B + v));
  for (let r = 0; r < 2; r++) {
    for (let v = 0; v < V; v++) {
      const acc = ACC + r * V + v;
      emit(op.localGet(acc), op.localGet(S + r), op.localGet(B + v), op.f64x2Mul, op.f64x2Add);
      emit(op.localSet(acc));
    }
  }
  emit(op.localGet(BP), op.localGet(RS), op.i32Add, op.localSet(BP));
  emit(op.localGet(A), op.localGet(RS), op.i32Add, op.localTee(A));
  emit(op.localGet(AEND), op.i32Ne, op.brIf(0));
  emit(op.end, op.end);
  for (let r = 0; r < 2; r++) {
    for (let v = 0; v < V; v++) {
      emit(op.localGet(G0));
      if (r) emit(op.localGet(RS), op.i32Add);
      emit(op.localGet(ACC + r * V + v), op.v128Store(16 * v));
    }
  }
  emit(op.localGet(QB), op.i32Const(COLS * 8), op.i32Add, op.localSet(QB), op.br(0));
  emit(op.end, op.end);
  emit(op.localGet(I), op.i32Const(2), op.i32Add, op.localSet(I), op.br(0));
  emit(op.end, op.end);
  const i32 = wasmType.i32;
  return wasmModule({
    name: "gram",
    params: new Array<number>(5).fill(i32),
    results: [],
    locals: [[7, i32], [2 * V + V + 2, wasmType.v128]],
    code,
  });
}

function checkColumns(columns: readonly ArrayLike<number>[]): number {
  const n = columns.length === 0 ? 0 : columns[0].length;
  columns.forEach((c, i) => {
    if (c.length !== n) {
      throw new RangeError(
        `Cannot compute a Gram matrix: column ${i} has ${c.length} points, column 0 has ${n}`,
      );
    }
  });
  return n;
}

/**
 * The plain TypeScript engine: four columns of the lower triangle at a time, so each pass
 * over a_i serves four products, each sum in the order of t.
 *
 * @param columns m columns of equal length
 * @returns G (m×m rows, symmetric)
 * @throws {RangeError} when the columns' lengths differ
 * @example
 * ```ts
 * import { gramMatrixJs } from "./gram_matrix.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(gramMatrixJs([Float64Array.of(1, 2), Float64Array.of(3, 4)]), [[5, 11], [11, 25]]);
 * ```
 */
export function gramMatrixJs(columns: readonly Float64Array[]): number[][] {
  const m = columns.length;
  const n = checkColumns(columns);
  const g: number[][] = Array.from({ length: m }, () => new Array<number>(m).fill(0));
  for (let i = 0; i < m; i++) {
    const a = columns[i];
    let j = 0;
    for (; j + 3 <= i; j += 4) {
      const b0 = columns[j], b1 = columns[j + 1], b2 = columns[j + 2], b3 = columns[j + 3];
      let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
      for (let t = 0; t < n; t++) {
        const v = a[t];
        s0 += v * b0[t];
        s1 += v * b1[t];
        s2 += v * b2[t];
        s3 += v * b3[t];
      }
      g[i][j] = g[j][i] = s0;
      g[i][j + 1] = g[j + 1][i] = s1;
      g[i][j + 2] = g[j + 2][i] = s2;
      g[i][j + 3] = g[j + 3][i] = s3;
    }
    for (; j <= i; j++) {
      const b = columns[j];
      let s = 0;
      for (let t = 0; t < n; t++) s += a[t] * b[t];
      g[i][j] = g[j][i] = s;
    }
  }
  return g;
}

let kernelModule: WebAssembly.Module | null | undefined;
let kernel: { memory: WebAssembly.Memory; gram: GramKernel } | undefined;
type GramKernel = (pp: number, gp: number, n: number, rs: number, rows: number) => void;

/** The instance, its memory grown to at least `bytes`; null without WebAssembly SIMD. */
function gramKernel(bytes: number): { memory: WebAssembly.Memory; gram: GramKernel } | null {
  if (kernelModule === undefined) kernelModule = compileKernelOrNull(gramMatrixModule());
  if (!kernelModule) return null;
  if (!kernel) {
    const memory = new WebAssembly.Memory({ initial: Math.ceil(bytes / 65536) });
    const gram = kernelFunction<GramKernel>(kernelModule, memory, "gram");
    kernel = { memory, gram };
  }
  const have = kernel.memory.buffer.byteLength;
  if (have < bytes) kernel.memory.grow(Math.ceil((bytes - have) / 65536));
  return kernel;
}

/**
 * The Gram matrix G_ij = Σ_t a_i(t)·a_j(t) of m columns (AᵀA) by the WebAssembly SIMD kernel
 * (see the module documentation), bit-identical to {@link gramMatrixJs}, which it falls back
 * to where WebAssembly SIMD is missing. Cost m(m + 1)/2·n multiply-adds.
 *
 * @param columns m columns of equal length
 * @returns G (m×m rows, symmetric)
 * @throws {RangeError} when the columns' lengths differ
 * @example
 * ```ts
 * import { gramMatrix, gramMatrixJs } from "./gram_matrix.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(gramMatrix([Float64Array.of(1, 2), Float64Array.of(3, 4)]), [[5, 11], [11, 25]]);
 * const cols = Array.from({ length: 11 }, (_, i) => Float64Array.from({ length: 50 }, (_, t) => Math.sin(i * 50 + t)));
 * assert.deepEqual(gramMatrix(cols), gramMatrixJs(cols)); // bit-identical
 * ```
 */
export function gramMatrix(columns: readonly Float64Array[]): number[][] {
  const m = columns.length;
  const n = checkColumns(columns);
  if (m === 0 || n === 0) return gramMatrixJs(columns);
  const width = Math.ceil(m / COLS) * COLS, rs = width * 8;
  const block = Math.max(1, Math.min(n, Math.floor(BLOCK_BYTES / rs)));
  const gBytes = width * rs, k = gramKernel(gBytes + block * rs);
  if (!k) return gramMatrixJs(columns);
  const g = new Float64Array(k.memory.buffer, 0, width * width).fill(0);
  const a = new Float64Array(k.memory.buffer, gBytes, block * width).fill(0);
  const rows = m + (m % 2);
  for (let t0 = 0; t0 < n; t0 += block) {
    const len = Math.min(block, n - t0);
    for (let j = 0; j < m; j++) {
      const c = columns[j];
      for (let t = 0; t < len; t++) a[t * width + j] = c[t0 + t];
    }
    k.gram(gBytes, 0, len, rs, rows);
  }
  const out: number[][] = Array.from({ length: m }, () => new Array<number>(m));
  for (let i = 0; i < m; i++) {
    for (let j = 0; j <= i; j++) out[i][j] = out[j][i] = g[i * width + j];
  }
  return out;
}
