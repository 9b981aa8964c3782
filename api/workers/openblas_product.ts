/**
 * The float32 matrix product of the Monte Carlo field-significance chunks
 * (core/field/field_significance_monte_carlo.ts) on the system's OpenBLAS `cblas_sgemm`
 * through Deno's FFI, with the WebAssembly SIMD engine of core/field/float32_matrix_product.ts
 * as the fallback: when the setting is `off` (`SUNLAG_BLAS=off`), when no OpenBLAS library is
 * found (Debian: `libopenblas0-pthread` or `libopenblas0`), or when the process may not load
 * native code (no `--allow-ffi`). The fallback is silent: nothing but speed differs.
 *
 * Results do not depend on the engine: every comparison the chunk makes from a float32
 * product is farther from its threshold than a rigorous bound on the float32 dot-product
 * error (Higham 2002, eq. 3.5, for any summation order, blocking or fused multiply-add), and
 * the others are recomputed in float64. So the engine is not part of a run's result or digest;
 * the workers report it when they warm up (the service's `workers_warm` log line).
 *
 * Threads: OpenBLAS is set to one thread (`openblas_set_num_threads(1)`, process-wide), since
 * the worker pool already spreads the chunks over the cores.
 *
 * This is I/O (a native library is loaded), hence here and not in core/.
 *
 * @module
 */
import {
  type Float32ProductEngine,
  wasmFloat32Product,
} from "../../core/field/float32_matrix_product.ts";

/** Whether the OpenBLAS engine may be used (`SUNLAG_BLAS`). */
export type BlasSetting = "auto" | "off";

/** Where the OpenBLAS library is looked for, in order (the dynamic loader's name first). */
export const OPENBLAS_PATHS: readonly string[] = [
  "libopenblas.so.0",
  "/usr/lib/x86_64-linux-gnu/libopenblas.so.0",
  "/usr/lib/x86_64-linux-gnu/openblas-pthread/libopenblas.so.0",
  "/usr/lib/aarch64-linux-gnu/libopenblas.so.0",
  "/usr/lib/aarch64-linux-gnu/openblas-pthread/libopenblas.so.0",
];

const SYMBOLS = {
  cblas_sgemm: {
    // order, transA, transB, m, n, k, alpha, A, lda, B, ldb, beta, C, ldc
    parameters: [
      "i32",
      "i32",
      "i32",
      "i32",
      "i32",
      "i32",
      "f32",
      "buffer",
      "i32",
      "buffer",
      "i32",
      "f32",
      "buffer",
      "i32",
    ],
    result: "void",
  },
  openblas_set_num_threads: { parameters: ["i32"], result: "void", optional: true },
  openblas_get_num_threads: { parameters: [], result: "i32", optional: true },
  openblas_get_corename: { parameters: [], result: "pointer", optional: true },
} as const;

/** The OpenBLAS engine, with what was loaded. */
export interface OpenBlasProduct extends Float32ProductEngine {
  /** The file that was loaded. */
  readonly path: string;
  /** OpenBLAS's name of the CPU kernels it chose (e.g. "Haswell"), or "unknown". */
  readonly core: string;
  /** OpenBLAS threads per call after set-up. */
  readonly threads: number;
}

/** Options of {@link openBlasFloat32Product}. */
export interface OpenBlasOptions {
  /** Library paths to try, in order. @default OPENBLAS_PATHS */
  paths?: readonly string[];
  /** OpenBLAS threads (process-wide), or "default" to leave OpenBLAS's own choice. @default 1 */
  threads?: number | "default";
}

/**
 * The OpenBLAS `sgemm` engine, or null when no library can be loaded (missing, or no FFI
 * permission). Checks the sizes itself: a native call must never read past an array.
 *
 * @param options library paths and threads
 * @returns the engine, or null
 * @example
 * ```ts
 * import { openBlasFloat32Product } from "./openblas_product.ts";
 * import assert from "node:assert/strict";
 * assert.equal(openBlasFloat32Product({ paths: ["/nonexistent/libopenblas.so.0"] }), null);
 * const e = openBlasFloat32Product();
 * if (e) { // where OpenBLAS is installed
 *   e.setRight(Float32Array.of(1, 2, 3, 4), 2, 2); // [[1, 2], [3, 4]]
 *   const { c } = e.multiply(Float32Array.of(1, 1), 1);
 *   assert.deepEqual([c[0], c[1]], [4, 6]);
 * }
 * ```
 */
