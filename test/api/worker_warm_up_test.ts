/**
 * Worker warm-up at start: every worker runs the small warm-up runs without error, and a run
 * computed by a warmed pool has the digest the same run has computed in this thread (the
 * warm-up leaves nothing behind that changes a result).
 */
import assert from "node:assert/strict";
import type { WorkerPool } from "../../api/workers/pool.ts";
import { warmUp } from "../../api/workers/warm_up.ts";
import { RUN_KINDS } from "../../api/analyses/registry.ts";
import { taskTable } from "../../api/analyses/derive.ts";
import { makeTestApp } from "./helpers.ts";
import * as DEMO from "./demo_ids.ts";

Deno.test("warmUp() runs the lag-correlation and cycles warm-ups without error", async () => {
  const out = await warmUp(RUN_KINDS, taskTable(RUN_KINDS));
  assert.deepEqual(out.errors, {});
  assert.deepEqual(Object.keys(out.ms).sort(), ["cycles", "lag-correlations"]);
  // an app without those analyses warms nothing and does not fail
  assert.deepEqual(await warmUp([], {}), { ms: {}, errors: {} });
});

Deno.test("WorkerPool.warmUp() warms every worker; a warmed pool gives the in-thread digest", async () => {
  const body = { solar: DEMO.SSN, climate: DEMO.TEMP, max_lag: 12, surrogates: 200, seed: 5 };
  const local = await makeTestApp();
  const pooled = await makeTestApp({ workers: 2 });
  try {
    const { loadDemo } = await import("../../api/demo.ts");
    await loadDemo(local.store);
    await loadDemo(pooled.store);
    const pool = pooled.runs.executor as WorkerPool;
    const timings = await pool.warmUp() as { ms: Record<string, number>; errors: object }[];
    assert.equal(timings.length, 2);
    for (const t of timings) {
      assert.deepEqual(t.errors, {});
      assert.ok(t.ms["lag-correlations"] >= 0 && t.ms["cycles"] >= 0);
    }
    const a = await (await local.post("/v1/lag-correlations", body)).json();
    const b = await (await pooled.post("/v1/lag-correlations", body)).json();
    assert.ok(a.result_digest);
    assert.equal(b.result_digest, a.result_digest);
  } finally {
    await local.close();
    await pooled.close();
  }
});
