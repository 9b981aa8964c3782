/**
 * A `Float32ProductEngine` on the system's OpenBLAS `cblas_sgemm` through Deno's FFI, for the
 * side-by-side benchmark (the same library numpy uses here). Not part of core (it loads a
 * native library); the field-significance decisions do not depend on the engine (see
 * core/field/field_significance_monte_carlo.ts), so it can be swapped in where the library
 * exists.
 *
 * @module
 */
import type { Float32ProductEngine } from "../../core/field/mod.ts";

const CANDIDATES = [
  "libopenblas.so.0",
  "/usr/lib/x86_64-linux-gnu/libopenblas.so.0",
  "/usr/lib/x86_64-linux-gnu/openblas-pthread/libopenblas.so.0",
];

const SYMBOLS = {
  cblas_sgemm: {
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
  openblas_get_corename: { parameters: [], result: "pointer" },
} as const;

/** The OpenBLAS engine, or null when the library cannot be loaded. */
export function blasFloat32Product(): (Float32ProductEngine & { core: string }) | null {
  let lib: Deno.DynamicLibrary<typeof SYMBOLS> | null = null;
  for (const path of CANDIDATES) {
    try {
      lib = Deno.dlopen(path, SYMBOLS);
      break;
    } catch {
      // try the next path
    }
  }
  if (!lib) return null;
  const core = Deno.UnsafePointerView.getCString(lib.symbols.openblas_get_corename()!);
  let b = new Float32Array(0), k = 0, n = 0, c = new Float32Array(0);
  return {
    name: "openblas-ffi",
    core,
    setRight(bb, kk, nn) {
      b = bb.slice(0, kk * nn);
      k = kk;
      n = nn;
    },
    multiply(a, m) {
      if (c.length < m * n) c = new Float32Array(m * n);
      // row-major (101), no transposes (111): C = 1·A·B + 0·C
      lib.symbols.cblas_sgemm(101, 111, 111, m, n, k, 1, a, k, b, n, 0, c, n);
      return { c, ldc: n };
    },
  };
}
