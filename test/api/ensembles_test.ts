/**
 * Ensembles and honest bands end to end on the demo (SYNTHETIC, fixtures/demo): a
 * reconstruction with members, its band and variance decomposition, the sunspot number's own
 * error, the size limit, and the members flowing into forcing, energy-balance, lag-correlation
 * and attribution runs.
 */
import assert from "node:assert/strict";
import { loadDemo } from "../../api/demo.ts";
import { assertProblem, makeTestApp, type TestService } from "./helpers.ts";
import { DEMO, demoIrradianceModel } from "./demo_inputs.ts";
import { ReconstructionResult } from "../../api/analyses/irradiance_reconstructions/result.ts";

// deno-lint-ignore no-explicit-any
type Json = any;

async function created(res: Response): Promise<Json> {
  const body = await res.json();
  assert.equal(res.status, 201, JSON.stringify(body).slice(0, 800));
  return body;
}

/** The demo chain and a reconstruction body over 1700–2025 in annual cells. */
async function demoSetup(svc: TestService) {
  await loadDemo(svc.store);
  const { model, psi } = await demoIrradianceModel(svc);
  const body = (extra: Record<string, unknown> = {}) => ({
    model: model.id,
    proxies: [{ term: "mg_ii", series: DEMO.MG }, { term: "psi", series: psi }],
    sunspot_number: DEMO.SSN,
    period: { start: "1700", end: "2025" },
    resolution: "annual",
    ...extra,
  });
  return { model, psi, body };
}

const sdAt = (o: Json, year: number) =>
  o.uncertainty[o.time.findIndex((t: number) => Math.floor(t) === year)];

Deno.test("reconstruction ensembles: members, an honest band, the variance by source and period", async (t) => {
  const svc = await makeTestApp();
  try {
    const { body } = await demoSetup(svc);
    const run = await created(
      await svc.post(
        "/v1/irradiance/reconstructions",
        body({
          realizations: 200,
          seed: 7,
          sunspot_uncertainty: { source: "model" },
        }),
      ),
    );
    const r = run.result;
    await t.step("the result parses with its published schema, members included", () => {
      assert.ok(ReconstructionResult.safeParse(r).success);
      assert.equal(r.ensemble.realizations, 200);
      assert.equal(r.ensemble.members.length, 200);
      assert.equal(r.ensemble.members[0].length, r.outputs.tsi.time.length);
      assert.equal(run.seed, 7);
    });
    await t.step("the band is the ensemble's and grows back in time", () => {
      assert.equal(r.band.method, "ensemble_quantiles");
      assert.deepEqual(r.band.included.map((s: Json) => s.source), [
        "calibration",
        "residual",
        "mapping",
        "input",
      ]);
      assert.ok(r.band.not_included.some((s: string) => /secular/.test(s)));
      assert.ok(r.band.not_included.some((s: string) => /reconstruction methods/.test(s)));
      const o = r.outputs.tsi;
      assert.match(o.interval, /200 ensemble members/);
      assert.ok(sdAt(o, 1750) > 3 * sdAt(o, 1990), `σ1750 ${sdAt(o, 1750)} σ1990 ${sdAt(o, 1990)}`);
      // members' quantiles bracket the central value
      const i = o.time.findIndex((x: number) => Math.floor(x) === 1750);
      assert.ok(o.lower[i] < o.value[i] && o.value[i] < o.upper[i]);
    });
    await t.step("the variance by period names the dominant source of 1750 and 1990", () => {
      const block = (y: number) =>
        r.variance_by_period.find((b: Json) => b.start <= y && y < b.end);
      assert.equal(block(1750).dominant, "input");
      assert.notEqual(block(1990).dominant, "input");
      assert.equal(block(2010).variance.input, 0);
      // the analytic total and the ensemble's variance agree within sampling error (200
      // members: relative SE of a variance about 10 %; 3 SE)
      for (const b of r.variance_by_period) {
        assert.ok(Math.abs(b.ensemble_variance / b.total - 1) < 0.3, JSON.stringify(b));
      }
    });
    await t.step(
      "cautions, CSV metadata and the chart say which sources are in the band",
      async () => {
        assert.ok(
          r.cautions.some((c: string) =>
            /band \(ensemble quantiles\) includes calibration/.test(c)
          ),
        );
        const csv = await (await svc.get(`/v1/runs/${run.id}/outputs/tsi`, { accept: "text/csv" }))
          .text();
        assert.match(
          csv,
          /# caution: The uncertainty band .*does not include the spread between published/,
        );
        const svg = await (await svc.get(`/v1/runs/${run.id}/chart.svg`)).text();
        assert.match(svg, /5 of 200 members/);
        assert.match(svg, /Not in the band/);
      },
    );
    await t.step("the run replays byte for byte, and 2 workers give the same members", async () => {
      const replay = await (await svc.post(`/v1/runs/${run.id}/replay`, {})).json();
      assert.equal(replay.identical, true, JSON.stringify(replay).slice(0, 300));
      const pooled = await makeTestApp({ workers: 2 });
      try {
        const { body: b2 } = await demoSetup(pooled);
        const other = await created(
          await pooled.post(
            "/v1/irradiance/reconstructions",
            b2({
              realizations: 200,
              seed: 7,
              sunspot_uncertainty: { source: "model" },
            }),
          ),
        );
        // the model run's id differs between the two services, so compare what it computed
        assert.deepEqual(other.result.ensemble, r.ensemble);
        for (const k of ["value", "uncertainty", "lower", "upper"]) {
          assert.deepEqual(other.result.outputs.tsi[k], r.outputs.tsi[k]);
        }
        assert.deepEqual(other.result.variance_by_period, r.variance_by_period);
      } finally {
        await pooled.close();
      }
    });
  } finally {
    await svc.close();
  }
});

