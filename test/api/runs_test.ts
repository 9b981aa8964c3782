import assert from "node:assert/strict";
import { createService } from "../../api/app.ts";
import { testConfig } from "../../api/config.ts";
import { openStoreFromSpec } from "../../api/store/mod.ts";
import { InThreadExecutor } from "../../api/runs/service.ts";
import { canonicalJson, sha256Hex } from "../../api/canonical.ts";
import { assertProblem, monthlySeries } from "./helpers.ts";
import { meanKind } from "./test_kinds.ts";
import type { RunKind } from "../../api/runs/kind.ts";

async function service(kinds: RunKind[] = [meanKind], spec = "sqlite::memory:") {
  const store = await openStoreFromSpec(spec);
  const svc = createService({
    store,
    config: testConfig(),
    executor: new InThreadExecutor(),
    kinds,
  });
  const post = (path: string, body: unknown, headers: Record<string, string> = {}) =>
    svc.app.request(path, {
      method: "POST",
      headers: { "content-type": "application/json", ...headers },
      body: JSON.stringify(body),
    });
  return { ...svc, post, close: async () => (await svc.runs.settle(), await store.close()) };
}

const inline = monthlySeries("probe", "other", "m", 2000, 30, (i) => Math.sin(i) + 3);

Deno.test("runs: a synchronous run records defaults, inputs, versions, seed and digest", async () => {
  const svc = await service();
  const res = await svc.post("/v1/test-mean", { series: inline });
  const run = await res.json();
  assert.equal(res.status, 201, JSON.stringify(run));
  assert.match(run.id, /^[0-9a-f]{8}-[0-9a-f]{4}-7[0-9a-f]{3}-/, "UUIDv7");
  assert.equal(res.headers.get("location"), `/v1/runs/${run.id}`);
  assert.equal(run.status, "succeeded");
  assert.deepEqual(Object.keys(run.params).sort(), ["replicates", "seed", "series", "spin_ms"]);
  assert.equal(run.params.replicates, 50);
  assert.match(run.params.series, /^sha256:/, "inline series replaced by its id");
  assert.deepEqual(run.input_series, [run.params.series]);
  assert.equal(run.seed, 7);
  assert.equal(run.algorithm_version, "1.0.0");
  assert.equal(run.result_digest, sha256Hex(canonicalJson(run.result)));
  // The inline series was stored.
  assert.equal((await svc.app.request(`/v1/series/${run.params.series}`)).status, 200);
  const listed = await (await svc.app.request("/v1/runs?kind=test-mean")).json();
  assert.equal(listed.total, 1);
  await svc.close();
});

Deno.test("runs: an input problem is a 422 and stores nothing", async () => {
  const svc = await service();
  const tiny = monthlySeries("tiny", "other", "m", 2000, 2, (i) => i);
  const body = await assertProblem(await svc.post("/v1/test-mean", { series: tiny }), 422);
  assert.equal(body.errors[0].pointer, "/series");
  assert.equal((await svc.store.listSeries({ limit: 5, offset: 0 })).total, 0);
  assert.equal((await svc.store.listRuns({ limit: 5, offset: 0 })).total, 0);
  const missing = await assertProblem(
    await svc.post("/v1/test-mean", { series: `sha256:${"a".repeat(64)}` }),
    422,
  );
  assert.equal(missing.errors[0].pointer, "/series");
  await svc.close();
});

Deno.test("runs: replay recomputes and verifies; a changed algorithm version is said plainly", async () => {
  const svc = await service();
  const run = await (await svc.post("/v1/test-mean", { series: inline })).json();
  const rep = await (await svc.post(`/v1/runs/${run.id}/replay`, {})).json();
  assert.equal(rep.identical, true);
  assert.equal(rep.stored_digest, run.result_digest);
  assert.equal(rep.replay_digest, run.result_digest);
  assert.equal(rep.algorithm_version_changed, false);
  // The same store read by a service whose algorithm changed.
  const changed: RunKind = {
    ...meanKind,
    algorithmVersion: "2.0.0",
    compute: async (p, ctx) => ({ ...(await meanKind.compute(p, ctx)), mean: -1 }),
  };
  const svc2 = createService({
    store: svc.store,
    config: testConfig(),
    executor: new InThreadExecutor(),
    kinds: [changed],
  });
  const rep2 = await (await svc2.app.request(`/v1/runs/${run.id}/replay`, { method: "POST" }))
    .json();
  assert.equal(rep2.identical, false);
  assert.equal(rep2.algorithm_version_changed, true);
  assert.deepEqual(rep2.algorithm_version, { recorded: "1.0.0", current: "2.0.0" });
  assert.match(rep2.note, /changed/);
  await svc.close();
});

