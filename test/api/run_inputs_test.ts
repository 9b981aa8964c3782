/**
 * Analyses that read another run read its typed result through `ctx.resultOf` (the result
 * schema of the analysis that made it), never by field-name strings: a run of the wrong kind is
 * refused with a problem at the request field naming the kind needed, and nothing is stored.
 * Demo data (invented, fixtures/demo).
 *
 * @module
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp, type TestService } from "./helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { DEMO } from "./demo_inputs.ts";
import { tsSources } from "../source_files.ts";

async function created(svc: TestService, path: string, body: unknown) {
  const res = await svc.post(path, body);
  const json = await res.json();
  assert.equal(res.status, 201, `${path}: ${JSON.stringify(json)}`);
  return json;
}

Deno.test("a run of the wrong kind as input is refused at its field, naming the kind needed", async () => {
  const svc = await makeTestApp();
  try {
    await loadDemo(svc.store);
    const cycles = await created(svc, "/v1/cycles", { series: DEMO.SSN });
    const fits = await created(svc, "/v1/cycle-fits", { series: DEMO.SSN });
    const forcing = await created(svc, "/v1/forcing", {
      tsi: DEMO.TSIM,
      reference: { kind: "period", period: { start: "1986", end: "1996" } },
    });
    const before = (await (await svc.get("/v1/runs?limit=1")).json()).total;
    const cases: [string, Record<string, unknown>, string, RegExp][] = [
      [
        "/v1/composites",
        { series: DEMO.TEMP, cycle_run: fits.id, bootstrap: 100, random_sets: 100 },
        "/cycle_run",
        /a cycle-fits run; a cycles run is needed/,
      ],
      [
        "/v1/energy-balance",
        { forcing_run: cycles.id },
        "/forcing_run",
        /a cycles run; a forcing run is needed/,
      ],
      [
        "/v1/lag-correlations",
        { solar_run: cycles.id, climate: DEMO.TEMP, significance: "none" },
        "/solar_run",
        /a cycles run; a solar series comes from a irradiance-reconstructions or forcing run/,
      ],
      [
        "/v1/attributions",
        { climate: DEMO.TEMP, regressors: [{ name: "solar", role: "solar", run: fits.id }] },
        "/regressors/0/run",
        /a cycle-fits run/,
      ],
    ];
    for (const [path, body, pointer, message] of cases) {
      const p = await assertProblem(await svc.post(path, body), 422);
      assert.equal(p.errors?.[0]?.pointer, pointer, `${path}: ${JSON.stringify(p)}`);
      assert.match(p.errors[0].message, message, path);
    }
    assert.equal((await (await svc.get("/v1/runs?limit=1")).json()).total, before);
    // the right kinds are read through their result schemas
    const comp = await created(svc, "/v1/composites", {
      series: DEMO.TEMP,
      cycle_run: cycles.id,
      bootstrap: 100,
      random_sets: 100,
    });
    assert.ok(comp.result.epochs_used.length >= 3);
    const eb = await created(svc, "/v1/energy-balance", { forcing_run: forcing.id });
    assert.equal(
      eb.result.outputs.temperature.time.length,
      forcing.result.outputs.forcing.time.length,
    );
    const lag = await created(svc, "/v1/lag-correlations", {
      solar_run: forcing.id,
      climate: DEMO.TEMP,
      significance: "none",
    });
    assert.ok(lag.result.n > 100);
  } finally {
    await svc.close();
  }
});

Deno.test("no analysis reads another run's result by field-name strings", async () => {
  // ctx.run(id) is for the record (kind, id, dates); results go through ctx.resultOf
  const offenders: string[] = [];
  for await (const [u, text] of tsSources(new URL("../../api/analyses/", import.meta.url))) {
    if (/\.run\([^)]*\)\s*\.result|\brun\.result\b/.test(text)) offenders.push(u.pathname);
  }
  assert.deepEqual(offenders, []);
});
