/**
 * `deno bench` of the gridded-field area on the case of field_case.ts: the float32 product
 * kernels (one block of 8 surrogates × 25 lags against all 2,592 cells: WebAssembly SIMD, plain
 * JS, and OpenBLAS sgemm through FFI with one thread where it loads), one chunk task of 25
 * surrogates on each engine, the map, and the area-weighted mean. Side-by-side numbers against numpy are in
 * field_medians.ts.
 *
 * @module
 */
import {
  areaWeightedMean,
  fieldSignificanceChunk,
  jsFloat32Product,
  planFieldSignificance,
  prepareFieldAnalysis,
  solarSignalMap,
  wasmFloat32Product,
} from "../../core/field/mod.ts";
import { fieldCase, MAX_LAG, N_TIME, SEED } from "./field_case.ts";
import { openBlasFloat32Product } from "../../api/workers/openblas_product.ts";

const { field, x, weights } = fieldCase();
const inputs = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: MAX_LAG });
const map = solarSignalMap(inputs);
const plan = planFieldSignificance(inputs, map, weights, { seed: SEED, surrogates: 25 });
const rows = 8 * (MAX_LAG + 1);
const a = Float32Array.from({ length: rows * N_TIME }, (_, i) => Math.sin(i));
const wasm = wasmFloat32Product(), js = jsFloat32Product();
wasm.setRight(plan.y, N_TIME, plan.cellCount);
js.setRight(plan.y, N_TIME, plan.cellCount);
const blas = openBlasFloat32Product();
blas?.setRight(plan.y, N_TIME, plan.cellCount);
const chunk = { plan, surrogateStart: 0, surrogateEnd: 25, cellStart: 0, cellEnd: plan.cellCount };

Deno.bench("float32 product 200 × 600 · 600 × 2,592, WebAssembly SIMD", {
  group: "product",
  baseline: true,
}, () => {
  wasm.multiply(a, rows);
});
Deno.bench("float32 product 200 × 600 · 600 × 2,592, plain JS", { group: "product" }, () => {
  js.multiply(a, rows);
});
Deno.bench({
  name: "float32 product 200 × 600 · 600 × 2,592, OpenBLAS sgemm (1 thread)",
  group: "product",
  ignore: blas === null,
  fn: () => {
    blas!.multiply(a, rows);
  },
});
Deno.bench("field significance chunk: 25 surrogates × 2,592 cells × 25 lags, WebAssembly", {
  group: "chunk",
  baseline: true,
}, () => {
  fieldSignificanceChunk(chunk, wasm);
});
Deno.bench({
  name: "field significance chunk: 25 surrogates × 2,592 cells × 25 lags, OpenBLAS",
  group: "chunk",
  ignore: blas === null,
  fn: () => {
    fieldSignificanceChunk(chunk, blas!);
  },
});
// everything of a chunk but the product (surrogate rows, float32 copy, threshold pass): an
// engine whose products are all zero (then nothing is significant or in a band)
const zeros = new Float32Array(rows * plan.cellCount);
const zero = {
  name: "zero",
  setRight() {},
  multiply: () => ({ c: zeros, ldc: plan.cellCount }),
};
Deno.bench("field significance chunk: 25 surrogates × 2,592 cells × 25 lags, zero products", {
  group: "chunk",
}, () => {
  fieldSignificanceChunk(chunk, zero);
});
Deno.bench("solar-signal map: 2,592 cells × 25 lags × 600 months", () => {
  solarSignalMap(inputs);
});
Deno.bench("area-weighted global mean: 2,592 cells × 600 months", () => {
  areaWeightedMean(field);
});
