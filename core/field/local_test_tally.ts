/**
 * The threshold pass of the Monte Carlo field-significance test
 * (field_significance_monte_carlo.ts) as a branch-free WebAssembly SIMD loop, two cells per
 * step in f64x2 lanes: for one product row (a surrogate at one lag) against a block of cells,
 * with v the float32 covariance, s = Σx̃² of the surrogate row and per cell the float32 bounds
 * of the uncertain bands (sigHi ≥ sigLo for the local test, exHi ≥ exLo for the cell's
 * observed best |r|):
 *
 * - certainly significant: v² ≥ sigHi·s; its weight units are added;
 * - certainly exceeding: v² ≥ exHi·s; the cell's flag (one per surrogate and cell) is set;
 * - in a band: not certainly significant and v² > sigLo·s, or flag clear, not certainly
 *   exceeding and v² > exLo·s; the cell's index is listed for an exact recomputation.
 *
 * Every comparison is the float64 one (v and the bounds are widened from float32 exactly, the
 * products are the same IEEE operations as in TypeScript), so the decisions are those of the
 * plain loop it replaces, bit for bit; the weight units are integers, so their sum does not
 * depend on the order of the additions. Written by hand (no library does this) because a
 * JavaScript loop branches on every cell and about a fifth of the comparisons go either way.
 * On the benchmark case of test/bench/field_case.ts (2,592 cells, 25 lags) that loop took
 * 25–30 % of the time of the float32 matrix product; a scalar branch-free WebAssembly loop
 * 6.3 ns a cell, this one 3.0 ns (CPU time, 8 surrogates × 25 lags × 2,592 cells, Deno 2.9.6
 * on the shared 2-core test machine under load).
 *
 * In WAT terms, per pair of cells i, i + 1 (f64x2 lanes; masks are all-ones lanes):
 *
 * ```wat
 * v2 = f64x2.promote_low_f32x4(c[i..i+1])²
 * sig = v2 >= f64(sigHi)·s               u += w & sig
 * band = (v2 > f64(sigLo)·s) & ~sig
 * ex = v2 >= f64(exHi)·s                  band |= (v2 > f64(exLo)·s) & ~ex & (flag == 0)
 * flag |= ex                              per lane: list[count] = i; count += band & 1
 * ```
 *
 * @module
 */
import { kernelFunction, wasmModule, wasmOp as op, wasmType } from "../wasm/module_builder.ts";

