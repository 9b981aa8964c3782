/**
 * One timed run of the field-significance workload (field_case.ts) in this process, printed
 * as one JSON line: seconds for the whole test from the field in memory (preprocessing, map,
 * plan, surrogates × cells, reducer) and per stage, the process's peak resident memory, and
 * the results (to compare with the numpy peer).
 *
 *   deno run -A test/bench/field_run.ts [blas2 | wasm2 | blas2-default-threads | wasm1 | blas]
 *
 * blas2: the map's cell blocks and the surrogate chunks on 2 Web Workers, split as the service
 * splits them for the map (the pool is started before the clock, as the service keeps its
 * pool), each chunk through the service's task with its default engine (OpenBLAS sgemm through
 * FFI, one OpenBLAS thread per worker; api/workers/openblas_product.ts); wasm2: the same with
 * `SUNLAG_BLAS=off` (WebAssembly SIMD); blas2-default-threads: 2 workers with OpenBLAS's own
 * thread count; wasm1: one thread, WebAssembly; blas: one thread with OpenBLAS running its own
 * threads. The printed `resultSha256` (SHA-256 of the combined result) must be the same for
 * every variant.
 *
 * @module
 */
import {
  assembleSolarSignalMap,
  combineFieldMonteCarlo,
  type FieldAnalysisInputs,
  type FieldChunkTally,
  fieldSignificanceChunk,
  fieldSignificanceTasks,
  mapPredictorPart,
  planFieldSignificance,
  prepareFieldAnalysis,
  sliceFieldAnalysisInputs,
  type SolarSignalMap,
  solarSignalMap,
  type SolarSignalMapCells,
  wasmFloat32Product,
} from "../../core/field/mod.ts";
import { fieldCase, MAX_LAG, SEED, SURROGATES } from "./field_case.ts";
import { openBlasFloat32Product } from "../../api/workers/openblas_product.ts";

const variant = Deno.args[0] ?? "blas2";
const WORKER_ENGINE: Record<string, string> = {
  blas2: "auto",
  wasm2: "off",
  "blas2-default-threads": "auto-default-threads",
};
const PER_TASK = 125;
const { field, x, weights } = fieldCase();

function peakRss(): number {
  const status = Deno.readTextFileSync("/proc/self/status");
  const kb = Number(/VmHWM:\s+(\d+) kB/.exec(status)?.[1] ?? NaN);
  return kb * 1024;
}

const pool = variant in WORKER_ENGINE
  ? Array.from(
    { length: 2 },
    () =>
      new Worker(new URL("./field_worker.ts", import.meta.url).href, {
        type: "module",
        name: WORKER_ENGINE[variant],
      }),
  )
  : [];
const blas = variant === "blas" ? openBlasFloat32Product({ threads: "default" }) : null;
if (variant === "blas" && !blas) throw new Error("OpenBLAS could not be loaded");
const engine = blas ?? wasmFloat32Product();

async function onWorkers<O>(tasks: unknown[]): Promise<O[]> {
  const out: O[] = [];
  let next = 0;
  await Promise.all(pool.map((w) =>
    new Promise<void>((resolve) => {
      const send = () => (next < tasks.length ? w.postMessage(tasks[next++]) : resolve());
      w.onmessage = (e) => {
        out.push(e.data);
        send();
      };
      send();
    })
  ));
  return out;
}

if (pool.length > 0) {
  // warm-up: the workers compile their module before the clock starts
  const small = prepareFieldAnalysis(
    { ...field, nTime: 60, values: field.values.subarray(0, 60 * 2592) },
    x.subarray(0, 60),
    { minLag: 0, maxLag: 1 },
  );
  const p = planFieldSignificance(small, solarSignalMap(small), weights, {
    seed: 1,
    surrogates: 2,
  });
  await onWorkers(fieldSignificanceTasks(p, { surrogatesPerTask: 1 }));
  await mapOf(small);
}

/** The map, in blocks of cells on the pool as the service splits it (wasm2), else in one. */
async function mapOf(inputs: FieldAnalysisInputs): Promise<SolarSignalMap> {
  if (pool.length === 0) return solarSignalMap(inputs);
  const nc = inputs.cells.length;
  const size = Math.ceil(nc / Math.max(1, Math.min(8, Math.floor(nc / 256))));
  const blocks = [];
  for (let i = 0; i < nc; i += size) {
    blocks.push({
      kind: "map",
      inputs: sliceFieldAnalysisInputs(inputs, i, Math.min(nc, i + size)),
    });
  }
  mapPredictorPart(inputs);
  return assembleSolarSignalMap(inputs, await onWorkers<SolarSignalMapCells>(blocks));
}

const t0 = performance.now();
const inputs = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: MAX_LAG });
const t1 = performance.now();
const map = await mapOf(inputs);
const t2 = performance.now();
const plan = planFieldSignificance(inputs, map, weights, { seed: SEED, surrogates: SURROGATES });
const t3 = performance.now();
const tasks = fieldSignificanceTasks(plan, { surrogatesPerTask: PER_TASK });
const tallies = pool.length > 0
  ? await onWorkers<FieldChunkTally>(tasks)
  : tasks.map((t) => fieldSignificanceChunk(t, engine));
const result = combineFieldMonteCarlo(plan, tallies);
const t4 = performance.now();
const peakBytes = peakRss();
pool.forEach((w) => w.terminate());

const canonical = JSON.stringify(
  result,
  (_, v) => (ArrayBuffer.isView(v) ? Array.from(v as Float64Array) : v),
);
const digest = await crypto.subtle.digest("SHA-256", new TextEncoder().encode(canonical));
const probe = openBlasFloat32Product({ threads: "default" });
console.log(JSON.stringify({
  variant,
  engine: WORKER_ENGINE[variant] ?? (blas ? `${blas.name} (${blas.core})` : engine.name),
  openblasCore: probe?.core ?? null,
  resultSha256: Array.from(new Uint8Array(digest), (b) => b.toString(16).padStart(2, "0")).join(""),
  seconds: (t4 - t0) / 1000,
  stages: {
    prepare: (t1 - t0) / 1000,
    map: (t2 - t1) / 1000,
    plan: (t3 - t2) / 1000,
    surrogates: (t4 - t3) / 1000,
  },
  peakBytes,
  pField: result.pField,
  observedFraction: result.observedFraction,
  observedBest: result.observedBest,
  nullQ95: result.nullBest.q95,
  rechecked: tallies.reduce((s, t) => s + t.rechecked, 0),
}));
