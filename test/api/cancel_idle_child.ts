/**
 * Child process of test/api/cancel_idle_test.ts (its own process, so that the CPU time it
 * reads is only its own): a service with a pool of two workers and the demo data starts a
 * heavy asynchronous run of each analysis that can be heavy, waits until the workers are busy,
 * cancels it, and measures how long the process' CPU takes to go idle and the pool to empty.
 * Prints one JSON line per kind.
 *
 * `deno run -A test/api/cancel_idle_child.ts [kind ...]`
 *
 * @module
 */
import process from "node:process";
import { createService } from "../../api/app.ts";
import { testConfig } from "../../api/config.ts";
import { openStoreFromSpec } from "../../api/store/mod.ts";
import { WorkerPool } from "../../api/workers/pool.ts";
import { loadDemo } from "../../api/demo.ts";
import { DEMO } from "./demo_inputs.ts";

const { SSN, TSIM, TEMP, ENSO, AOD, FIELD, AREA, TSI, MG } = DEMO;

/** CPU seconds of this process so far (every thread). */
function cpu(): number {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1e6;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Share of one core used over the next `ms` milliseconds. */
async function load(ms: number): Promise<number> {
  const c0 = cpu(), t0 = performance.now();
  await sleep(ms);
  return (cpu() - c0) / ((performance.now() - t0) / 1000);
}

const store = await openStoreFromSpec("sqlite::memory:");
const pool = new WorkerPool(2);
const svc = createService({
  store,
  config: testConfig({ workers: 2, asyncSeconds: 1000 }),
  executor: pool,
});
await loadDemo(store);
const post = async (path: string, body: unknown, headers: Record<string, string> = {}) => {
  const res = await svc.app.request(path, {
    method: "POST",
    headers: { "content-type": "application/json", ...headers },
    body: JSON.stringify(body),
  });
  return { status: res.status, body: await res.json() };
};
const cycles = await post("/v1/cycles", { series: SSN });
/** The demo's proxy model, through its darkening run and saved PSI (for reconstructions). */
async function demoModel(): Promise<{ model: string; psi: string }> {
  const darkening = await post("/v1/irradiance/darkening", { total_area: AREA });
  const psi = (await post(`/v1/runs/${darkening.body.id}/outputs/psi/series`, {})).body.id;
  const model = await post("/v1/irradiance/models", {
    tsi: TSI,
    sunspot_number: SSN,
    terms: [
      { name: "mg_ii", series: MG, role: "facular" },
      { name: "psi", series: psi, role: "sunspot_darkening" },
    ],
  });
  return { model: model.body.id, psi };
}
const irradiance = await demoModel();

/** A regressor of the attribution search: lags 0..300 months. */
const wide = (name: string, series: string) => ({ name, series, min_lag: 0, max_lag: 300 });

/** Monthly dates every `months` months from `start` (a decimal year) for `count` dates. */
const everyMonths = (start: number, months: number, count: number) =>
  Array.from({ length: count }, (_, k) => {
    const m = Math.round(start * 12) + k * months;
    return `${Math.floor(m / 12)}-${String((m % 12) + 1).padStart(2, "0")}`;
  });

/** Requests that keep two workers busy for far longer than the test waits. */
const HEAVY: Record<string, [string, unknown]> = {
  "lag-correlations": ["/v1/lag-correlations", {
    solar: TSIM,
    climate: TEMP,
    surrogates: 100_000,
    preprocess: "high_pass",
    high_pass_cutoff_years: 30,
  }],
  "spectra": ["/v1/spectra", {
    series: SSN,
    false_alarm: "both",
    replicates: 10_000,
  }],
  "cycle-forecasts": ["/v1/cycle-forecasts", {
    series: SSN,
    replicates: 5000,
    hindcast_replicates: 2000,
  }],
  "attributions": ["/v1/attributions", {
    climate: TEMP,
    regressors: [
      { ...wide("solar", TSIM), role: "solar" },
      wide("enso", ENSO),
      wide("volcanic", AOD),
      wide("sunspots", SSN),
    ],
  }],
  "irradiance-reconstructions": ["/v1/irradiance/reconstructions", {
    model: irradiance.model,
    sunspot_number: SSN,
    proxies: [{ term: "mg_ii", series: MG }, { term: "psi", series: irradiance.psi }],
    resolution: "monthly",
    period: { start: "1700", end: "2025" },
    realizations: 1000,
  }],
  "composites": ["/v1/composites", {
    series: SSN,
    cycle_run: cycles.body.id,
    before_years: 20,
    after_years: 20,
    bootstrap: 100,
    random_sets: 100_000,
  }],
  "solar-signal-maps": ["/v1/solar-signal-maps", {
    field: FIELD,
    solar: TSIM,
    max_lag: 120,
    surrogates: 100_000,
  }],
  "field-composites": ["/v1/field-composites", {
    field: FIELD,
    epoch_dates: everyMonths(1962, 6, 100),
    contrast_dates: everyMonths(1962.25, 6, 100),
    to_years: 1,
    random_sets: 100_000,
  }],
};

const wanted = Deno.args.length ? Deno.args : Object.keys(HEAVY);
for (const kind of wanted) {
  const [path, body] = HEAVY[kind];
  const created = await post(path, body, { prefer: "respond-async" });
  if (created.status !== 202) throw new Error(`${kind}: ${JSON.stringify(created.body)}`);
  const id = created.body.id as string;
  // running, and its work on the CPU (on a machine shared with other work, a share of it)
  let busy = 0;
  const t0 = performance.now();
  while (performance.now() - t0 < 20_000) {
    const run = await store.getRun(id);
    if (run?.status === "running" && pool.stats().busy > 0) {
      busy = await load(300);
      if (busy > 0.15 && performance.now() - t0 > 500) break;
    } else await sleep(20);
  }
  const cancel = await post(`/v1/runs/${id}/cancel`, {});
  const tc = performance.now();
  // idle: the start of the first window of 250 ms over which the process uses under 5 % of
  // one core; and the moment the pool holds nothing of the run any more
  let idleAt = NaN, emptyAt = NaN;
  const samples: [number, number][] = [];
  while (performance.now() - tc < 5000 && (Number.isNaN(idleAt) || Number.isNaN(emptyAt))) {
    const now = performance.now();
    samples.push([now, cpu()]);
    const s = pool.stats();
    if (Number.isNaN(emptyAt) && s.busy === 0 && s.in_flight === 0 && s.queued === 0) {
      emptyAt = now - tc;
    }
    if (Number.isNaN(idleAt)) {
      // the latest sample at least 250 ms before this one
      let k = samples.length - 1;
      while (k > 0 && now - samples[k][0] < 250) k--;
      if (now - samples[k][0] >= 250) {
        const [ta, ca] = samples[k];
        if ((samples[samples.length - 1][1] - ca) / ((now - ta) / 1000) < 0.05) idleAt = ta - tc;
      }
    }
    await sleep(10);
  }
  await svc.runs.settle();
  const after = await store.getRun(id);
  console.log(JSON.stringify({
    kind,
    cancel_status: cancel.status,
    busy_cores_before: Math.round(busy * 100) / 100,
    cancel_to_idle_ms: Math.max(0, Math.round(idleAt)),
    cancel_to_pool_empty_ms: Math.round(emptyAt),
    status: after?.status,
    replaced_workers: pool.stats().replaced,
  }));
}
pool.terminate();
await store.close();
Deno.exit(0);
