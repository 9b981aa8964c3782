/**
 * The API reference's "Try it out": the request example of every analysis in the OpenAPI
 * document is a valid request against the demo data, executed here against a fresh demo
 * instance (201 or 202, and the run succeeds). The demo series ids are content hashes, the same
 * on every instance; a run id cannot be, so the one example that needs a run (a reconstruction
 * cites a calibrated model) holds the placeholder EXAMPLE_RUN_ID, which this test replaces with
 * the id of a run made from the models example (api/schemas/examples.ts). No example gives
 * both of two alternative fields, and none carries a schema bound (a min_lag of −10000) for a
 * value.
 *
 * @module
 */
import assert from "node:assert/strict";
import { makeTestApp } from "./helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { RUN_KINDS } from "../../api/analyses/registry.ts";
import { EXAMPLE_RUN_ID } from "../../api/schemas/examples.ts";

// deno-lint-ignore no-explicit-any
type Json = any;

/** Runs whose examples feed the placeholder of others: kind whose run stands in, by field. */
const UPSTREAM: Record<string, Record<string, string>> = {
  "irradiance-reconstructions": { model: "irradiance-models" },
  "spectral-irradiance-models": { tsi_model: "irradiance-models" },
  "spectral-irradiance-reconstructions": { model: "spectral-irradiance-models" },
};

/** Every (pointer, value) of a JSON value. */
function leaves(v: Json, path = ""): [string, Json][] {
  if (v !== null && typeof v === "object") {
    return Object.entries(v).flatMap(([k, x]) => leaves(x, `${path}/${k}`));
  }
  return [[path, v]];
}

Deno.test("every analysis' request example in OpenAPI runs against a fresh demo instance", async () => {
  const svc = await makeTestApp();
  try {
    await loadDemo(svc.store);
    const doc = await (await svc.get("/v1/openapi.json")).json();
    const deref = (s: Json): Json =>
      s?.$ref ? deref(doc.components.schemas[s.$ref.split("/").pop()]) : s;
    const examples = new Map<string, Json>();
    for (const kind of RUN_KINDS) {
      const schema = deref(
        doc.paths[kind.path].post.requestBody.content["application/json"].schema,
      );
      const ex = schema.example;
      assert.ok(ex && typeof ex === "object", `${kind.kind}: no request example`);
      // it passes the request schema, and gives one of each set of alternative fields
      const parsed = kind.request.safeParse(ex);
      assert.ok(parsed.success, `${kind.kind}: ${JSON.stringify(parsed.error?.issues)}`);
      for (const group of [schema.oneOf ?? []]) {
        const given = group.filter((g: Json) => g.required.every((f: string) => f in ex));
        if (group.length) assert.equal(given.length, 1, `${kind.kind}: alternatives ${given}`);
      }
      assert.ok(!("solar" in ex && "solar_run" in ex), kind.kind);
      for (const [pointer, v] of leaves(ex)) {
        assert.ok(v !== -10000 && v !== 10000, `${kind.kind}${pointer}: a schema bound`);
        assert.ok(typeof v !== "string" || !v.includes("..."), `${kind.kind}${pointer}: ${v}`);
      }
      examples.set(kind.kind, ex);
    }
    const made = new Map<string, string>();
    // upstream analyses first, so their runs can stand in for the placeholder
    const order = [...RUN_KINDS].sort((a, b) =>
      Number(a.kind in UPSTREAM) - Number(b.kind in UPSTREAM)
    );
    for (const kind of order) {
      const body = structuredClone(examples.get(kind.kind));
      for (const [field, upstream] of Object.entries(UPSTREAM[kind.kind] ?? {})) {
        assert.equal(body[field], EXAMPLE_RUN_ID, `${kind.kind}/${field}: the placeholder`);
        body[field] = made.get(upstream);
      }
      assert.ok(!JSON.stringify(body).includes(EXAMPLE_RUN_ID), `${kind.kind}: placeholder left`);
      const res = await svc.post(kind.path, body);
      let run = await res.json();
      assert.ok(res.status === 201 || res.status === 202, `${kind.kind}: ${JSON.stringify(run)}`);
      if (res.status === 202) {
        await svc.runs.settle();
        run = await (await svc.get(`/v1/runs/${run.id}`)).json();
      }
      assert.equal(run.status, "succeeded", `${kind.kind}: ${JSON.stringify(run.error)}`);
      made.set(kind.kind, run.id);
    }
    // the placeholder itself gets a plain answer: no run has that id, at the field
    const bad = await svc.post(
      "/v1/irradiance/reconstructions",
      examples.get("irradiance-reconstructions"),
    );
    assert.equal(bad.status, 422);
    const p = await bad.json();
    assert.equal(p.errors[0].pointer, "/model");
    assert.match(p.errors[0].message, new RegExp(`no run has id ${EXAMPLE_RUN_ID}`));
  } finally {
    await svc.close();
  }
});

Deno.test("field examples in the analyses' request schemas are demo ids or placeholders, never elisions", async () => {
  const svc = await makeTestApp();
  try {
    const doc = await (await svc.get("/v1/openapi.json")).json();
    const seen = new Set<Json>();
    const bad: string[] = [];
    const walk = (s: Json, where: string) => {
      if (!s || typeof s !== "object" || seen.has(s)) return;
      seen.add(s);
      if (s.$ref) return walk(doc.components.schemas[s.$ref.split("/").pop()], s.$ref);
      if ("example" in s && JSON.stringify(s.example).includes("...")) bad.push(where);
      if (typeof s.example === "number" && Math.abs(s.example) >= 10000) bad.push(where);
      for (const [k, v] of Object.entries(s)) {
        if (k !== "example") walk(v, `${where}/${k}`);
      }
    };
    for (const kind of RUN_KINDS) {
      walk(doc.paths[kind.path].post.requestBody.content["application/json"].schema, kind.path);
    }
    assert.deepEqual(bad, []);
  } finally {
    await svc.close();
  }
});
