/**
 * Several sunlag instances on one PostgreSQL database, as separate processes: uploads and runs
 * are visible from every instance; a run started on one is followed and cancelled on another;
 * `kill -9` of the worker holding a run mid-computation lets another worker finish it with the
 * digest a single process computes; a restarted instance never touches another's live run; and
 * no terminal state ever changes. Skipped with a warning when no PostgreSQL server binaries are
 * installed, a failure when CI=true.
 */
import assert from "node:assert/strict";
import postgres from "postgres";
import { type LocalCluster, startLocalCluster } from "./local_cluster.ts";
import { pgUnavailableReason, startPgServer } from "../api/store/pg_cluster.ts";
import { makeTestApp } from "../api/helpers.ts";
import { loadDemo } from "../../api/demo.ts";

const TSIM = "sha256:dcd8d0bcd0c66f73a1a079649dbcd55d3d0e247c1329eb803a87767023e8576d";
const TEMP = "sha256:dc57cafa9ebf93093645c18f5c57f2c59cb3dfc8505841586e88f241a195e480";
const TERMINAL = new Set(["succeeded", "failed", "cancelled"]);

const server = await startPgServer();
if (!server) {
  if (Deno.env.get("CI") === "true") {
    throw new Error(`multi-instance tests need PostgreSQL in CI: ${pgUnavailableReason}`);
  }
  console.warn(`multi-instance tests skipped: ${pgUnavailableReason}`);
}

async function json(url: string, init?: RequestInit) {
  const res = await fetch(url, init);
  const body = await res.json();
  return { status: res.status, body };
}

function post(url: string, body: unknown, headers: Record<string, string> = {}) {
  return json(url, {
    method: "POST",
    headers: { "content-type": "application/json", ...headers },
    body: JSON.stringify(body),
  });
}

