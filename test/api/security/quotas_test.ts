/**
 * Quotas and limits: request rate (token bucket), runs computing at once, runs waiting,
 * compute seconds per hour, bytes held, and the wall-time limit of one run. Over a quota is a
 * 429 RFC 9457 problem with `Retry-After`; admins (and so the single-user tool) are never
 * limited. No assertion here depends on timing beyond "a run that spins longer than the limit".
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp } from "../helpers.ts";
import { RUN_KINDS } from "../../../api/analyses/registry.ts";
import { meanKind } from "../test_kinds.ts";
import { testConfig } from "../../../api/config.ts";
import { sharedInstance, smallSeries, upload } from "./shared_instance.ts";

const KINDS = [...RUN_KINDS, meanKind];
const quotas = (q: Partial<ReturnType<typeof testConfig>["quotas"]>) => ({
  ...testConfig().quotas,
  ...q,
});

async function assertQuota(res: Response, pattern: RegExp) {
  const body = await assertProblem(res, 429);
  const retry = Number(res.headers.get("retry-after"));
  assert.ok(Number.isInteger(retry) && retry >= 1, `Retry-After: ${retry}`);
  assert.match(body.detail, pattern);
  return body;
}

Deno.test("quotas: the request rate of an owner is a token bucket; 429 with Retry-After", async () => {
  const svc = await sharedInstance({
    config: { quotas: quotas({ ratePerSecond: 0.5, rateBurst: 3 }) },
  });
  try {
    const analyst_a = await svc.owner("analyst_a");
    for (let i = 0; i < 3; i++) assert.equal((await analyst_a.get("/v1/series")).status, 200);
    const refused = await analyst_a.get("/v1/series");
    await assertQuota(refused, /SUNLAG_RATE_PER_SECOND/);
    assert.equal(refused.headers.get("retry-after"), "2", "one token per 2 s");
    // Another owner has its own bucket; anonymous callers share one per address.
    const analyst_b = await svc.owner("analyst_b");
    assert.equal((await analyst_b.get("/v1/series")).status, 200);
    for (let i = 0; i < 3; i++) await svc.anonymous.get("/v1/health");
    await assertQuota(await svc.anonymous.get("/v1/health"), /Too many requests/);
    // Admins are not limited.
    for (let i = 0; i < 20; i++) assert.equal((await svc.admin.get("/v1/series")).status, 200);
  } finally {
    await svc.close();
  }
});

Deno.test("quotas: the single-user tool (no keys, local admin) is never limited", async () => {
  const svc = await makeTestApp({
    config: { quotas: quotas({ ratePerSecond: 0.001, rateBurst: 1, storedBytes: 0 }) },
  });
  try {
    for (let i = 0; i < 10; i++) assert.equal((await svc.get("/v1/series")).status, 200);
    assert.equal((await svc.post("/v1/series", smallSeries("local"))).status, 201);
  } finally {
    await svc.close();
  }
});

Deno.test("quotas: runs computing at once and runs waiting", async () => {
  const svc = await sharedInstance({
    kinds: KINDS,
    config: { quotas: quotas({ concurrentRuns: 1, queuedRuns: 1 }) },
  });
  try {
    const analyst_a = await svc.owner("analyst_a");
    const sid = await upload(analyst_a, smallSeries("q"));
    const slow = { series: sid, replicates: 50, spin_ms: 1500 };
    // Two synchronous runs at once: the second is refused while the first computes.
    const [a, b] = await Promise.all([
      analyst_a.post("/v1/test-mean", { ...slow, spin_ms: 600 }),
      analyst_a.post("/v1/test-mean", { ...slow, spin_ms: 600 }),
    ]);
    const statuses = [a.status, b.status].sort();
    assert.deepEqual(statuses, [201, 429]);
    await assertQuota(a.status === 429 ? a : b, /SUNLAG_QUOTA_CONCURRENT_RUNS/);
    await (a.status === 201 ? a : b).body?.cancel();
    // Asynchronous runs: one computes, one waits, the third is refused.
    const async = { Prefer: "respond-async" };
    const r1 = await analyst_a.post("/v1/test-mean", slow, async);
    const r2 = await analyst_a.post("/v1/test-mean", slow, async);
    assert.equal(r1.status, 202);
    assert.equal(r2.status, 202);
    assert.deepEqual(svc.quotas.counts("analyst_a"), { running: 1, queued: 1 });
    await assertQuota(
      await analyst_a.post("/v1/test-mean", slow, async),
      /SUNLAG_QUOTA_QUEUED_RUNS/,
    );
    // Cancelling the waiting one frees its place without computing it.
    const id2 = (await r2.json()).id;
    assert.equal((await analyst_a.post(`/v1/runs/${id2}/cancel`)).status, 200);
    await svc.runs.settle();
    assert.deepEqual(svc.quotas.counts("analyst_a"), { running: 0, queued: 0 });
    assert.equal(
      (await (await analyst_a.get(`/v1/runs/${(await r1.json()).id}`)).json()).status,
      "succeeded",
    );
    const usage = await (await svc.admin.get("/v1/admin/owners/analyst_a/usage")).json();
    assert.ok(usage.compute_seconds_last_hour > 0);
    assert.ok(usage.stored_bytes > 0);
  } finally {
    await svc.close();
  }
});

Deno.test("quotas: compute seconds per hour", async () => {
  const svc = await sharedInstance({
    kinds: KINDS,
    config: { quotas: quotas({ computeSecondsPerHour: 0.05 }) },
  });
  try {
    const analyst_a = await svc.owner("analyst_a");
    const sid = await upload(analyst_a, smallSeries("c"));
    assert.equal(
      (await analyst_a.post("/v1/test-mean", { series: sid, spin_ms: 200 })).status,
      201,
    );
    const body = await assertQuota(
      await analyst_a.post("/v1/test-mean", { series: sid }),
      /SUNLAG_QUOTA_COMPUTE_SECONDS/,
    );
    assert.ok(body.retry_after_seconds > 3000, "the hour must pass");
    // Another owner's budget is its own.
    const analyst_b = await svc.owner("analyst_b");
    assert.equal(
      (await analyst_b.post("/v1/test-mean", { series: await upload(analyst_b, smallSeries("b")) }))
        .status,
      201,
    );
  } finally {
    await svc.close();
  }
});

Deno.test("quotas: bytes held", async () => {
  const svc = await sharedInstance({
    kinds: KINDS,
    config: { quotas: quotas({ storedBytes: 2000 }) },
  });
  try {
    const analyst_a = await svc.owner("analyst_a");
    await upload(analyst_a, smallSeries("fits", 48)); // 48 points x 24 bytes = 1152
    await assertQuota(
      await analyst_a.post("/v1/series", smallSeries("too-much", 48)),
      /SUNLAG_QUOTA_STORED_MB/,
    );
    assert.equal((await (await analyst_a.get("/v1/series")).json()).total, 1, "nothing stored");
  } finally {
    await svc.close();
  }
});

Deno.test("limits: a run past the wall-time limit fails with its reason (async and sync)", async () => {
  const svc = await sharedInstance({ kinds: KINDS, config: { runWallSeconds: 0.3 } });
  try {
    const analyst_a = await svc.owner("analyst_a");
    const sid = await upload(analyst_a, smallSeries("w"));
    const res = await analyst_a.post("/v1/test-mean", {
      series: sid,
      replicates: 200,
      spin_ms: 3000,
    });
    assert.equal(res.status, 202);
    const id = (await res.json()).id;
    await svc.runs.settle();
    const run = await (await analyst_a.get(`/v1/runs/${id}`)).json();
    assert.equal(run.status, "failed");
    assert.equal(run.error.type, "https://sunlag.invalid/problems/time-limit");
    assert.match(run.error.detail, /wall-time limit of 0.3 s/);
    const sync = await analyst_a.post("/v1/test-mean", {
      series: sid,
      replicates: 200,
      // short enough to stay synchronous (estimate 0.8 s × the measured machine-speed factor,
      // which exceeds 1 on a loaded machine), long enough to pass the 0.3 s limit
      spin_ms: 800,
    });
    const problem = await assertProblem(sync, 422);
    assert.match(problem.type, /time-limit/);
    assert.equal(
      (await (await analyst_a.get("/v1/runs")).json()).total,
      1,
      "the sync run was not stored",
    );
  } finally {
    await svc.close();
  }
});