/** The tally module's bytes (see the module documentation). */
function tallyModule(): Uint8Array<ArrayBuffer> {
  // params: 0 c, 1 sigHi, 2 sigLo, 3 exHi, 4 exLo, 5 w, 6 flag, 7 list, 8 cells (even), 9 s
  // locals: i32 10 i, 11 listed; v128 12 v², 13 s, 14 u, 15 certain, 16 band, 17 flag, 18 tmp
  const S = 9, I = 10, LISTED = 11, V2 = 12, SX = 13, U = 14, CERT = 15, BAND = 16, FLAG = 17;
  const TMP = 18;
  const code: number[] = [];
  const emit = (...parts: number[][]) => {
    for (const p of parts) code.push(...p);
  };
  /** f64x2 of the two f32 at pointer p, times s */
  const scaled = (p: number) => [
    ...op.localGet(p),
    ...op.v128Load64Zero(0),
    ...op.f64x2PromoteLowF32x4,
    ...op.localGet(SX),
    ...op.f64x2Mul,
  ];
  const advance = (p: number, bytes: number) =>
    emit(op.localGet(p), op.i32Const(bytes), op.i32Add, op.localSet(p));
  /** list[listed] = i + lane; listed += band lane */
  const list = (lane: number) => {
    emit(op.localGet(7), op.localGet(LISTED), op.i32Const(4), op.i32Mul, op.i32Add);
    emit(op.localGet(I), op.i32Const(lane), op.i32Add, op.i32Store(0));
    emit(op.localGet(LISTED), op.localGet(BAND), op.i32x4ExtractLane(2 * lane), op.i32Const(1));
    emit(op.i32And, op.i32Add, op.localSet(LISTED));
  };
  emit(op.localGet(S), op.f64x2Splat, op.localSet(SX), op.v128Zero, op.localSet(U));
  emit(op.i32Const(0), op.localSet(LISTED), op.i32Const(0), op.localSet(I));
  emit(op.block, op.loop);
  emit(op.localGet(I), op.localGet(8), op.i32Eq, op.brIf(1));
  emit(op.localGet(0), op.v128Load64Zero(0), op.f64x2PromoteLowF32x4, op.localTee(TMP));
  emit(op.localGet(TMP), op.f64x2Mul, op.localSet(V2));
  // local test
  emit(op.localGet(V2), scaled(1), op.f64x2Ge, op.localSet(CERT));
  emit(op.localGet(U), op.localGet(5), op.v128Load(0), op.localGet(CERT), op.v128And);
  emit(op.f64x2Add, op.localSet(U));
  emit(op.localGet(V2), scaled(2), op.f64x2Gt, op.localGet(CERT), op.v128AndNot, op.localSet(BAND));
  // exceedance of the observed best |r|
  emit(op.localGet(6), op.v128Load(0), op.localSet(FLAG));
  emit(op.localGet(V2), scaled(3), op.f64x2Ge, op.localSet(CERT));
  emit(op.localGet(6), op.localGet(FLAG), op.localGet(CERT), op.v128Or, op.v128Store(0));
  emit(op.localGet(BAND), op.localGet(V2), scaled(4), op.f64x2Gt, op.localGet(CERT));
  emit(op.v128AndNot, op.localGet(FLAG), op.v128Zero, op.i64x2Eq, op.v128And, op.v128Or);
  emit(op.localSet(BAND));
  list(0);
  list(1);
  for (const p of [0, 1, 2, 3, 4]) advance(p, 8);
  advance(5, 16);
  advance(6, 16);
  advance(I, 2);
  emit(op.br(0), op.end, op.end);
  emit(op.i32Const(0), op.localGet(LISTED), op.i32Store(0));
  emit(op.localGet(U), op.f64x2ExtractLane(0), op.localGet(U), op.f64x2ExtractLane(1), op.f64Add);
  const i32 = wasmType.i32, f64 = wasmType.f64;
  return wasmModule({
    name: "tally",
    params: [i32, i32, i32, i32, i32, i32, i32, i32, i32, f64],
    results: [f64],
    locals: [[2, i32], [7, wasmType.v128]],
    code,
  });
}

let compiled: WebAssembly.Module | null = null;

/** The threshold pass of one chunk (see {@link localTestTally}). */
export interface LocalTestTally {
  /**
   * Copy a block of products (rows × ldc, row-major) into the pass's memory, and clear the
   * flags.
   * @param c the products
   * @param rows rows of the block
   * @param ldc row stride of `c`
   */
  setProducts(c: Float32Array, rows: number, ldc: number): void;
  /**
   * One row against every cell.
   * @param row row of the block (set by setProducts)
   * @param lag lag index (selects the bounds)
   * @param flagRow which of the flag rows to update (e.g. the surrogate within its block)
   * @param s Σx̃² of the row
   * @returns certain significant weight units, and how many cells are listed in `listed()`
   */
  row(row: number, lag: number, flagRow: number, s: number): { units: number; banded: number };
  /** Cell indices in a band, from the last `row` call (valid until the next call). */
  listed(): Int32Array;
  /**
   * Flags of a flag row (valid until the next setProducts): cell i's flag is word 2i of the
   * view, nonzero when set.
   */
  flags(flagRow: number): Int32Array;
}

