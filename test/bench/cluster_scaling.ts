/**
 * Scale-out on this machine: one run's chunks over 1 vs 2 worker processes sharing one
 * PostgreSQL (pg-boss), beside the same run computed in one process. Prints medians and the
 * speed-up, the queue overhead per chunk, and the time from a worker's death (kill -9) to its
 * chunk running on another worker. A benchmark, not a test:
 *
 * ```sh
 * deno run -A test/bench/cluster_scaling.ts lag [surrogates=100000] [repeats=3]
 * deno run -A test/bench/cluster_scaling.ts field [surrogates=2000] [repeats=3]
 * ```
 *
 * Workloads: `lag`, a lag-correlation run on the demo's monthly TSI composite and station
 * temperature with 100,000 phase surrogates (16 chunks of 6,250); `field`, a solar-signal map
 * of the demo field against the monthly TSI composite (lags 0–24 months) with the Monte Carlo
 * field significance (Livezey & Chen 1983) over 2,000 surrogates, in chunks of surrogates ×
 * cells. The overhead and recovery parts use the lag workload.
 *
 * @module
 */
import postgres from "postgres";
import { startLocalCluster } from "../cluster/local_cluster.ts";
import { makeTestApp } from "../api/helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { DEMO } from "../api/demo_inputs.ts";

const workload = Deno.args[0] === "field" ? "field" : "lag";
const surrogates = Number(Deno.args[1] ?? (workload === "field" ? 2000 : 100_000));
const repeats = Number(Deno.args[2] ?? 3);
const lagBody = { solar: DEMO.TSIM, climate: DEMO.TEMP, surrogates: 100_000, seed: 1 };
const path = workload === "field" ? "/v1/solar-signal-maps" : "/v1/lag-correlations";
const body = workload === "field"
  ? { field: DEMO.FIELD, solar: DEMO.TSIM, min_lag: 0, max_lag: 24, surrogates, seed: 1 }
  : { ...lagBody, surrogates };
const TERMINAL = new Set(["succeeded", "failed", "cancelled"]);

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

async function runOn(
  base: string,
  b: unknown,
  at = path,
): Promise<{ ms: number; digest: string }> {
  const t0 = performance.now();
  const res = await fetch(`${base}${at}`, {
    method: "POST",
    headers: { "content-type": "application/json", prefer: "respond-async" },
    body: JSON.stringify(b),
  });
  const { id } = await res.json();
  while (true) {
    const run = await (await fetch(`${base}/v1/runs/${id}`)).json();
    if (TERMINAL.has(run.status)) {
      if (run.status !== "succeeded") throw new Error(JSON.stringify(run.error));
      return { ms: performance.now() - t0, digest: run.result_digest };
    }
    await new Promise((r) => setTimeout(r, 25));
  }
}

// One process, in-thread pool of the same size as one worker process (1 Web Worker).
async function inProcess(): Promise<{ ms: number; digest: string }> {
  const svc = await makeTestApp({ workers: 1 });
  await loadDemo(svc.store);
  const t0 = performance.now();
  const res = await svc.post(path, body);
  let run = await res.json();
  await svc.runs.settle();
  run = await (await svc.get(`/v1/runs/${run.id}`)).json();
  const ms = performance.now() - t0;
  await svc.close();
  return { ms, digest: run.result_digest };
}