Deno.test("runs: Prefer respond-async gives 202, then SSE progress to succeeded", async () => {
  const svc = await service();
  const res = await svc.post("/v1/test-mean", { series: inline, replicates: 20, spin_ms: 300 }, {
    prefer: "respond-async",
  });
  assert.equal(res.status, 202);
  const run = await res.json();
  assert.equal(run.status, "queued");
  const sse = await svc.app.request(`/v1/runs/${run.id}/events`);
  assert.match(sse.headers.get("content-type") ?? "", /text\/event-stream/);
  const text = await sse.text();
  const events = [...text.matchAll(/event: (\w+)\ndata: (.*)\n/g)].map((m) => ({
    event: m[1],
    data: JSON.parse(m[2]),
  }));
  const progress = events.filter((e) => e.event === "progress").map((e) => e.data.progress);
  assert.ok(progress.length >= 2, `progress events: ${progress.length}`);
  for (let i = 1; i < progress.length; i++) assert.ok(progress[i] >= progress[i - 1]);
  assert.equal(events.at(-1)!.data.status, "succeeded");
  await svc.runs.settle();
  const done = await (await svc.app.request(`/v1/runs/${run.id}`)).json();
  assert.equal(done.status, "succeeded");
  assert.equal(done.progress, 1);
  await svc.close();
});

Deno.test("runs: long estimated work is asynchronous by default; cancel stops it", async () => {
  const svc = await service();
  // spin_ms 5000 → estimate 5 s > the 2 s threshold.
  const res = await svc.post("/v1/test-mean", { series: inline, replicates: 500, spin_ms: 5000 });
  assert.equal(res.status, 202);
  const run = await res.json();
  await new Promise((r) => setTimeout(r, 150));
  const c = await svc.post(`/v1/runs/${run.id}/cancel`, {});
  assert.equal(c.status, 200);
  assert.equal((await c.json()).status, "cancelled");
  await svc.runs.settle();
  const after = await (await svc.app.request(`/v1/runs/${run.id}`)).json();
  assert.equal(after.status, "cancelled");
  assert.equal(after.result, null);
  await assertProblem(await svc.post(`/v1/runs/${run.id}/cancel`, {}), 409);
  await svc.close();
});

Deno.test("runs: a restart marks interrupted runs failed with the reason", async () => {
  const dir = await Deno.makeTempDir();
  const spec = `sqlite:${dir}/s.db`;
  const svc = await service([meanKind], spec);
  const res = await svc.post("/v1/test-mean", { series: inline, replicates: 500, spin_ms: 5000 });
  const run = await res.json();
  // Simulate a crash: the store goes away while the run is in flight.
  const reopened = await openStoreFromSpec(spec);
  const n = await reopened.failOrphaned("The service stopped while this run was running", {
    all: true,
  });
  assert.equal(n, 1);
  const r = await reopened.getRun(run.id);
  assert.equal(r?.status, "failed");
  assert.match(String(r?.error?.detail), /stopped/);
  await reopened.close();
  const held = svc.runs.active.get(run.id);
  if (held) held.cancelled = true;
  await svc.close();
  await Deno.remove(dir, { recursive: true });
});

