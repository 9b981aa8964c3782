/**
 * A bundle carries the whole lineage of its run: the runs that made its input series (the
 * darkening run behind a saved PSI series) travel with it, so the importing instance serves
 * "Derived from run" for them. Two instances in one process, as the bundle round-trip test.
 */
import assert from "node:assert/strict";
import { makeTestApp } from "./helpers.ts";
import { DEMO, demoIrradianceModel } from "./demo_inputs.ts";
import { loadDemo } from "../../api/demo.ts";

const { SSN, AREA, MG, TSI } = DEMO;

Deno.test("bundles: the run behind a derived input series travels and is served on import", async (t) => {
  const a = await makeTestApp();
  const b = await makeTestApp();
  try {
    await loadDemo(a.store);
    const { darkening: dark, psi, model } = await demoIrradianceModel(a);
    assert.deepEqual(model.input_runs, [], "the darkening run is not an input run of the model");
    const bundle = await (await a.get(`/v1/runs/${model.id}/bundle`)).json();

    await t.step("the bundle holds the darkening run and its own input, before the model", () => {
      assert.deepEqual(bundle.input_runs.map((r: { id: string }) => r.id), [dark.id]);
      const ids = bundle.series.map((s: { id: string }) => s.id);
      for (const id of [AREA, psi, TSI, SSN, MG]) assert.ok(ids.includes(id), id);
      const psiSeries = bundle.series.find((s: { id: string }) => s.id === psi);
      assert.equal(psiSeries.derived_from, dark.id);
    });

    await t.step("the importing instance verifies it and serves 'Derived from run'", async () => {
      const answer = await (await b.post("/v1/bundles", bundle)).json();
      assert.deepEqual(answer.differences, []);
      assert.equal(answer.verified, true);
      const series = await (await b.get(`/v1/series/${psi}`)).json();
      assert.equal(series.derived_from, dark.id);
      const maker = await b.get(`/v1/runs/${series.derived_from}`);
      assert.equal(maker.status, 200);
      const run = await maker.json();
      assert.equal(run.result_digest, dark.result_digest);
      // and the imported darkening run replays there
      const rep = await (await b.post(`/v1/runs/${dark.id}/replay`, {})).json();
      assert.equal(rep.identical, true);
    });

    await t.step("a false lineage claim is reported and nothing is stored", async () => {
      const c = await makeTestApp();
      try {
        const edited = structuredClone(bundle);
        // the darkening run, recomputed, does not make this series: claim it anyway for TSI
        // (its content id does not cover derived_from, so only the lineage check can tell)
        const tsi = edited.series.find((s: { id: string }) => s.id === TSI);
        tsi.derived_from = dark.id;
        const answer = await (await c.post("/v1/bundles", edited)).json();
        assert.equal(answer.verified, false);
        assert.ok(
          answer.differences.some((d: { message: string }) =>
            d.message.includes(`is not an output of run ${dark.id}`)
          ),
          JSON.stringify(answer.differences),
        );
        assert.equal((await c.get(`/v1/runs/${dark.id}`)).status, 404);
      } finally {
        await c.close();
      }
    });
  } finally {
    await a.close();
    await b.close();
  }
});
