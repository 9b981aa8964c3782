/**
 * The OpenBLAS product engine of the field-significance chunks (api/workers/openblas_product.ts):
 * the same tallies as the WebAssembly and plain-JS engines on a case built to put many
 * comparisons within the float32 error band of their thresholds, and the silent fallback.
 * Where no OpenBLAS library is installed (Debian: libopenblas0-pthread), the OpenBLAS steps
 * are skipped with that reason; CI installs it.
 */
import assert from "node:assert/strict";
import {
  combineFieldMonteCarlo,
  fieldAreaWeights,
  type FieldChunkTally,
  fieldSignificanceChunk,
  fieldSignificanceTasks,
  type Float32ProductEngine,
  jsFloat32Product,
  planFieldSignificance,
  prepareFieldAnalysis,
  solarSignalMap,
  wasmFloat32Product,
} from "../../core/field/mod.ts";
import { dftAmplitudes, phaseRandomisedSpectrum } from "../../core/climate/surrogates.ts";
import { inverseRealDft } from "../../core/spectral/fft.ts";
import { randomStream } from "../../core/random/random_stream.ts";
import {
  chooseFloat32Engine,
  openBlasFloat32Product,
  productEngine,
  setProductEngineSetting,
} from "../../api/workers/openblas_product.ts";
import { WorkerPool } from "../../api/workers/pool.ts";
import { readConfig } from "../../api/config.ts";
import { syntheticField } from "../core/field/synthetic_field.ts";

const blas = openBlasFloat32Product();
const NO_BLAS = "no OpenBLAS library here (install Debian's libopenblas0-pthread)";
const SEED = 17, M = 40;

/**
 * An invented field whose predictor is itself surrogate 0 of the test's seed: surrogate 0 of
 * the test then reproduces the predictor up to ~1e-15 (same amplitudes, same phase stream),
 * (odd length), so at every cell its best-lag |r| meets the observed one within rounding, far inside the
 * float32 band (~1e-5): every such comparison must be settled by the float64 recomputation.
 */
function nearThresholdCase() {
  // odd length: no Nyquist term, whose amplitude a surrogate rescales
  const { field, x } = syntheticField({ seed: 23, nLat: 12, nLon: 24, n: 239 });
  const n = x.length;
  const xs = inverseRealDft(phaseRandomisedSpectrum(dftAmplitudes(x), n, randomStream(SEED, 0)), n);
  const inputs = prepareFieldAnalysis(field, xs, { minLag: 0, maxLag: 6 });
  const map = solarSignalMap(inputs);
  const plan = planFieldSignificance(inputs, map, fieldAreaWeights(field), {
    seed: SEED,
    surrogates: M,
  });
  return {
    plan,
    tasks: fieldSignificanceTasks(plan, { surrogatesPerTask: 16, cellsPerTask: 100 }),
  };
}

/** Decide every comparison in float64 (no float32 shortcut): the reference tallies. */
function strictPlan(plan: ReturnType<typeof nearThresholdCase>["plan"]) {
  return {
    ...plan,
    sigHi: new Float32Array(plan.sigHi.length).fill(Infinity),
    sigLo: new Float32Array(plan.sigLo.length),
    exHi: new Float32Array(plan.exHi.length).fill(Infinity),
    exLo: new Float32Array(plan.exLo.length),
  };
}

Deno.test("OpenBLAS, WebAssembly and plain-JS engines give identical tallies near the thresholds", async (t) => {
  const { plan, tasks } = nearThresholdCase();
  const reference = tasks.map((k) => fieldSignificanceChunk({ ...k, plan: strictPlan(k.plan) }));
  const tally = (engine: Float32ProductEngine) =>
    tasks.map((k) => fieldSignificanceChunk(k, engine));
  const strip = (ts: FieldChunkTally[]) => ts.map(({ rechecked: _, ...rest }) => rest);
  const wasm = tally(wasmFloat32Product());
  const recheckedWasm = wasm.reduce((s, x) => s + x.rechecked, 0);
  await t.step(
    "the case puts many comparisons in the band (surrogate 0 meets every best |r|)",
    () => {
      // at least one recheck per cell for surrogate 0's exceedance of the best-lag |r|
      assert.ok(
        recheckedWasm >= plan.cellCount,
        `${recheckedWasm} rechecks, ${plan.cellCount} cells`,
      );
    },
  );
  await t.step("WebAssembly tallies equal the all-float64 ones", () => {
    assert.deepEqual(strip(wasm), strip(reference));
  });
  await t.step("plain-JS tallies equal them too", () => {
    assert.deepEqual(strip(tally(jsFloat32Product())), strip(reference));
  });
  await t.step({
    name: "OpenBLAS tallies and the combined result equal them too",
    ignore: blas === null,
    fn: () => {
      // the engines round differently (else this step would prove nothing) ...
      const y = plan.y, n = plan.n, C = plan.cellCount;
      const a = Float32Array.from({ length: 64 * n }, (_, i) => Math.sin(i * 0.37) * 3.1);
      const w = wasmFloat32Product(), b = blas!;
      w.setRight(y, n, C);
      b.setRight(y, n, C);
      const cw = w.multiply(a, 64), cb = b.multiply(a, 64);
      let differ = 0;
      for (let r = 0; r < 64; r++) {
        for (let c = 0; c < C; c++) if (cw.c[r * cw.ldc + c] !== cb.c[r * cb.ldc + c]) differ++;
      }
      assert.ok(differ > 0, "OpenBLAS and WebAssembly products are bit-identical here");
      // ... and still decide the same
      const ours = tally(blas!);
      assert.deepEqual(strip(ours), strip(reference));
      assert.deepEqual(
        combineFieldMonteCarlo(plan, ours),
        combineFieldMonteCarlo(plan, reference),
      );
    },
  });
  if (blas === null) console.log(`OpenBLAS step skipped: ${NO_BLAS}`);
});