Deno.test("the sunspot number's own error enters the band: σ = 0 and σ = 50 % + 5 differ", async (t) => {
  const svc = await makeTestApp();
  try {
    const { body } = await demoSetup(svc);
    const ss = (await svc.store.getSeries(DEMO.SSN))!;
    const copy = (f: (v: number) => number) => ({
      name: "demo sunspot copy",
      quantity: "sunspot_number",
      units: "1",
      version: "2",
      time: Array.from(ss.time),
      value: Array.from(ss.value),
      uncertainty: Array.from(ss.value, f),
    });
    const exact = (await created(
      await svc.post("/v1/irradiance/reconstructions", body({ sunspot_number: copy(() => 0) })),
    )).result;
    const loose = (await created(
      await svc.post(
        "/v1/irradiance/reconstructions",
        body({ sunspot_number: copy((v) => 0.5 * v + 5) }),
      ),
    )).result;
    await t.step("the series' own σ is used and stated", () => {
      assert.equal(exact.sunspot_uncertainty.source, "series");
      assert.ok(sdAt(loose.outputs.tsi, 1750) > 1.1 * sdAt(exact.outputs.tsi, 1750));
      assert.equal(sdAt(loose.outputs.tsi, 1990), sdAt(exact.outputs.tsi, 1990));
      assert.ok(loose.band.not_included.some((s: string) => /shared by many values/.test(s)));
    });
    await t.step(
      "without σ in the series the documented model is used, with its eras",
      async () => {
        const bare = { ...copy(() => 0), uncertainty: undefined, name: "bare copy" };
        const m = (await created(
          await svc.post("/v1/irradiance/reconstructions", body({ sunspot_number: bare })),
        )).result;
        assert.equal(m.sunspot_uncertainty.source, "model");
        assert.equal(m.sunspot_uncertainty.eras.at(-1).relative_scale_sd, 0.05);
        assert.ok(sdAt(m.outputs.tsi, 1750) > sdAt(exact.outputs.tsi, 1750));
        const p = await assertProblem(
          await svc.post(
            "/v1/irradiance/reconstructions",
            body({ sunspot_number: bare, sunspot_uncertainty: { source: "series" } }),
          ),
          422,
        );
        assert.equal(p.errors[0].pointer, "/sunspot_uncertainty/source");
      },
    );
  } finally {
    await svc.close();
  }
});

Deno.test("ensemble size: beyond the JSON limit a problem names the fields", async () => {
  const svc = await makeTestApp();
  try {
    const { body } = await demoSetup(svc);
    const p = await assertProblem(
      await svc.post(
        "/v1/irradiance/reconstructions",
        body({
          resolution: "daily",
          realizations: 1000,
        }),
      ),
      422,
    );
    assert.equal(p.errors[0].pointer, "/realizations");
    assert.match(p.errors[0].message, /1000 realizations × 119069 daily cells/);
    assert.match(p.errors[0].message, /\/realizations, \/period, \/resolution/);
    const big = await assertProblem(
      await svc.post("/v1/irradiance/reconstructions", body({ realizations: 1001 })),
      422,
    );
    assert.equal(big.errors[0].pointer, "/realizations");
    // nothing was stored
    const runs = await svc.store.listRuns({
      kind: "irradiance-reconstructions",
      limit: 10,
      offset: 0,
    });
    assert.equal(runs.items.length, 0);
  } finally {
    await svc.close();
  }
});

