import assert from "node:assert/strict";
import { assertProblem, makeTestApp, monthlySeries } from "./helpers.ts";

const spots = monthlySeries(
  "Probe spot count",
  "sunspot_number",
  "1",
  2000,
  24,
  (i) => 50 + i,
  { version: "2", source: "test", description: "made up" },
);

Deno.test("POST /v1/series: same content gives the same id, 201 then 200", async () => {
  const svc = await makeTestApp();
  const a = await svc.post("/v1/series", spots);
  assert.equal(a.status, 201);
  const ja = await a.json();
  assert.match(ja.series.id, /^sha256:[0-9a-f]{64}$/);
  const { time_grid, units_conversion, ...counts } = ja.report;
  assert.deepEqual(counts, { read: 24, kept: 24, missing: 0, aggregated: 0 });
  assert.equal(units_conversion, null);
  assert.deepEqual([time_grid.resolution, time_grid.position, time_grid.months], [
    "monthly",
    "middle",
    "calendar",
  ]);
  assert.equal(a.headers.get("location"), `/v1/series/${ja.series.id}`);
  const b = await svc.post("/v1/series", spots);
  assert.equal(b.status, 200);
  const jb = await b.json();
  assert.equal(jb.created, false);
  assert.equal(jb.series.id, ja.series.id);
  assert.equal((await (await svc.get("/v1/series")).json()).total, 1);
  // Different content (one value changed) is a different id.
  const c = await svc.post("/v1/series", { ...spots, value: [...spots.value.slice(0, 23), 0] });
  assert.notEqual((await c.json()).series.id, ja.series.id);
  await svc.close();
});

Deno.test("GET /v1/series/{id}: ISO dates beside decimal years; CSV with metadata header", async () => {
  const svc = await makeTestApp();
  const id = (await (await svc.post("/v1/series", spots)).json()).series.id;
  const s = await (await svc.get(`/v1/series/${id}`)).json();
  assert.equal(s.resolution, "monthly");
  assert.equal(s.date[0], "2000-01");
  // 2000-01 is the middle of January 2000: (15.5 days) / 366 days (2000 is a leap year).
  assert.ok(Math.abs(s.time[0] - (2000 + 15.5 / 366)) < 1e-12);
  assert.equal(s.start_date, "2000-01");
  assert.equal(s.end_date, "2001-12");
  const csvRes = await svc.get(`/v1/series/${id}?format=csv`);
  assert.match(csvRes.headers.get("content-type") ?? "", /text\/csv/);
  const csv = await csvRes.text();
  assert.match(csv, /^# /);
  assert.ok(csv.includes(id));
  const viaAccept = await (await svc.get(`/v1/series/${id}`, { accept: "text/csv" })).text();
  assert.equal(viaAccept, csv);
  // Round trip: the CSV uploads back to the same content id.
  const back = await svc.app.request("/v1/series", {
    method: "POST",
    headers: { "content-type": "text/csv" },
    body: csv,
  });
  const jb = await back.json();
  assert.equal(back.status, 200, JSON.stringify(jb));
  assert.equal(jb.series.id, id);
  await svc.close();
});

Deno.test("POST /v1/series text/csv: columns by name, sentinels, report", async () => {
  const svc = await makeTestApp();
  const csv = "# station\nyear;month;anom\n1990;1;0.1\n1990;2;-999\n1990;3;0.3\n";
  const q = new URLSearchParams({
    name: "Station anomaly",
    quantity: "temperature_anomaly",
    units: "K",
    year: "year",
    month: "month",
    value: "anom",
    missing: "-999",
  });
  const res = await svc.app.request(`/v1/series?${q}`, {
    method: "POST",
    headers: { "content-type": "text/csv" },
    body: csv,
  });
  const body = await res.json();
  assert.equal(res.status, 201, JSON.stringify(body));
  assert.equal(body.report.read, 3);
  assert.equal(body.report.kept, 2);
  assert.equal(body.report.missing, 1);
  await svc.close();
});

Deno.test("POST /v1/series: a bad cell is a 422 naming row and column; nothing stored", async () => {
  const svc = await makeTestApp();
  const csv = "time,value\n2001-01,1\n2001-02,abc\n2001-03,3\n";
  const q = new URLSearchParams({ name: "x", quantity: "sunspot_number", units: "1" });
  const res = await svc.app.request(`/v1/series?${q}`, {
    method: "POST",
    headers: { "content-type": "text/csv" },
    body: csv,
  });
  const body = await assertProblem(res, 422);
  const e = body.errors[0];
  assert.equal(e.row, 3);
  assert.equal(e.column, "value");
  assert.match(e.message, /abc/);
  assert.equal((await (await svc.get("/v1/series")).json()).total, 0);
  await svc.close();
});

Deno.test("POST /v1/series: units that contradict the quantity are refused", async () => {
  const svc = await makeTestApp();
  const body = await assertProblem(await svc.post("/v1/series", { ...spots, units: "W m-2" }), 422);
  assert.equal(body.errors[0].pointer, "/units");
  assert.match(body.errors[0].message, /contradict/);
  await svc.close();
});

Deno.test("GET /v1/series: paging, quantity filter, 404 for unknown ids", async () => {
  const svc = await makeTestApp();
  for (let k = 0; k < 3; k++) await svc.post("/v1/series", { ...spots, name: `s${k}` });
  await svc.post("/v1/series", { ...spots, quantity: "other", units: "m" });
  const page = await (await svc.get("/v1/series?limit=2&offset=0&quantity=sunspot_number")).json();
  assert.equal(page.total, 3);
  assert.equal(page.items.length, 2);
  const bad = await assertProblem(await svc.get("/v1/series?limit=0"), 422);
  assert.equal(bad.errors[0].pointer, "/limit");
  assert.equal(bad.errors[0].in, "query");
  await assertProblem(await svc.get(`/v1/series/sha256:${"0".repeat(64)}`), 404);
  await svc.close();
});

Deno.test("DELETE /v1/series/{id}: 204, then 404", async () => {
  const svc = await makeTestApp();
  const id = (await (await svc.post("/v1/series", spots)).json()).series.id;
  const del = await svc.app.request(`/v1/series/${id}`, { method: "DELETE" });
  assert.equal(del.status, 204);
  await assertProblem(await svc.app.request(`/v1/series/${id}`, { method: "DELETE" }), 404);
  await svc.close();
});
