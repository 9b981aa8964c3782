import assert from "node:assert/strict";
import fc from "fast-check";
import { makeTestApp } from "./helpers.ts";

// Small valid inputs (invented), then random mutations of one field at a time: the answer is
// 201 or a 4xx problem, never a 500, and a refused request stores no run.
const days = Array.from(
  { length: 60 },
  (_, i) =>
    `2001-${String(1 + Math.floor(i / 28)).padStart(2, "0")}-${
      String(1 + (i % 28)).padStart(2, "0")
    }`,
);
const fac = days.map((_, i) => 0.15 + 0.002 * Math.sin(i / 5) + 0.0003 * Math.cos(i * 1.7));
const psi = days.map((_, i) => 2e-4 * (1 + Math.sin(i / 3)));
const tsi = days.map((_, i) =>
  1360.8 + 135 * (fac[i] - 0.15) - 1360.8 * psi[i] + 0.05 * Math.sin(i * 2.3)
);
const series = (name: string, quantity: string, units: string, value: number[]) => ({
  name,
  quantity,
  units,
  time: days,
  value,
});

const junk = fc.oneof(
  fc.constant(null),
  fc.string({ maxLength: 8 }),
  fc.double(),
  fc.integer({ min: -1e9, max: 1e9 }),
  fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { maxLength: 5 }),
  fc.constant({}),
  fc.constant([]),
  fc.boolean(),
);

function mutate(body: Record<string, unknown>, path: string[], value: unknown) {
  const copy = structuredClone(body);
  // deno-lint-ignore no-explicit-any
  let o: any = copy;
  for (const k of path.slice(0, -1)) o = o[k];
  o[path[path.length - 1]] = value;
  return copy;
}

Deno.test("irradiance endpoints property: mutated requests never give a 500", async () => {
  const svc = await makeTestApp();
  try {
    const model = await (await svc.post("/v1/irradiance/models", {
      tsi: series("t", "tsi", "W m-2", tsi),
      terms: [
        { name: "mg", role: "facular", series: series("f", "facular_index", "1", fac) },
        { name: "psi", role: "sunspot_darkening", series: series("p", "other", "1", psi) },
      ],
      folds: 2,
    })).json();
    assert.ok(model.id, JSON.stringify(model));
    const bodies: [string, Record<string, unknown>, string[][]][] = [
      ["/v1/irradiance/darkening", {
        groups: {
          time: days,
          area: psi.map((v) => v * 1e6),
          position: { kind: "mu", mu: psi.map(() => 0.8) },
        },
      }, [
        ["groups", "time"],
        ["groups", "area"],
        ["groups", "position"],
        ["groups", "area_kind"],
        ["contrast"],
        ["quiet_sun_tsi"],
        ["total_area"],
      ]],
      ["/v1/irradiance/models", {
        tsi: series("t", "tsi", "W m-2", tsi),
        terms: [{ name: "mg", role: "facular", series: series("f", "facular_index", "1", fac) }],
        folds: 2,
      }, [["tsi"], ["terms"], ["folds"], ["method"], ["period"], ["psi_reference"], [
        "sunspot_number",
      ], ["mapping_form"]]],
      ["/v1/irradiance/reconstructions", {
        model: model.id,
        proxies: [
          { term: "mg", series: series("f", "facular_index", "1", fac) },
          { term: "psi", series: series("p", "other", "1", psi) },
        ],
        period: { start: "2001", end: "2001" },
        resolution: "monthly",
      }, [["model"], ["proxies"], ["period"], ["resolution"], ["level"], ["background"], [
        "sunspot_number",
      ], ["sunspot_conversion"]]],
      ["/v1/forcing", {
        tsi: series("t", "tsi", "W m-2", tsi),
        reference: { kind: "period", period: { start: "2001-01", end: "2001-02" } },
      }, [["tsi"], ["reference"], ["albedo"], ["reconstruction"]]],
    ];
    for (const [path, body, fields] of bodies) {
      const ok = await svc.post(path, body);
      assert.equal(ok.status, 201, `${path}: ${await ok.text()}`);
      await fc.assert(
        fc.asyncProperty(fc.constantFrom(...fields), junk, async (field, value) => {
          const before = (await svc.store.listRuns({ limit: 1, offset: 0 })).total;
          const res = await svc.post(path, mutate(body, field, value));
          const text = await res.text();
          assert.ok(
            res.status !== 500,
            `${path} ${field.join("/")} = ${JSON.stringify(value)}: ${text}`,
          );
          assert.ok(res.status === 201 || (res.status >= 400 && res.status < 500), `${res.status}`);
          if (res.status !== 201) {
            assert.equal((await svc.store.listRuns({ limit: 1, offset: 0 })).total, before);
          }
        }),
        { numRuns: 40, seed: 20261201 },
      );
    }
  } finally {
    await svc.close();
  }
});
