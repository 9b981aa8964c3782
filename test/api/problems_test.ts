import assert from "node:assert/strict";
import { z } from "@hono/zod-openapi";
import { assertProblem, makeTestApp } from "./helpers.ts";
import { createService } from "../../api/app.ts";
import { testConfig } from "../../api/config.ts";
import { openStoreFromSpec } from "../../api/store/mod.ts";
import { InThreadExecutor } from "../../api/runs/service.ts";
import type { RunKind } from "../../api/runs/kind.ts";

const goodSeries = {
  name: "probe",
  quantity: "tsi",
  units: "W m-2",
  time: ["2001-01", "2001-02", "2001-03"],
  value: [1361.1, 1361.2, 1361.0],
};

Deno.test("problems: malformed JSON is a 400 problem", async () => {
  const svc = await makeTestApp();
  const res = await svc.app.request("/v1/series", {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: '{"name": "x",',
  });
  const body = await assertProblem(res, 400);
  assert.match(body.type, /malformed-json$/);
  assert.equal(body.title, "Malformed JSON");
  assert.match(body.detail, /not valid JSON/);
  assert.equal(body.request_id, res.headers.get("x-request-id"));
  await svc.close();
});

Deno.test("problems: a schema violation is a 422 naming each field by JSON Pointer", async () => {
  const svc = await makeTestApp();
  const res = await svc.post("/v1/series", { ...goodSeries, quantity: "banana", time: "x" });
  const body = await assertProblem(res, 422);
  assert.match(body.type, /validation$/);
  assert.equal(body.title, "Invalid input");
  const pointers = body.errors.map((e: { pointer: string }) => e.pointer).sort();
  assert.deepEqual(pointers, ["/quantity", "/time"]);
  for (const e of body.errors) assert.equal(typeof e.message, "string");
  assert.equal((await (await svc.get("/v1/series")).json()).total, 0);
  await svc.close();
});

Deno.test("problems: unknown route is 404, wrong method is 405 with Allow", async () => {
  const svc = await makeTestApp();
  const nf = await assertProblem(await svc.get("/v1/nowhere"), 404);
  assert.match(nf.type, /not-found$/);
  assert.match(nf.detail, /\/v1\/nowhere/);
  const res = await svc.app.request("/v1/health", { method: "DELETE" });
  const body = await assertProblem(res, 405);
  assert.match(body.type, /method-not-allowed$/);
  assert.match(res.headers.get("allow") ?? "", /GET/);
  await svc.close();
});

Deno.test("problems: unsupported media type is 415", async () => {
  const svc = await makeTestApp();
  const res = await svc.app.request("/v1/series", {
    method: "POST",
    headers: { "content-type": "application/xml" },
    body: "<series/>",
  });
  const body = await assertProblem(res, 415);
  assert.match(body.detail, /application\/xml/);
  await svc.close();
});

Deno.test("problems: a body over the configured limit is 413", async () => {
  const svc = await makeTestApp({ config: { bodyLimitBytes: 1000 } });
  const big = { ...goodSeries, description: "x".repeat(5000) };
  const body = await assertProblem(await svc.post("/v1/series", big), 413);
  assert.match(body.type, /payload-too-large$/);
  assert.match(body.detail, /1000 bytes/);
  await svc.close();
});

Deno.test("problems: an unexpected failure is a 500 with request id and no stack", async () => {
  const boom: RunKind = {
    kind: "boom",
    path: "/v1/test-boom",
    algorithmVersion: "1",
    tag: "Test",
    summary: "fails",
    description: "fails",
    request: z.object({ n: z.number().default(1) }),
    result: z.object({}),
    compute() {
      throw new Error("secret internal detail at /some/file.ts:12");
    },
  };
  const store = await openStoreFromSpec("sqlite::memory:");
  const { app } = createService({
    store,
    config: testConfig(),
    executor: new InThreadExecutor(),
    kinds: [boom],
  });
  const origError = console.error;
  console.error = () => {};
  try {
    const res = await app.request("/v1/test-boom", {
      method: "POST",
      headers: { "content-type": "application/json", "x-request-id": "req-abc" },
      body: "{}",
    });
    const body = await assertProblem(res, 500);
    assert.equal(body.request_id, "req-abc");
    assert.equal(res.headers.get("x-request-id"), "req-abc");
    const text = JSON.stringify(body);
    assert.ok(!text.includes("secret"), "no internal detail leaks");
    assert.ok(!text.includes(".ts:"), "no stack trace");
    assert.equal((await store.listRuns({ limit: 10, offset: 0 })).total, 0, "nothing stored");
  } finally {
    console.error = origError;
    await store.close();
  }
});

Deno.test("every response carries X-Request-Id", async () => {
  const svc = await makeTestApp();
  for (const path of ["/v1/health", "/v1/version", "/v1/series", "/v1/runs", "/v1/nope"]) {
    const res = await svc.get(path);
    await res.body?.cancel();
    assert.ok(res.headers.get("x-request-id"), path);
  }
  await svc.close();
});

Deno.test("problems: a misspelt analysis option is a 422 naming it, not a silent default", async () => {
  const svc = await makeTestApp();
  const spots = {
    name: "spots",
    quantity: "sunspot_number",
    units: "1",
    version: "2",
    time: Array.from(
      { length: 48 },
      (_, i) => `${2000 + Math.floor(i / 12)}-${String(i % 12 + 1).padStart(2, "0")}`,
    ),
    value: Array.from({ length: 48 }, (_, i) => 50 + 40 * Math.sin(i / 8)),
  };
  const res = await svc.post("/v1/spectra", { series: spots, periods: { minimum: 2 }, gird: 1 });
  const body = await assertProblem(res, 422);
  const pointers = body.errors.map((e: { pointer: string }) => e.pointer).sort();
  assert.deepEqual(pointers, ["/gird", "/periods/minimum"]);
  const nested = body.errors.find((e: { pointer: string }) => e.pointer === "/periods/minimum");
  assert.match(nested.message, /unknown field "minimum"/);
  assert.equal((await svc.store.listRuns({ limit: 5, offset: 0 })).total, 0);
  assert.equal((await svc.store.listSeries({ limit: 5, offset: 0 })).total, 0);
  await svc.close();
});
