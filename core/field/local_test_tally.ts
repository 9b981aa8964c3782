/**
 * The threshold pass of the Monte Carlo field-significance test (field_significance_monte_carlo.ts)
 * as a branch-free WebAssembly loop: for one product row (a surrogate at one lag) against a
 * block of cells, with v the float32 covariance, s = Σx̃² of the surrogate row and per cell the
 * float32 bounds of the uncertain bands (sigHi ≥ sigLo for the local test, exHi ≥ exLo for the
 * cell's observed best |r|):
 *
 * - certainly significant: v² ≥ sigHi·s; its weight units are added;
 * - certainly exceeding: v² ≥ exHi·s; the cell's flag (one per surrogate and cell) is set;
 * - in a band: not certainly significant and v² > sigLo·s, or flag clear, not certainly
 *   exceeding and v² > exLo·s; the cell's index is listed for an exact recomputation.
 *
 * Every comparison is the float64 one (v and the bounds are widened from float32 exactly, the
 * products are the same IEEE operations as in TypeScript), so the decisions are those of the
 * plain loop it replaces, bit for bit. Written by hand (no library does this) because a
 * JavaScript loop branches on every cell and about a fifth of the comparisons go either way:
 * on the benchmark case of test/bench/field_case.ts (2,592 cells, 25 lags) that loop took
 * 25–30 % of the time of the float32 matrix product, this one about 14 % (CPU profiles of 64
 * and 500 surrogates, Deno 2.9.6 on the shared 2-core test machine).
 *
 * In WAT terms, per cell i (pointers advance by one element):
 *
 * ```wat
 * v2 = f64(c[i])²
 * sig = v2 >= f64(sigHi[i])·s            u += select(w[i], 0, sig)
 * band = !sig & v2 > f64(sigLo[i])·s
 * ex = v2 >= f64(exHi[i])·s               band |= !flag[i] & !ex & v2 > f64(exLo[i])·s
 * flag[i] |= ex                           list[count] = i; count += band
 * ```
 *
 * @module
 */
import { wasmModule, wasmOp as op, wasmType } from "./wasm_module_builder.ts";

/** The tally module's bytes (see the module documentation). */
function tallyModule(): Uint8Array<ArrayBuffer> {
  // params: 0 c, 1 sigHi, 2 sigLo, 3 exHi, 4 exLo, 5 w, 6 flag, 7 list, 8 count of cells, 9 s
  // locals: i32 10 i, 11 listed, 12 flag, 13 certain, 14 band; f64 15 v², 16 u, 17 v
  const S = 9, I = 10, LISTED = 11, FLAG = 12, CERT = 13, BAND = 14, V2 = 15, U = 16, V = 17;
  const code: number[] = [];
  const emit = (...parts: number[][]) => {
    for (const p of parts) code.push(...p);
  };
  /** f64(bound at pointer p)·s */
  const scaled = (p: number) => [
    ...op.localGet(p),
    ...op.f32Load(0),
    ...op.f64PromoteF32,
    ...op.localGet(S),
    ...op.f64Mul,
  ];
  const advance = (p: number, bytes: number) =>
    emit(op.localGet(p), op.i32Const(bytes), op.i32Add, op.localSet(p));
  emit(op.f64Const0, op.localSet(U), op.i32Const(0), op.localSet(LISTED));
  emit(op.i32Const(0), op.localSet(I));
  emit(op.block, op.loop);
  emit(op.localGet(I), op.localGet(8), op.i32Eq, op.brIf(1));
  emit(op.localGet(0), op.f32Load(0), op.f64PromoteF32, op.localTee(V), op.localGet(V));
  emit(op.f64Mul, op.localSet(V2));
  // local test
  emit(op.localGet(V2), scaled(1), op.f64Ge, op.localSet(CERT));
  emit(op.localGet(U), op.localGet(5), op.f64Load(0), op.f64Const0, op.localGet(CERT));
  emit(op.select, op.f64Add, op.localSet(U));
  emit(op.localGet(CERT), op.i32Eqz, op.localGet(V2), scaled(2), op.f64Gt, op.i32And);
  emit(op.localSet(BAND));
  // exceedance of the observed best |r|
  emit(op.localGet(6), op.i32Load8U(0), op.localSet(FLAG));
  emit(op.localGet(V2), scaled(3), op.f64Ge, op.localSet(CERT));
  emit(op.localGet(6), op.localGet(FLAG), op.localGet(CERT), op.i32Or, op.i32Store8(0));
  emit(op.localGet(BAND), op.localGet(FLAG), op.i32Eqz, op.localGet(CERT), op.i32Eqz, op.i32And);
  emit(op.localGet(V2), scaled(4), op.f64Gt, op.i32And, op.i32Or, op.localSet(BAND));
  // list the cell; keep it when in a band
  emit(op.localGet(7), op.localGet(LISTED), op.i32Const(4), op.i32Mul, op.i32Add);
  emit(op.localGet(I), op.i32Store(0));
  emit(op.localGet(LISTED), op.localGet(BAND), op.i32Add, op.localSet(LISTED));
  for (const p of [0, 1, 2, 3, 4]) advance(p, 4);
  advance(5, 8);
  advance(6, 1);
  advance(I, 1);
  emit(op.br(0), op.end, op.end);
  emit(op.i32Const(0), op.localGet(LISTED), op.i32Store(0), op.localGet(U));
  const i32 = wasmType.i32, f64 = wasmType.f64;
  return wasmModule({
    name: "tally",
    params: [i32, i32, i32, i32, i32, i32, i32, i32, i32, f64],
    results: [f64],
    locals: [[5, i32], [3, f64]],
    code,
  });
}