Deno.test("the product engine falls back to WebAssembly silently", async (t) => {
  await t.step("a library that is not there", () => {
    assert.equal(openBlasFloat32Product({ paths: ["/nonexistent/libopenblas.so.0"] }), null);
    const e = chooseFloat32Engine("auto", { paths: ["/nonexistent/libopenblas.so.0"] });
    assert.equal(e.name, "wasm-simd-f32");
  });
  await t.step("a file that is not a library", () => {
    const e = chooseFloat32Engine("auto", { paths: [new URL(import.meta.url).pathname] });
    assert.equal(e.name, "wasm-simd-f32");
  });
  await t.step("SUNLAG_BLAS=off", () => {
    setProductEngineSetting("off");
    try {
      assert.equal(productEngine().name, "wasm-simd-f32");
    } finally {
      setProductEngineSetting("auto");
    }
  });
  await t.step({
    name: "setting auto picks OpenBLAS where it loads",
    ignore: blas === null,
    fn: () => {
      assert.equal(productEngine().name, "openblas-sgemm");
      assert.equal(blas!.threads, 1);
    },
  });
  await t.step("no FFI permission", async () => {
    const code = `import { chooseFloat32Engine } from ${
      JSON.stringify(new URL("../../api/workers/openblas_product.ts", import.meta.url).href)
    }; console.log(chooseFloat32Engine("auto").name);`;
    const out = await new Deno.Command(Deno.execPath(), {
      args: ["eval", "--no-check", code],
      stdout: "piped",
      stderr: "piped",
    }).output();
    // `deno eval` has every permission: deny FFI explicitly
    const denied = await new Deno.Command(Deno.execPath(), {
      args: ["run", "--no-check", "--allow-read", "--deny-ffi", "-"],
      stdin: "piped",
      stdout: "piped",
      stderr: "piped",
    }).spawn();
    const writer = denied.stdin.getWriter();
    await writer.write(new TextEncoder().encode(code));
    await writer.close();
    const res = await denied.output();
    const err = new TextDecoder().decode(res.stderr);
    assert.ok(res.success, err);
    assert.equal(new TextDecoder().decode(res.stdout).trim(), "wasm-simd-f32");
    assert.ok(out.success, new TextDecoder().decode(out.stderr));
    const expected = blas === null ? "wasm-simd-f32" : "openblas-sgemm";
    assert.equal(new TextDecoder().decode(out.stdout).trim(), expected);
  });
});

Deno.test("compute workers take the pool's engine setting and report their engine when warm", async () => {
  for (const setting of ["off", "auto"] as const) {
    const pool = new WorkerPool(1, undefined, { blas: setting });
    try {
      const [warm] = await pool.warmUp() as { product_engine: string }[];
      const expected = setting === "off" || blas === null ? "wasm-simd-f32" : "openblas-sgemm";
      assert.equal(warm.product_engine, expected);
    } finally {
      pool.terminate();
    }
  }
});

Deno.test("SUNLAG_BLAS is read with the configuration: auto by default, off, or refused", () => {
  assert.equal(readConfig({}).blas, "auto");
  assert.equal(readConfig({ SUNLAG_BLAS: "off" }).blas, "off");
  assert.equal(readConfig({ SUNLAG_BLAS: "auto" }).blas, "auto");
  assert.throws(() => readConfig({ SUNLAG_BLAS: "on" }), /SUNLAG_BLAS must be auto or off/);
});
