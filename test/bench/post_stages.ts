/**
 * Where a synchronous run's HTTP time goes: the service built in this process as api/main.ts
 * builds it (SQLite file in a temporary directory, two compute workers, demo data), served on
 * a local port, and each stage of a POST timed by wrapping the objects that do it: the whole
 * request as the server sees it, loading inputs (`prepare`), the worker's compute and finish
 * (compute, canonical JSON bytes, SHA-256) with the hop to it, storing the run, saving outputs,
 * and what is left (validation, building the response) — beside the client's time to the
 * response's end. Prints the medians per stage and the bytes of the result and the response.
 *
 * Usage: deno run -A test/bench/post_stages.ts [--rounds 7] [--only cycles|reconstruction]
 *   [--port 18451]
 *
 * @module
 */
import { dailySpots, demoIds, months3000 } from "./http_bench_inputs.ts";
import { readConfig } from "../../api/config.ts";
import { openStoreFromSpec } from "../../api/store/mod.ts";
import { createService } from "../../api/app.ts";
import { WorkerPool } from "../../api/workers/pool.ts";
import { loadDemo } from "../../api/demo.ts";
import { resultBytesOf } from "../../api/store/result_text.ts";
import type { ComputeExecutor } from "../../api/runs/service.ts";

const args = Deno.args;
const opt = (name: string, dflt: string) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? args[i + 1] : dflt;
};
const ROUNDS = Number(opt("rounds", "7"));
const ONLY = opt("only", "cycles,reconstruction").split(",");

const median = (xs: number[]) => {
  const a = [...xs].sort((p, q) => p - q);
  return a.length % 2 ? a[(a.length - 1) / 2] : (a[a.length / 2 - 1] + a[a.length / 2]) / 2;
};
const loadAverage = () => Deno.readTextFileSync("/proc/loadavg").split(" ").slice(0, 3).join(" ");

const dir = await Deno.makeTempDir({ prefix: "sunlag-stages-" });
const PORT = Number(opt("port", "18451"));
const config = readConfig({
  SUNLAG_STORE: `sqlite:${dir}/sunlag.db`,
  SUNLAG_LOG: "0",
  PORT: String(PORT),
});
const store = await openStoreFromSpec(config.store);
await loadDemo(store);
const pool = new WorkerPool(config.workers, undefined, { blas: config.blas });
await pool.warmUp();

/** Per-request stage times, ms (reset before each request). */
let stages: Record<string, number> = {};
const add = (k: string, ms: number) => (stages[k] = (stages[k] ?? 0) + ms);
// deno-lint-ignore no-explicit-any
function timeMethod(obj: any, name: string, label: string) {
  const orig = obj[name].bind(obj);
  obj[name] = async (...a: unknown[]) => {
    const t0 = performance.now();
    try {
      return await orig(...a);
    } finally {
      add(label, performance.now() - t0);
    }
  };
}
let resultBytes = 0;
const executor: ComputeExecutor = pool;
timeMethod(executor, "computeFinished", "worker: hop + compute + finish");
timeMethod(store, "putSeries", "store: putSeries");
const origPut = store.putRun.bind(store);
store.putRun = (r, h) => {
  resultBytes = resultBytesOf(r.result)?.length ?? 0;
  return origPut(r, h);
};
timeMethod(store, "putRun", "store: putRun");

const { app, runs } = createService({ store, config, executor, transport: undefined });
timeMethod(runs, "prepare", "prepare (load inputs)");
timeMethod(runs, "computeResult", "computeResult (incl. worker, inherited notes)");
timeMethod(runs, "saveOutputs", "saveOutputs");
timeMethod(runs, "submit", "submit");

const ac = new AbortController();
Deno.serve({
  hostname: "127.0.0.1",
  port: PORT,
  signal: ac.signal,
  onListen: () => {},
}, async (req) => {
  const t0 = performance.now();
  const res = await app.fetch(req);
  add("server: app.fetch", performance.now() - t0);
  return res;
});
const base = `http://127.0.0.1:${PORT}`;

async function post(path: string, body: unknown) {
  const res = await fetch(`${base}${path}`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify(body),
  });
  const json = await res.json();
  if (res.status !== 201 && res.status !== 200) throw new Error(JSON.stringify(json));
  return json;
}

async function timed(path: string, body: unknown) {
  stages = {};
  const t0 = performance.now();
  const res = await fetch(`${base}${path}`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify(body),
  });
  const tHead = performance.now() - t0;
  const text = await res.text();
  const ms = performance.now() - t0;
  if (res.status !== 201) throw new Error(`${res.status} ${text.slice(0, 300)}`);
  return { ...stages, "client: headers": tHead, "client: total": ms, response: text.length };
}

function report(name: string, rows: Record<string, number>[]) {
  console.log(`\n${name} (${rows.length} rounds, result ${resultBytes} bytes)`);
  for (const k of Object.keys(rows[0])) {
    console.log(`  ${k.padEnd(48)} ${median(rows.map((r) => r[k] ?? 0)).toFixed(2).padStart(9)}`);
  }
}

console.log(`load average at start ${loadAverage()}`);
try {
  const ids = await demoIds(base);
  if (ONLY.includes("cycles")) {
    const id = (await post("/v1/series", months3000())).series.id;
    const rows = [];
    for (let k = 0; k < 5 + ROUNDS * 3; k++) {
      const r = await timed("/v1/cycles", { series: id });
      if (k >= 5) rows.push(r);
    }
    report("cycles, 3,000 months", rows);
  }
  if (ONLY.includes("reconstruction")) {
    const spots = (await post("/v1/series", dailySpots(0))).series.id;
    const dark = await post("/v1/irradiance/darkening", {
      total_area: ids["sunspot_area_daily.csv"],
    });
    const psi = dark.saved_series.find((s: { output: string }) => s.output === "psi").id;
    const fac = ids["facular_index_daily.csv"];
    const tsi = ids["tsi_daily.csv"];
    const model = await post("/v1/irradiance/models", {
      tsi,
      terms: [
        { name: "mg", role: "facular", series: fac, quiet_level: 0.15 },
        { name: "psi", role: "sunspot_darkening", series: psi },
      ],
      sunspot_number: spots,
    });
    const body = {
      model: model.id,
      proxies: [{ term: "mg", series: fac }, { term: "psi", series: psi }],
      sunspot_number: spots,
      period: { start: "1610", end: "2029" },
      resolution: "daily",
    };
    const rows = [];
    for (let k = 0; k < 1 + ROUNDS; k++) {
      const r = await timed("/v1/irradiance/reconstructions", body);
      if (k >= 1) rows.push(r);
    }
    report("reconstruction, 153,000 days", rows);
  }
} finally {
  console.log(`load average at end ${loadAverage()}`);
  pool.terminate();
  await store.close();
  await Deno.remove(dir, { recursive: true });
  // the client's kept-alive connection would hold the server (and this process) open
  ac.abort();
  Deno.exit(0);
}
