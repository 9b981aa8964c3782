/**
 * Gridded fields on a shared instance follow the rules of series: an owner's field is private
 * until shared, invisible to others (404 on every read, absent from listings, unusable in
 * runs), uploads need a writer key, the storage quota counts the field's values, and deleting
 * removes the caller's copy only while no run of theirs uses it.
 */
import assert from "node:assert/strict";
import { sharedInstance } from "../security/shared_instance.ts";
import { gridNetcdf } from "./grid_file.ts";
import { monthlySeries } from "../helpers.ts";

const FIELD = gridNetcdf({
  startYear: 2000,
  nTime: 60,
  lat: [-45, 45],
  lon: [0, 90, 180, 270],
  values: Array.from({ length: 60 * 8 }, (_, i) => Math.sin(i * 0.37) + (i % 8) / 10),
});

function upload(key: string, svc: { app: { request: typeof fetch } }, body = FIELD) {
  return svc.app.request("/v1/fields", {
    method: "POST",
    headers: {
      "content-type": "application/x-netcdf",
      ...(key ? { Authorization: `Bearer ${key}` } : {}),
    },
    body,
  });
}

Deno.test("fields: private to their owner until shared; uploads need a writer; runs cannot use what they cannot see", async () => {
  const svc = await sharedInstance();
  try {
    const ana = await svc.owner("ana", { group: "lab" });
    const ben = await svc.owner("ben", { group: "other" });
    assert.equal((await upload("", svc as never)).status, 401);
    const up = await upload(ana.key, svc as never);
    const body = await up.json();
    assert.equal(up.status, 201, JSON.stringify(body));
    const id = body.field.id;
    assert.equal(body.field.owner, "ana");
    assert.equal(body.field.visibility, "private");
    for (const path of [`/v1/fields/${id}`, `/v1/fields/${id}/cells?lat=40&lon=90`]) {
      assert.equal((await ben.get(path)).status, 404, path);
      assert.equal((await svc.anonymous.get(path)).status, 404, path);
      assert.equal((await ana.get(path)).status, 200, path);
    }
    assert.equal((await (await ben.get("/v1/fields")).json()).total, 0);
    assert.equal((await (await ana.get("/v1/fields")).json()).total, 1);
    // ben's run on ana's private field: the field is unknown to him
    const solar = monthlySeries("solar", "tsi", "W m-2", 2000, 60, (i) => 1361 + Math.sin(i / 9));
    const res = await ben.post("/v1/solar-signal-maps", {
      field: id,
      solar,
      surrogates: 0,
      max_lag: 3,
    });
    const p = await res.json();
    assert.equal(res.status, 422, JSON.stringify(p));
    assert.equal(p.errors[0].pointer, "/field");
    // shared publicly, everyone sees it and ben's run goes through
    const share = await ana.put(`/v1/fields/${id}/sharing`, { visibility: "public" });
    assert.equal(share.status, 200, await share.clone().text());
    assert.equal((await svc.anonymous.get(`/v1/fields/${id}`)).status, 200);
    const ok = await ben.post("/v1/solar-signal-maps", {
      field: id,
      solar,
      surrogates: 0,
      max_lag: 3,
    });
    assert.equal(ok.status, 201, await ok.clone().text());
    // ben may not delete ana's field; ana's copy stays while ben's run uses it
    assert.equal((await ben.del(`/v1/fields/${id}`)).status, 403);
    assert.equal((await ana.del(`/v1/fields/${id}`)).status, 409);
    assert.equal(
      (await ana.put(`/v1/fields/${id}/sharing`, { visibility: "private" })).status,
      409,
    );
  } finally {
    await svc.close();
  }
});

Deno.test("fields: the storage quota counts 4 bytes per value and refuses before reading", async () => {
  const svc = await sharedInstance({
    config: {
      quotas: {
        ...(await import("../../../api/config.ts")).testConfig().quotas,
        storedBytes: 1000,
      },
    },
  });
  try {
    const ana = await svc.owner("ana");
    const res = await upload(ana.key, svc as never);
    const p = await res.json();
    assert.equal(res.status, 429, JSON.stringify(p));
    assert.match(p.detail, /1920 more/);
    assert.equal((await (await ana.get("/v1/fields")).json()).total, 0);
  } finally {
    await svc.close();
  }
});