export function openBlasFloat32Product(options: OpenBlasOptions = {}): OpenBlasProduct | null {
  let lib: Deno.DynamicLibrary<typeof SYMBOLS> | null = null, path = "";
  for (const p of options.paths ?? OPENBLAS_PATHS) {
    try {
      lib = Deno.dlopen(p, SYMBOLS);
      path = p;
      break;
    } catch {
      // missing library, or no FFI permission: try the next path, then give up
    }
  }
  if (!lib) return null;
  const sym = lib.symbols;
  const threads = options.threads ?? 1;
  if (threads !== "default" && sym.openblas_set_num_threads) sym.openblas_set_num_threads(threads);
  const corePointer = sym.openblas_get_corename ? sym.openblas_get_corename() : null;
  const core = corePointer ? Deno.UnsafePointerView.getCString(corePointer) : "unknown";
  const used = sym.openblas_get_num_threads ? sym.openblas_get_num_threads() : 0;
  let b = new Float32Array(0), k = 0, n = 0, c = new Float32Array(0);
  return {
    name: "openblas-sgemm",
    path,
    core,
    threads: used,
    setRight(bb, kk, nn) {
      if (!(Number.isInteger(kk) && Number.isInteger(nn) && kk >= 1 && nn >= 1)) {
        throw new RangeError(`Cannot set matrix: sizes must be positive, got ${kk} × ${nn}`);
      }
      if (bb.length < kk * nn) {
        throw new RangeError(`Cannot set matrix: needs ${kk * nn} values, got ${bb.length}`);
      }
      b = bb.slice(0, kk * nn);
      k = kk;
      n = nn;
    },
    multiply(a, m) {
      if (k === 0) throw new RangeError("Cannot multiply: call setRight first");
      if (!(Number.isInteger(m) && m >= 0)) {
        throw new RangeError(`Cannot multiply: rows must be a non-negative integer, got ${m}`);
      }
      if (a.length < m * k) {
        throw new RangeError(`Cannot multiply: A needs ${m * k} values, got ${a.length}`);
      }
      if (c.length < m * n) c = new Float32Array(m * n);
      // row-major (101), no transposes (111): C = 1·A·B + 0·C
      if (m > 0) sym.cblas_sgemm(101, 111, 111, m, n, k, 1, a, k, b, n, 0, c, n);
      return { c, ldc: n };
    },
  };
}

/**
 * The engine for a setting: OpenBLAS when allowed and loadable, else the WebAssembly one.
 *
 * @param setting `auto` (OpenBLAS where it loads) or `off`
 * @param options library paths and threads (for tests and benchmarks)
 * @returns a new engine
 * @example
 * ```ts
 * import { chooseFloat32Engine } from "./openblas_product.ts";
 * import assert from "node:assert/strict";
 * assert.equal(chooseFloat32Engine("off").name, "wasm-simd-f32");
 * assert.equal(chooseFloat32Engine("auto", { paths: ["/nonexistent.so"] }).name, "wasm-simd-f32");
 * ```
 */
export function chooseFloat32Engine(
  setting: BlasSetting,
  options: OpenBlasOptions = {},
): Float32ProductEngine {
  return (setting === "auto" ? openBlasFloat32Product(options) : null) ?? wasmFloat32Product();
}

let threadSetting: BlasSetting = "auto";
let threadEngine: Float32ProductEngine | null = null;

/**
 * Set this thread's engine setting (the service's main thread from its configuration, each
 * compute worker from the pool's first message); the engine is chosen again at next use.
 *
 * @param setting `auto` or `off`
 */
export function setProductEngineSetting(setting: BlasSetting): void {
  if (setting !== threadSetting) threadEngine = null;
  threadSetting = setting;
}

/**
 * This thread's engine, chosen once per setting and reused by every chunk task the thread
 * runs (tasks are synchronous, so one engine is never used by two at a time).
 *
 * @returns the engine
 * @example
 * ```ts
 * import { productEngine, setProductEngineSetting } from "./openblas_product.ts";
 * import assert from "node:assert/strict";
 * setProductEngineSetting("off");
 * assert.equal(productEngine().name, "wasm-simd-f32");
 * assert.equal(productEngine(), productEngine());
 * setProductEngineSetting("auto");
 * ```
 */
export function productEngine(): Float32ProductEngine {
  threadEngine ??= chooseFloat32Engine(threadSetting);
  return threadEngine;
}
