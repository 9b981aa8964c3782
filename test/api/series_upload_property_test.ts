import assert from "node:assert/strict";
import fc from "fast-check";
import { makeTestApp } from "./helpers.ts";

const BAD_CELLS = ["abc", "Infinity", "1e999", "0x1F", "1.2.3", "--1"];

async function seriesCount(svc: Awaited<ReturnType<typeof makeTestApp>>) {
  return (await svc.store.listSeries({ limit: 1, offset: 0 })).total;
}

Deno.test("POST /v1/series property: random bad uploads never give a 500 and never store anything", async (t) => {
  const svc = await makeTestApp();
  // one good series stored first, so "unchanged" is not trivially zero
  const seed = await svc.post("/v1/series", {
    name: "anchor",
    quantity: "other",
    units: "1",
    time: [2000, 2001],
    value: [1, 2],
  });
  assert.equal(seed.status, 201);
  const before = await seriesCount(svc);

  await t.step("CSV tables with a bad cell: 422 naming row and column", async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom(",", ";", "\t", " "),
        fc.array(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }), {
          minLength: 2,
          maxLength: 20,
        }),
        fc.nat(),
        fc.constantFrom(...BAD_CELLS),
        async (sep, values, pos, bad) => {
          const k = pos % values.length;
          const rows = values.map((v, i) => `${1900 + i}${sep}${i === k ? bad : v}`);
          const res = await svc.app.request(
            "/v1/series?name=p&quantity=other&units=1",
            {
              method: "POST",
              headers: { "content-type": "text/csv" },
              body: `time${sep}value\n${rows.join("\n")}\n`,
            },
          );
          assert.equal(res.status, 422);
          const body = await res.json();
          assert.ok(
            body.errors.some((e: { row?: number; column?: unknown }) =>
              e.row === k + 2 && e.column === "value"
            ),
            JSON.stringify(body.errors),
          );
        },
      ),
      { numRuns: 60, seed: 42 },
    );
  });

  await t.step("random bytes as text/csv", async () => {
    await fc.assert(
      fc.asyncProperty(fc.uint8Array({ maxLength: 200 }), async (bytes) => {
        const res = await svc.app.request("/v1/series?name=p&quantity=other&units=1", {
          method: "POST",
          headers: { "content-type": "text/csv" },
          body: bytes,
        });
        assert.notEqual(res.status, 500);
        await res.body?.cancel();
      }),
      { numRuns: 60, seed: 5 },
    );
  });

  await t.step("random JSON bodies and broken JSON", async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.oneof(fc.jsonValue().map((v) => JSON.stringify(v)), fc.string()),
        async (text) => {
          const res = await svc.app.request("/v1/series", {
            method: "POST",
            headers: { "content-type": "application/json" },
            body: text,
          });
          assert.ok(res.status === 400 || res.status === 422, `status ${res.status} for ${text}`);
          await res.body?.cancel();
        },
      ),
      { numRuns: 80, seed: 9 },
    );
  });

  await t.step("almost-valid JSON series with one bad field", async () => {
    const good = {
      name: "s",
      quantity: "tsi",
      units: "W m-2",
      time: ["2001", "2002", "2003"],
      value: [1360, 1361, 1362],
    };
    const mutations = fc.oneof(
      fc.constant({ units: "K" }),
      fc.constant({ time: ["2001", "2001", "2003"] }),
      fc.constant({ time: ["2003", "2002", "2001"] }),
      fc.constant({ time: ["2001", "2002-13", "2003"] }),
      fc.constant({ value: [null, null, 1] }),
      fc.constant({ value: [1, 2] }),
      fc.constant({ uncertainty: [0.1, -1, 0.1] }),
      fc.constant({ quantity: "solar_wind" }),
      fc.record({ value: fc.tuple(fc.constant(1), fc.constant(2), fc.string()) }),
    );
    await fc.assert(
      fc.asyncProperty(mutations, async (m) => {
        const res = await svc.post("/v1/series", { ...good, ...m });
        assert.equal(res.status, 422);
        const body = await res.json();
        assert.ok(body.errors.length > 0 && typeof body.errors[0].pointer === "string");
      }),
      { numRuns: 40, seed: 1 },
    );
  });

  await t.step("random query parameters on a text upload never give a 500", async () => {
    const keys = [
      "name",
      "quantity",
      "units",
      "time",
      "year",
      "month",
      "day",
      "value",
      "uncertainty",
      "delimiter",
      "missing",
      "duplicates",
      "time_format",
      "version",
    ];
    const text = "time,value,sigma\n1996-01,1,0.1\n1996-01,1,0.1\n";
    await fc.assert(
      fc.asyncProperty(
        fc.dictionary(
          fc.constantFrom(...keys),
          fc.oneof(
            fc.string({ maxLength: 12 }),
            fc.constantFrom("0", "1", "2", "9", "sigma", "value", "tsi", "other", "mean"),
          ),
        ),
        async (q) => {
          // never a valid upload: the two rows are identical, so whatever columns are chosen the
          // times repeat, and duplicates are rejected
          const params = new URLSearchParams({ ...q, duplicates: "reject" });
          const res = await svc.app.request(`/v1/series?${params}`, {
            method: "POST",
            headers: { "content-type": "text/csv" },
            body: text,
          });
          assert.ok(res.status === 422 || res.status === 400, `status ${res.status} for ${params}`);
          const body = await res.json();
          assert.ok(Array.isArray(body.errors) && body.errors.length > 0, JSON.stringify(body));
        },
      ),
      { numRuns: 80, seed: 13 },
    );
  });

  assert.equal(await seriesCount(svc), before, "nothing stored by bad uploads");
  await svc.close();
});
