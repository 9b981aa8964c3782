/**
 * One timed run of the field-significance workload (field_case.ts) in this process, printed
 * as one JSON line: seconds for the whole test from the field in memory (preprocessing, map,
 * plan, surrogates × cells, reducer) and per stage, the process's peak resident memory, and
 * the results (to compare with the numpy peer).
 *
 *   deno run -A test/bench/field_run.ts [wasm2 | wasm1 | blas]
 *
 * wasm2: the map's cell blocks and the surrogate chunks on 2 Web Workers, split as the service
 * splits them for the map (the pool is started before the clock, as the service keeps its pool); wasm1: one thread; blas: one thread with OpenBLAS sgemm through FFI
 * (OpenBLAS runs its own 2 threads).
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
import { blasFloat32Product } from "./blas_ffi_product.ts";

const variant = Deno.args[0] ?? "wasm2";
const PER_TASK = 125;
const { field, x, weights } = fieldCase();

function peakRss(): number {
  const status = Deno.readTextFileSync("/proc/self/status");
  const kb = Number(/VmHWM:\s+(\d+) kB/.exec(status)?.[1] ?? NaN);
  return kb * 1024;
}

const pool = variant === "wasm2"
  ? Array.from(
    { length: 2 },
    () => new Worker(new URL("./field_worker.ts", import.meta.url).href, { type: "module" }),
  )
  : [];
const blas = variant === "blas" ? blasFloat32Product() : null;
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
pool.forEach((w) => w.terminate());

console.log(JSON.stringify({
  variant,
  engine: blas ? `${blas.name} (${blas.core})` : engine.name,
  seconds: (t4 - t0) / 1000,
  stages: {
    prepare: (t1 - t0) / 1000,
    map: (t2 - t1) / 1000,
    plan: (t3 - t2) / 1000,
    surrogates: (t4 - t3) / 1000,
  },
  peakBytes: peakRss(),
  pField: result.pField,
  observedFraction: result.observedFraction,
  observedBest: result.observedBest,
  nullQ95: result.nullBest.q95,
  rechecked: tallies.reduce((s, t) => s + t.rechecked, 0),
}));