Deno.test("runs: outputs as JSON and CSV, saved as a series with lineage; delete refused while used", async () => {
  const svc = await service();
  const run = await (await svc.post("/v1/test-mean", { series: inline })).json();
  const json = await (await svc.app.request(`/v1/runs/${run.id}/outputs/doubled`)).json();
  assert.equal(json.value[0], 2 * inline.value[0]!);
  assert.equal(json.run_id, run.id);
  const csv = await (await svc.app.request(`/v1/runs/${run.id}/outputs/doubled?format=csv`)).text();
  assert.match(csv, new RegExp(`# run_id: ${run.id}`));
  assert.match(csv, /# result_digest: sha256:[0-9a-f]{64}/);
  assert.match(csv, /# caution: test kind/);
  assert.match(csv, /\ntime,decimal_year,value\n2000-01,/);
  const saved = await svc.post(`/v1/runs/${run.id}/outputs/doubled/series`, {});
  assert.equal(saved.status, 201);
  const sid = (await saved.json()).id;
  const meta = await (await svc.app.request(`/v1/series/${sid}`)).json();
  assert.equal(meta.derived_from, run.id);
  await assertProblem(await svc.app.request(`/v1/runs/${run.id}/outputs/nope`), 404);
  const del = await svc.app.request(`/v1/series/${run.params.series}`, { method: "DELETE" });
  const body = await assertProblem(del, 409);
  assert.deepEqual(body.runs, [run.id]);
  await svc.close();
});

Deno.test("bundles: round trip into a second instance verifies; tampering is detected", async () => {
  const a = await service();
  const run = await (await a.post("/v1/test-mean", { series: inline })).json();
  const bundle = await (await a.app.request(`/v1/runs/${run.id}/bundle`)).json();
  assert.equal(bundle.format, "sunlag-run-bundle");
  assert.equal(bundle.series.length, 1);
  const b = await service();
  const ok = await (await b.post("/v1/bundles", bundle)).json();
  assert.deepEqual(ok.differences, []);
  assert.equal(ok.verified, true);
  assert.equal(ok.stored, true);
  assert.equal(
    (await (await b.app.request(`/v1/runs/${run.id}`)).json()).result_digest,
    run.result_digest,
  );

  const c = await service();
  const edited = structuredClone(bundle);
  edited.series[0].value[3] += 0.001;
  const bad = await (await c.post("/v1/bundles", edited)).json();
  assert.equal(bad.verified, false);
  assert.equal(bad.stored, false);
  assert.ok(bad.differences.some((d: { message: string }) => /edited/.test(d.message)));
  assert.equal((await c.store.listRuns({ limit: 5, offset: 0 })).total, 0);
  assert.equal((await c.store.listSeries({ limit: 5, offset: 0 })).total, 0);

  const digest = structuredClone(bundle);
  digest.run.result_digest = "0".repeat(64);
  const bad2 = await (await c.post("/v1/bundles", digest)).json();
  assert.equal(bad2.verified, false);
  assert.ok(bad2.differences.some((d: { where: string }) => d.where === "/run/result_digest"));

  const result = structuredClone(bundle);
  result.run.result.mean += 1;
  const bad3 = await (await c.post("/v1/bundles", result)).json();
  assert.equal(bad3.verified, false);
  assert.equal((await c.store.listRuns({ limit: 5, offset: 0 })).total, 0);
  await a.close();
  await b.close();
  await c.close();
});

Deno.test("runs: outputs that are not on calendar time have no dates in CSV and cannot be saved", async () => {
  const offsets: RunKind = {
    ...meanKind,
    kind: "test-offsets",
    path: "/v1/test-offsets",
    compute: () => ({
      outputs: {
        composite: {
          name: "composite",
          quantity: "temperature_anomaly",
          units: "K",
          time: [-2, -1, 0, 1, 2],
          value: [0, 0.1, 0.3, 0.1, 0],
          time_axis: "years_from_epoch",
        },
      },
    }),
  };
  const svc = await service([offsets]);
  const run = await (await svc.post("/v1/test-offsets", { series: inline })).json();
  const csv = await (await svc.app.request(`/v1/runs/${run.id}/outputs/composite?format=csv`))
    .text();
  assert.match(csv, /# time: years from epoch \(not calendar time\)/);
  assert.match(csv, /\nyears_from_epoch,value\n-2,0\n/);
  const saved = await svc.post(`/v1/runs/${run.id}/outputs/composite/series`, {});
  const body = await assertProblem(saved, 409);
  assert.match(body.detail, /not calendar time/);
  await svc.close();
});

Deno.test("GET /v1/runs?kind= takes only the service's kinds (OpenAPI enum, 422 otherwise)", async () => {
  const svc = await service();
  try {
    // the kinds this app was built with (here the injected test kind)
    const doc = await (await svc.app.request("/v1/openapi.json")).json();
    const param = doc.paths["/v1/runs"].get.parameters.find((p: { name: string }) =>
      p.name === "kind"
    );
    assert.deepEqual(param.schema.enum, ["test-mean"]);
    const ok = await svc.app.request("/v1/runs?kind=test-mean");
    assert.equal(ok.status, 200);
    const body = await assertProblem(await svc.app.request("/v1/runs?kind=test-maen"), 422);
    assert.deepEqual(body.errors.map((e: { pointer: string; in: string }) => [e.pointer, e.in]), [[
      "/kind",
      "query",
    ]]);
    assert.match(body.errors[0].message, /unknown run kind "test-maen"; valid kinds: test-mean/);
  } finally {
    await svc.close();
  }
});

Deno.test("GET /v1/runs?kind= of the default service lists every registered kind", async () => {
  const { RUN_KINDS } = await import("../../api/analyses/registry.ts");
  const doc = JSON.parse(
    await Deno.readTextFile(new URL("../../openapi/openapi.json", import.meta.url)),
  );
  const param = doc.paths["/v1/runs"].get.parameters.find((p: { name: string }) =>
    p.name === "kind"
  );
  assert.deepEqual(param.schema.enum, RUN_KINDS.map((k) => k.kind).sort());
});