Deno.test("members flow into forcing, energy balance, lag correlations and attributions", async (t) => {
  const svc = await makeTestApp();
  try {
    const { body } = await demoSetup(svc);
    const rec = await created(
      await svc.post(
        "/v1/irradiance/reconstructions",
        body({
          period: { start: "1850", end: "2025" },
          realizations: 100,
          seed: 3,
        }),
      ),
    );
    const plain = await created(
      await svc.post(
        "/v1/irradiance/reconstructions",
        body({ period: { start: "1850", end: "2025" } }),
      ),
    );
    const reference = { kind: "period", period: { start: "1986", end: "1996" } };
    const f = await created(await svc.post("/v1/forcing", { reconstruction: rec.id, reference }));
    const fa = await created(
      await svc.post("/v1/forcing", { reconstruction: plain.id, reference }),
    );
    await t.step("forcing: one member per member, and the analytic σ agrees with it", () => {
      assert.equal(f.result.ensemble.realizations, 100);
      assert.match(f.result.uncertainty_method, /each member against its own reference mean/);
      assert.match(fa.result.uncertainty_method, /error model/);
      assert.equal(f.result.band.method, "ensemble_quantiles");
      assert.ok(f.result.cautions.some((c: string) => /forcing's uncertainty band/.test(c)));
      // ensemble (100 members) against the analytic Var(x_t − m̄): relative SE of a variance
      // √(2/99) = 14 %, so 45 % in variance is 3 SE
      const a = fa.result.outputs.forcing.uncertainty, e = f.result.outputs.forcing.uncertainty;
      for (const i of [10, 80, 150]) {
        assert.ok(Math.abs(e[i] ** 2 / a[i] ** 2 - 1) < 0.45, `cell ${i}: ${e[i]} vs ${a[i]}`);
      }
    });
    await t.step("energy balance: the response to every forcing member, with a band", async () => {
      const eb = await created(await svc.post("/v1/energy-balance", { forcing_run: f.id }));
      assert.equal(eb.result.ensemble.realizations, 100);
      assert.equal(eb.result.ensemble.units, "K");
      const o = eb.result.outputs.temperature;
      assert.ok(o.upper.every((u: number, i: number) => u >= o.lower[i]));
      assert.ok(eb.result.cautions.some((c: string) => /heat capacity and feedback/.test(c)));
      const without = await created(await svc.post("/v1/energy-balance", { forcing_run: fa.id }));
      assert.equal(without.result.ensemble, undefined);
    });
    await t.step("lag correlations: the best lag and r over the members", async () => {
      const lc = await created(
        await svc.post("/v1/lag-correlations", {
          solar_run: rec.id,
          climate: DEMO.TEMP,
          max_lag: 4,
          significance: "none",
        }),
      );
      const s = lc.result.ensemble_spread;
      assert.equal(s.realizations, 100);
      assert.equal(s.best_lag.members.reduce((a: number, b: number) => a + b, 0), 100);
      assert.ok(s.r_at_best.p025 <= s.r_at_best.median && s.r_at_best.median <= s.r_at_best.p975);
      // the reconstruction's band statement reaches the run as an inherited caution
      assert.ok(lc.result.inherited.some((n: Json) => /uncertainty band .*includes/.test(n.text)));
      const central = await created(
        await svc.post("/v1/lag-correlations", {
          solar_run: plain.id,
          climate: DEMO.TEMP,
          max_lag: 4,
          significance: "none",
        }),
      );
      assert.equal(central.result.ensemble_spread, undefined);
    });
    await t.step("attributions: the solar sensitivity over the members", async () => {
      const at = await created(
        await svc.post("/v1/attributions", {
          climate: DEMO.TEMP,
          regressors: [{ name: "solar", role: "solar", run: rec.id, min_lag: 0, max_lag: 2 }],
          resolution: "annual",
        }),
      );
      const s = at.result.ensemble_spread;
      assert.equal(s.realizations, 100);
      // the demo's true sensitivity, 0.1 K per W m-2 (fixtures/demo/manifest.json, truth), lies
      // within the members' spread, and so does the central answer
      assert.ok(
        s.sensitivity.p025 < 0.1 && 0.1 < s.sensitivity.p975,
        JSON.stringify(s.sensitivity),
      );
      const c = at.result.solar.sensitivity;
      assert.ok(s.sensitivity.p025 < c && c < s.sensitivity.p975);
      assert.ok(s.sensitivity.p025 < s.sensitivity.p975);
      assert.equal(s.lag.members.reduce((a: number, b: number) => a + b, 0), 100);
    });
  } finally {
    await svc.close();
  }
});
