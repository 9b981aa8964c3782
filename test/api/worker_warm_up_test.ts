/**
 * Worker warm-up at start: every worker runs the small warm-up runs without error, and a run
 * computed by a warmed pool has the digest the same run has computed in this thread (the
 * warm-up leaves nothing behind that changes a result). A worker of the service's registry
 * loads each analysis on first use, from its own folder: every analysis is found there, and a
 * fresh pool (no warm-up: its chunks reach a worker that has loaded nothing) gives the
 * in-thread digest too.
 */
import assert from "node:assert/strict";
import type { WorkerPool } from "../../api/workers/pool.ts";
import { warmUp } from "../../api/workers/warm_up.ts";
import { RUN_KINDS } from "../../api/analyses/registry.ts";
import { taskTable } from "../../api/analyses/derive.ts";
import { makeTestApp, type TestService } from "./helpers.ts";
import * as DEMO from "./demo_ids.ts";

Deno.test("warmUp() runs the lag-correlation and cycles warm-ups without error", async () => {
  const out = await warmUp(RUN_KINDS, taskTable(RUN_KINDS));
  assert.deepEqual(out.errors, {});
  assert.deepEqual(Object.keys(out.ms).sort(), ["cycles", "lag-correlations"]);
  // an app without those analyses warms nothing and does not fail
  assert.deepEqual(await warmUp([], {}), { ms: {}, errors: {} });
});

/**
 * Post `body` to `path` on an in-thread app and on a 2-worker app, both with the demo data, and
 * assert the two digests are equal; `before` runs on the pooled app first.
 */
async function sameDigestOnPool(
  path: string,
  body: Record<string, unknown>,
  before: (pooled: TestService) => Promise<void> = () => Promise.resolve(),
): Promise<void> {
  const local = await makeTestApp();
  const pooled = await makeTestApp({ workers: 2 });
  try {
    const { loadDemo } = await import("../../api/demo.ts");
    await loadDemo(local.store);
    await loadDemo(pooled.store);
    await before(pooled);
    const a = await (await local.post(path, body)).json();
    const b = await (await pooled.post(path, body)).json();
    assert.ok(a.result_digest);
    assert.equal(b.result_digest, a.result_digest);
  } finally {
    await local.close();
    await pooled.close();
  }
}

Deno.test("WorkerPool.warmUp() warms every worker; a warmed pool gives the in-thread digest", async () => {
  const body = { solar: DEMO.SSN, climate: DEMO.TEMP, max_lag: 12, surrogates: 200, seed: 5 };
  await sameDigestOnPool("/v1/lag-correlations", body, async (pooled) => {
    const pool = pooled.runs.executor as WorkerPool;
    const timings = await pool.warmUp() as {
      ms: Record<string, number>;
      errors: object;
      ready_ms: number;
      load_ms: number;
    }[];
    assert.equal(timings.length, 2);
    for (const t of timings) {
      assert.deepEqual(t.errors, {});
      assert.ok(t.ms["lag-correlations"] >= 0 && t.ms["cycles"] >= 0);
      assert.ok(t.ready_ms >= 0 && t.load_ms >= 0, JSON.stringify(t));
    }
  });
});

Deno.test("a worker finds every analysis of the registry in its own folder (api/analyses/<kind>/mod.ts)", async () => {
  for (const k of RUN_KINDS) {
    const mod = await import(`../../api/analyses/${k.kind.replaceAll("-", "_")}/mod.ts`);
    assert.ok(Object.values(mod).includes(k), `${k.kind}: not exported by its folder's mod.ts`);
  }
});

Deno.test("a fresh pool loads analyses on first use: a run whose chunks reach both workers gives the in-thread digest", async () => {
  await sameDigestOnPool("/v1/spectra", {
    series: DEMO.SSN,
    false_alarm: "both",
    replicates: 60,
    periods: { min: 2, max: 60, count: 900 },
    seed: 7,
  });
});