let compiled: WebAssembly.Module | null = null;

/** The threshold pass of one chunk (see {@link localTestTally}). */
export interface LocalTestTally {
  /**
   * Copy a block of products (rows × ldc, row-major) into the pass's memory.
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
  /** Flags of a flag row (valid until the next setProducts). */
  flags(flagRow: number): Uint8Array;
}

/**
 * A threshold pass over `cells` cells and `lags` lags.
 *
 * @param bounds sigHi, sigLo, exHi, exLo: each lags × cells (lag-major), float32
 * @param weights weight units per cell
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
  const tally = new WebAssembly.Instance(compiled, { env: { memory } }).exports.tally as (
    ...args: number[]
  ) => number;
  const lc = lags * cells;
  // layout (bytes): 16 scratch, bounds 4 × lc f32, weights f64, flags, list, products
  const B0 = 16, W0 = B0 + 16 * lc, F0 = W0 + 8 * cells;
  const L0 = F0 + ((flagRows * cells + 3) & ~3), C0 = L0 + 4 * cells;
  const grow = (bytes: number) => {
    const have = memory.buffer.byteLength;
    if (bytes > have) memory.grow(Math.ceil((bytes - have) / 65536));
  };
  grow(C0);
  [bounds.sigHi, bounds.sigLo, bounds.exHi, bounds.exLo].forEach((a, q) =>
    new Float32Array(memory.buffer, B0 + 4 * lc * q, lc).set(a)
  );
  new Float64Array(memory.buffer, W0, cells).set(weights);
  let ldcBytes = 0;
  return {
    setProducts(c, rows, ldc) {
      grow(C0 + 4 * rows * ldc);
      new Float32Array(memory.buffer, C0, rows * ldc).set(c.subarray(0, rows * ldc));
      new Uint8Array(memory.buffer, F0, flagRows * cells).fill(0);
      ldcBytes = 4 * ldc;
    },
    row(row, lag, flagRow, s) {
      const b = B0 + 4 * lag * cells;
      const units = tally(
        C0 + row * ldcBytes,
        b,
        b + 4 * lc,
        b + 8 * lc,
        b + 12 * lc,
        W0,
        F0 + flagRow * cells,
        L0,
        cells,
        s,
      );
      return { units, banded: new Int32Array(memory.buffer, 0, 1)[0] };
    },
    listed: () => new Int32Array(memory.buffer, L0, cells),
    flags: (flagRow) => new Uint8Array(memory.buffer, F0 + flagRow * cells, cells),
  };
}
