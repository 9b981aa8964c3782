import assert from "node:assert/strict";
import { Validator } from "@seriousme/openapi-schema-validator";
import { makeTestApp } from "./helpers.ts";
import { renderOpenApi } from "../../api/openapi_write.ts";
import { RUN_KINDS } from "../../api/analyses/registry.ts";

Deno.test("GET /v1/health reports the store as reachable", async () => {
  const svc = await makeTestApp();
  const res = await svc.get("/v1/health");
  assert.equal(res.status, 200);
  assert.deepEqual(await res.json(), {
    status: "ok",
    store: { kind: "sqlite", reachable: true },
    queue: { engine: "in-process", depth: 0, active: 0, oldest_seconds: null, workers_seen: 1 },
  });
  await svc.close();
});

Deno.test("GET /v1/version lists service, Deno, store and per-kind algorithm versions", async () => {
  const svc = await makeTestApp();
  const body = await (await svc.get("/v1/version")).json();
  assert.equal(body.deno, Deno.version.deno);
  assert.equal(body.store, "sqlite");
  assert.equal(typeof body.service, "string");
  for (const k of svc.runs.kinds) assert.equal(body.algorithms[k.kind], k.algorithmVersion);
  await svc.close();
});

Deno.test("openapi: the committed openapi/openapi.json equals the generated document", async () => {
  const committed = await Deno.readTextFile(new URL("../../openapi/openapi.json", import.meta.url));
  const generated = await renderOpenApi();
  assert.equal(
    committed,
    generated,
    "openapi/openapi.json drifted from the zod schemas: run `deno task openapi`",
  );
});

Deno.test("openapi: the served document is valid OpenAPI 3.1", async () => {
  const svc = await makeTestApp();
  const doc = await (await svc.get("/v1/openapi.json")).json();
  assert.equal(doc.openapi, "3.1.0");
  const validator = new Validator();
  const result = await validator.validate(doc);
  assert.ok(result.valid, JSON.stringify(result.errors, null, 2));
  assert.equal(validator.version, "3.1");
  await svc.close();
});

Deno.test("GET /v1/docs serves the API reference with no outside requests", async () => {
  const svc = await makeTestApp();
  const html = await (await svc.get("/v1/docs")).text();
  assert.match(html, /swagger-ui-bundle\.js/);
  const urls = [...html.matchAll(/(?:src|href)="([^"]+)"/g)].map((m) => m[1]);
  for (const u of urls) assert.ok(u.startsWith("/v1/"), `asset ${u} served by the service`);
  assert.ok(!/https?:\/\//.test(html.replace(/<!doctype html>/i, "")), "no absolute URLs");
  const js = await svc.get("/v1/docs/swagger-ui-bundle.js");
  assert.equal(js.status, 200);
  assert.ok((await js.text()).length > 100_000);
  const css = await svc.get("/v1/docs/swagger-ui.css");
  assert.equal(css.status, 200);
  await css.body?.cancel();
  await svc.close();
});

Deno.test("GET /v1/analyses lists every registered analysis once, with schemas in the OpenAPI document", async () => {
  const svc = await makeTestApp();
  const res = await svc.get("/v1/analyses");
  assert.equal(res.status, 200);
  const { items } = await res.json();
  const doc = await (await svc.get("/v1/openapi.json")).json();
  assert.deepEqual(
    items.map((i: { kind: string }) => i.kind).sort(),
    RUN_KINDS.map((k) => k.kind).sort(),
  );
  for (const i of items) {
    assert.ok(doc.components.schemas[i.request_schema], `${i.kind}: ${i.request_schema}`);
    assert.ok(doc.components.schemas[i.run_schema], `${i.kind}: ${i.run_schema}`);
    assert.ok(doc.paths[i.path].post, i.path);
  }
  // Featured analyses come first.
  const flags = items.map((i: { featured: boolean }) => i.featured);
  assert.deepEqual(flags, [...flags].sort((a: boolean, b: boolean) => Number(b) - Number(a)));
  // ... and the three main questions are featured, so the page's "Main analyses" has them
  assert.deepEqual(
    items.filter((i: { featured: boolean }) => i.featured).map((i: { kind: string }) => i.kind)
      .sort(),
    ["cycles", "irradiance-reconstructions", "lag-correlations"],
  );
  await svc.close();
});

Deno.test("GET /metrics: Prometheus text with requests, runs by status and the queue", async () => {
  const svc = await makeTestApp();
  await svc.get("/v1/health");
  const res = await svc.get("/metrics");
  assert.equal(res.status, 200);
  assert.match(res.headers.get("content-type") ?? "", /^text\/plain; version=0\.0\.4/);
  const text = await res.text();
  assert.match(text, /^sunlag_http_requests_total\{method="GET",status="200"\} [1-9]/m);
  assert.match(text, /^sunlag_runs\{status="succeeded"\} 0$/m);
  assert.match(text, /^sunlag_queue_depth\{engine="in-process"\} 0$/m);
  assert.match(text, /^sunlag_http_request_duration_seconds_bucket\{le="0\.001",method="GET"\}/m);
  await svc.close();
});