/**
 * A threshold pass over `cells` cells and `lags` lags.
 *
 * @param bounds sigHi, sigLo, exHi, exLo: each lags × cells (lag-major), float32
 * @param weights weight units per cell (integers, so their sums are exact in any order)
 * @param flagRows number of flag rows (surrogates per block)
 * @returns the pass, with its own WebAssembly memory
 * @throws {RangeError} on arrays of the wrong length
 * @example
 * ```ts
 * import { localTestTally } from "./local_test_tally.ts";
 * import assert from "node:assert/strict";
 * // one lag, two cells: cell 0 significant for |cov| ≥ 2 (s = 1), cell 1 for |cov| ≥ 3
 * const b = (a: number, z: number) => Float32Array.of(a, z);
 * const t = localTestTally({ sigHi: b(4.1, 9.1), sigLo: b(3.9, 8.9), exHi: b(99, 99), exLo: b(98, 98) }, Float64Array.of(5, 7), 1);
 * t.setProducts(Float32Array.of(2.5, 2.99), 1, 2);
 * const r = t.row(0, 0, 0, 1);
 * assert.equal(r.units, 5); // cell 0 certainly significant
 * assert.equal(r.banded, 1); // cell 1 is within the band of its threshold
 * assert.equal(t.listed()[0], 1);
 * ```
 */
export function localTestTally(
  bounds: { sigHi: Float32Array; sigLo: Float32Array; exHi: Float32Array; exLo: Float32Array },
  weights: Float64Array,
  flagRows: number,
): LocalTestTally {
  const cells = weights.length, lags = bounds.sigHi.length / cells;
  for (const a of [bounds.sigHi, bounds.sigLo, bounds.exHi, bounds.exLo]) {
    if (a.length !== lags * cells || !Number.isInteger(lags)) {
      throw new RangeError(
        `Cannot set up local-test tally: bounds of ${a.length} values for ${cells} cells`,
      );
    }
  }
  compiled ??= new WebAssembly.Module(tallyModule());
  const memory = new WebAssembly.Memory({ initial: 1 });
  const tally = kernelFunction<(...args: number[]) => number>(compiled, memory, "tally");
  // cells padded to an even count (two per f64x2); the padding cell has weight 0 and infinite
  // bounds, so it is never significant, flagged or listed
  const cp = cells + (cells & 1), lc = lags * cp;
  // layout (bytes): 16 scratch, bounds 4 × lc f32, weights f64, flags i64, list, products
  const B0 = 16, W0 = B0 + 16 * lc, F0 = W0 + 8 * cp;
  const L0 = F0 + 8 * flagRows * cp, C0 = L0 + 4 * cp;
  const grow = (bytes: number) => {
    const have = memory.buffer.byteLength;
    if (bytes > have) memory.grow(Math.ceil((bytes - have) / 65536));
  };
  grow(C0);
  [bounds.sigHi, bounds.sigLo, bounds.exHi, bounds.exLo].forEach((a, q) => {
    const dst = new Float32Array(memory.buffer, B0 + 4 * lc * q, lc).fill(Infinity);
    for (let j = 0; j < lags; j++) dst.set(a.subarray(j * cells, (j + 1) * cells), j * cp);
  });
  new Float64Array(memory.buffer, W0, cp).set(weights);
  return {
    setProducts(c, rows, ldc) {
      grow(C0 + 4 * rows * cp);
      const dst = new Float32Array(memory.buffer, C0, rows * cp);
      if (ldc === cp) dst.set(c.subarray(0, rows * cp));
      else for (let r = 0; r < rows; r++) dst.set(c.subarray(r * ldc, r * ldc + cells), r * cp);
      new Int32Array(memory.buffer, F0, 2 * flagRows * cp).fill(0);
    },
    row(row, lag, flagRow, s) {
      const b = B0 + 4 * lag * cp;
      const units = tally(
        C0 + 4 * row * cp,
        b,
        b + 4 * lc,
        b + 8 * lc,
        b + 12 * lc,
        W0,
        F0 + 8 * flagRow * cp,
        L0,
        cp,
        s,
      );
      return { units, banded: new Int32Array(memory.buffer, 0, 1)[0] };
    },
    listed: () => new Int32Array(memory.buffer, L0, cp),
    flags: (flagRow) => new Int32Array(memory.buffer, F0 + 8 * flagRow * cp, 2 * cells),
  };
}