/** Poll a run until `done(run)` (or time out), recording every status seen. */
async function waitRun(
  base: string,
  id: string,
  done: (r: { status: string; progress: number }) => boolean,
  seen: Map<string, string[]>,
  timeoutMs = 90_000,
) {
  const t0 = Date.now();
  while (true) {
    const { body } = await json(`${base}/v1/runs/${id}`);
    const list = seen.get(id) ?? [];
    if (list.at(-1) !== body.status) list.push(body.status);
    seen.set(id, list);
    if (done(body)) return body;
    if (Date.now() - t0 > timeoutMs) throw new Error(`run ${id}: timed out at ${body.status}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** CPU seconds a process has used so far (Linux `/proc/<pid>/stat`, user + system). */
function processCpuSeconds(pid: number): number {
  try {
    const stat = Deno.readTextFileSync(`/proc/${pid}/stat`);
    const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    // utime and stime are fields 14 and 15 of the file (12 and 13 after the name), in ticks
    return (Number(fields[11]) + Number(fields[12])) / 100;
  } catch {
    return 0; // gone
  }
}

/** Cores the processes use together over the next `ms` milliseconds. */
async function coresUsed(pids: number[], ms: number): Promise<number> {
  const c0 = pids.reduce((s, p) => s + processCpuSeconds(p), 0), t0 = performance.now();
  await new Promise((r) => setTimeout(r, ms));
  const c1 = pids.reduce((s, p) => s + processCpuSeconds(p), 0);
  return (c1 - c0) / ((performance.now() - t0) / 1000);
}

/** Once terminal, a run's status never changes again. */
function assertTerminalStable(seen: Map<string, string[]>) {
  for (const [id, list] of seen) {
    const first = list.findIndex((s) => TERMINAL.has(s));
    if (first >= 0) assert.equal(list.length, first + 1, `run ${id} went ${list.join(" → ")}`);
  }
}

/** The digest a single process computes for the same request. */
async function singleProcessDigest(body: Record<string, unknown>): Promise<string> {
  const svc = await makeTestApp();
  await loadDemo(svc.store);
  const res = await svc.post("/v1/lag-correlations", body);
  let run = await res.json();
  await svc.runs.settle();
  run = await (await svc.get(`/v1/runs/${run.id}`)).json();
  await svc.close();
  return run.result_digest;
}

Deno.test({
  name: "several instances on one database: visible everywhere, followed, cancelled, recovered",
  ignore: !server,
  sanitizeOps: false,
  sanitizeResources: false,
  async fn(t) {
    const cluster = (await startLocalCluster({ apis: 2, workers: 2 })) as LocalCluster;
    const [a, b] = cluster.apis.map((i) => i.url!);
    const seen = new Map<string, string[]>();
    const db = postgres(cluster.storeUrl, { max: 1, onnotice: () => {} });
    try {
      await t.step("an upload on one instance is visible on the other", async () => {
        const up = await post(`${a}/v1/series`, {
          name: "Cluster check",
          quantity: "temperature_anomaly",
          units: "K",
          time: ["2001-01", "2001-02", "2001-03"],
          value: [0.1, 0.2, 0.3],
        });
        assert.ok(up.status === 201 || up.status === 200, JSON.stringify(up.body));
        const there = await json(`${b}/v1/series/${up.body.series.id}`);
        assert.equal(there.status, 200);
        assert.deepEqual(there.body.value, [0.1, 0.2, 0.3]);
        const health = await json(`${b}/v1/health`);
        assert.equal(health.body.queue.engine, "pg-boss");
        assert.equal(health.body.queue.workers_seen, 2);
      });

      await t.step("a run started on A is followed on B (SSE) and cancelled from B", async () => {
        const start = await post(`${a}/v1/lag-correlations`, {
          solar: TSIM,
          climate: TEMP,
          surrogates: 100_000,
          seed: 11,
        }, { prefer: "respond-async" });
        assert.equal(start.status, 202);
        const id = start.body.id;
        const ctrl = new AbortController();
        const events = await fetch(`${b}/v1/runs/${id}/events`, { signal: ctrl.signal });
        const reader = events.body!.getReader();
        const decoder = new TextDecoder();
        let text = "";
        while (!/event: progress/.test(text)) {
          const { value, done } = await reader.read();
          if (done) break;
          text += decoder.decode(value, { stream: true });
        }
        assert.match(text, /event: progress/, "progress from the worker reaches instance B");
        const cancel = await post(`${b}/v1/runs/${id}/cancel`, {});
        assert.equal(cancel.status, 200);
        assert.equal(cancel.body.status, "cancelled");
        while (!/"status":"cancelled"/.test(text)) {
          const { value, done } = await reader.read();
          if (done) break;
          text += decoder.decode(value, { stream: true });
        }
        ctrl.abort();
        assert.match(text, /"status":"cancelled"/);
        // The worker stops and never overwrites the cancelled state.
        await new Promise((r) => setTimeout(r, 3000));
        const after = await waitRun(a, id, () => true, seen);
        assert.equal(after.status, "cancelled");
        assert.equal(after.result, null);
        const [lease] = await db`SELECT lease_holder FROM runs WHERE id = ${id}`;
        assert.equal(lease.lease_holder, null);
      });

      await t.step("kill -9 of the worker holding a run: another worker finishes it", async () => {
        const body = { solar: TSIM, climate: TEMP, surrogates: 30_000, seed: 5 };
        const expected = await singleProcessDigest(body);
        const start = await post(`${a}/v1/lag-correlations`, body, { prefer: "respond-async" });
        const id = start.body.id;
        await waitRun(a, id, (r) => r.status === "running" && r.progress > 0, seen);
        const [row] = await db`SELECT lease_holder FROM runs WHERE id = ${id}`;
        const pid = Number(String(row.lease_holder).split(":")[1]);
        const holder = cluster.workers.find((w) => w.pid === pid);
        assert.ok(holder, `a worker holds the run (${row.lease_holder})`);
        const killedAt = Date.now();
        await holder!.kill();
        // A restarted API instance must not touch the run another worker will take over.
        await cluster.apis[1].stop();
        const b2 = (await cluster.start("api")).url!;
        const mid = await json(`${b2}/v1/runs/${id}`);
        assert.notEqual(mid.body.status, "failed", "the restart's sweep left the run alone");
        await cluster.start("worker");
        const done = await waitRun(a, id, (r) => TERMINAL.has(r.status), seen);
        assert.equal(done.status, "succeeded", JSON.stringify(done.error));
        assert.equal(done.result_digest, expected, "same digest as one process");
        console.log(`recovered ${((Date.now() - killedAt) / 1000).toFixed(1)} s after kill -9`);
        const [after] = await db`SELECT lease_holder FROM runs WHERE id = ${id}`;
        assert.equal(after.lease_holder, null);
      });

      await t.step(
        "a run of 40 chunks spread over two worker processes: in-process digest",
        async () => {
          const SSN = "sha256:adebf4dd9a329b7382165cf603d02c96fa9a2c91a7ba58eb7b8e967337f2ff2b";
          const body = {
            series: SSN,
            false_alarm: "monte_carlo",
            replicates: 1000,
            seed: 9,
            periods: { min: 5, max: 20, count: 200 },
          };
          // computed synchronously here (estimated at a few seconds, it would be queued)
          const local = await makeTestApp({ config: { asyncSeconds: 1e6 } });
          await loadDemo(local.store);
          const here = await (await local.post("/v1/spectra", body)).json();
          await local.close();
          const start = await post(`${a}/v1/spectra`, body, { prefer: "respond-async" });
          assert.equal(start.status, 202);
          const done = await waitRun(a, start.body.id, (r) => TERMINAL.has(r.status), seen);
          assert.equal(done.status, "succeeded", JSON.stringify(done.error));
          assert.equal(done.result_digest, here.result_digest);
          const [n] = await db`SELECT count(*) AS n FROM sunlag_chunks`;
          assert.equal(Number(n.n), 0, "chunk rows are removed once the run has its outputs");
        },
      );

      await t.step(
        "a solar-signal map's surrogate chunks over two worker processes: in-process digest",
        async () => {
          const FIELD =
            "field:sha256:9e638701b97f5a020c0525c24628808eb8c395b5e326730a4bd06c7f2e710b35";
          const body = { field: FIELD, solar: TSIM, max_lag: 6, surrogates: 300, seed: 4 };
          const local = await makeTestApp();
          await loadDemo(local.store);
          const res = await local.post("/v1/solar-signal-maps", body);
          let here = await res.json();
          await local.runs.settle();
          here = await (await local.get(`/v1/runs/${here.id}`)).json();
          await local.close();
          const start = await post(`${a}/v1/solar-signal-maps`, body, { prefer: "respond-async" });
          assert.equal(start.status, 202, JSON.stringify(start.body));
          const done = await waitRun(a, start.body.id, (r) => TERMINAL.has(r.status), seen);
          assert.equal(done.status, "succeeded", JSON.stringify(done.error));
          assert.equal(done.result_digest, here.result_digest);
          assert.deepEqual(done.input_fields, [FIELD]);
        },
      );

      await t.step(
        "a cancel reaches the chunks on every worker process: their CPU goes idle within a second",
        async () => {
          const FIELD =
            "field:sha256:9e638701b97f5a020c0525c24628808eb8c395b5e326730a4bd06c7f2e710b35";
          // chunks of 250 surrogates over 121 lags: a few seconds each
          const body = { field: FIELD, solar: TSIM, max_lag: 120, surrogates: 100_000, seed: 2 };
          const start = await post(`${a}/v1/solar-signal-maps`, body, { prefer: "respond-async" });
          assert.equal(start.status, 202, JSON.stringify(start.body));
          const id = start.body.id;
          const pids = cluster.workers.map((w) => w.pid)
            .filter((pid) => processCpuSeconds(pid) > 0);
          // chunks handed out, and both worker processes computing
          const t0 = Date.now();
          let busy = 0;
          while (Date.now() - t0 < 60_000) {
            const [c] = await db`SELECT count(*) AS n FROM sunlag_chunks WHERE run_id = ${id}`;
            if (Number(c.n) > 0) {
              busy = await coresUsed(pids, 500);
              if (busy > 0.3) break;
            } else await new Promise((r) => setTimeout(r, 50));
          }
          assert.ok(busy > 0.3, `the workers were computing chunks (${busy.toFixed(2)} cores)`);
          // from the other API instance (B was restarted above: the latest one)
          const other = cluster.apis.at(-1)!.url!;
          const cancel = await post(`${other}/v1/runs/${id}/cancel`, {});
          assert.equal(cancel.status, 200);
          const tc = performance.now();
          let idleAfter = Infinity;
          while (performance.now() - tc < 5000) {
            const at = performance.now() - tc;
            if (await coresUsed(pids, 300) < 0.1) {
              idleAfter = at;
              break;
            }
          }
          console.log(
            `${pids.length} worker processes at ${busy.toFixed(2)} cores; idle ` +
              `${idleAfter.toFixed(0)} ms after the cancel`,
          );
          assert.ok(idleAfter <= 1000, `idle ${idleAfter.toFixed(0)} ms after the cancel`);
          const after = await waitRun(a, id, (r) => TERMINAL.has(r.status), seen);
          assert.equal(after.status, "cancelled");
        },
      );

      await t.step("no terminal state ever changed", async () => {
        await new Promise((r) => setTimeout(r, 1000));
        for (const id of [...seen.keys()]) await waitRun(a, id, () => true, seen);
        assertTerminalStable(seen);
      });
    } finally {
      await db.end();
      await cluster.close();
    }
  },
});