const cluster = await startLocalCluster({ apis: 1, workers: 1 });
if (!cluster) throw new Error("no PostgreSQL server binaries");
const api = cluster.apis[0].url!;
const times: Record<string, number[]> = { one_process: [], workers_1: [], workers_2: [] };
const digests = new Set<string>();
try {
  await runOn(api, { ...body, surrogates: workload === "field" ? 100 : 1000 }); // warm-up
  let second = null as Awaited<ReturnType<typeof cluster.start>> | null;
  for (let r = 0; r < repeats; r++) {
    const p = await inProcess();
    times.one_process.push(p.ms);
    digests.add(p.digest);
    if (second) {
      await second.stop();
      second = null;
      await new Promise((r) => setTimeout(r, 1500));
    }
    const one = await runOn(api, body);
    times.workers_1.push(one.ms);
    digests.add(one.digest);
    second = await cluster.start("worker");
    const two = await runOn(api, body);
    times.workers_2.push(two.ms);
    digests.add(two.digest);
  }

  // the queue's overhead and the recovery are measured on the lag workload
  const overhead: number[] = [];
  let recoveredMs = NaN, killToDoneMs = NaN, afterKill = "";
  let jobStates: { state: string; retry_count: number; n: number }[] = [];
  if (workload === "lag") {
    // Queue overhead per chunk: many trivial chunks (100 surrogates each is the minimum run
    // size; 16 chunks of 250) against the same run in one process.
    const small = { ...lagBody, surrogates: 4000 };
    for (let r = 0; r < repeats; r++) {
      const svc = await makeTestApp({ workers: 1 });
      await loadDemo(svc.store);
      const t0 = performance.now();
      await svc.post("/v1/lag-correlations", small);
      const local = performance.now() - t0;
      await svc.close();
      const dist = await runOn(api, small, "/v1/lag-correlations");
      overhead.push((dist.ms - local) / 16);
    }

    // Recovery: kill -9 the worker that is computing a chunk but does not hold the run.
    const db = postgres(cluster.storeUrl, { max: 1, onnotice: () => {} });
    const res = await fetch(`${api}/v1/lag-correlations`, {
      method: "POST",
      headers: { "content-type": "application/json", prefer: "respond-async" },
      body: JSON.stringify({ ...lagBody, seed: 2 }),
    });
    const { id } = await res.json();
    let holderPid = 0;
    while (!holderPid) {
      const [row] = await db`SELECT lease_holder FROM runs WHERE id = ${id}`;
      if (row?.lease_holder) holderPid = Number(String(row.lease_holder).split(":")[1]);
      await new Promise((r) => setTimeout(r, 20));
    }
    const victim = cluster.workers.find((w) => w.pid !== holderPid && w.log.length)!;
    // wait until both worker processes hold a chunk job, then kill the non-holder (each takes
    // one job at a time; if the run ends first, recovery is not measured)
    let ended = false;
    while (!ended) {
      const [a] = await db`SELECT count(*) AS n FROM pgboss.job
        WHERE name = 'sunlag-chunks' AND state = 'active'`;
      if (Number(a.n) >= 2) break;
      const [r] = await db`SELECT status FROM runs WHERE id = ${id}`;
      ended = TERMINAL.has(r.status);
      await new Promise((r) => setTimeout(r, 10));
    }
    if (ended) throw new Error("the run ended before both worker processes held a chunk");
    const killedAt = Date.now();
    await victim.kill();
    while (true) {
      const [j] = await db`SELECT min(started_on) AS t FROM pgboss.job
        WHERE name = 'sunlag-chunks' AND retry_count > 0 AND state IN ('active', 'completed')`;
      if (j.t) {
        recoveredMs = new Date(j.t).getTime() - killedAt;
        break;
      }
      await new Promise((r) => setTimeout(r, 100));
      if (Date.now() - killedAt > 120_000) break;
    }
    // and until the run that lost a chunk ends, with the digest an undisturbed run gives
    while (Date.now() - killedAt < 300_000) {
      const run = await (await fetch(`${api}/v1/runs/${id}`)).json();
      if (TERMINAL.has(run.status)) {
        killToDoneMs = Date.now() - killedAt;
        afterKill = run.status;
        const ref = await runOn(api, { ...lagBody, seed: 2 });
        afterKill += run.result_digest === ref.digest
          ? ", digest as undisturbed"
          : ", digest differs";
        break;
      }
      await new Promise((r) => setTimeout(r, 100));
    }
    jobStates = await db`SELECT state, retry_count, count(*)::int AS n FROM pgboss.job
      WHERE name = 'sunlag-chunks' GROUP BY state, retry_count ORDER BY state, retry_count`;
    await db.end();
  }

  const load = Deno.loadavg();
  const summary = {
    workload: workload === "field"
      ? `solar-signal-maps on the demo field, lags 0–24, ${surrogates} surrogates`
      : `lag-correlations, ${surrogates} phase surrogates, 16 chunks`,
    repeats,
    load_average: load,
    median_seconds: Object.fromEntries(
      Object.entries(times).map(([k, v]) => [k, Math.round(median(v)) / 1000]),
    ),
    speed_up_2_vs_1_workers: Math.round(median(times.workers_1) / median(times.workers_2) * 100) /
      100,
    queue_overhead_ms_per_chunk: Math.round(median(overhead) * 10) / 10,
    kill_to_chunk_elsewhere_seconds: Math.round(recoveredMs / 100) / 10,
    kill_to_run_done_seconds: Math.round(killToDoneMs / 100) / 10,
    run_after_kill: afterKill,
    chunk_jobs_by_state: jobStates.map((j) => `${j.state} (retry ${j.retry_count}): ${j.n}`),
    identical_digests: digests.size === 1,
  };
  console.log(JSON.stringify(summary, null, 2));
} finally {
  await cluster.close();
}
