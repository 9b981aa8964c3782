/**
 * A run refused for its input is never stored, whether it was asked for synchronously or
 * asynchronously (`Prefer: respond-async`, or estimated long): the asynchronous path checks the
 * inputs before it stores a queued run (`RunService.preflight`) and answers the same 422 as
 * the synchronous one. Demo data (invented, fixtures/demo).
 *
 * @module
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp, monthlySeries } from "./helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { DEMO } from "./demo_inputs.ts";

const ASYNC = { prefer: "respond-async" };

Deno.test("an asynchronous run refused for its input is a 422 and stores nothing, like a synchronous one", async () => {
  const svc = await makeTestApp();
  try {
    await loadDemo(svc.store);
    const count = async () => {
      const runs = (await (await svc.get("/v1/runs?limit=1")).json()).total;
      const series = (await (await svc.get("/v1/series?limit=1")).json()).total;
      return { runs, series };
    };
    const before = await count();
    const inline = monthlySeries("Inline climate", "temperature_anomaly", "K", 1990, 24, Math.sin);
    const cases: [string, Record<string, unknown>, string][] = [
      // the page's form before: no solar input at all
      ["/v1/lag-correlations", { climate: DEMO.TEMP }, "/solar"],
      // a lag window longer than a third of the overlap (found in compute, not by the schema)
      ["/v1/lag-correlations", { solar: DEMO.TSIM, climate: inline, max_lag: 20 }, "/max_lag"],
      ["/v1/cycles", { series: DEMO.TEMP }, "/series"],
      [
        "/v1/composites",
        { series: DEMO.TEMP, epoch_dates: ["1958-03", "2300-01"] },
        "/epoch_dates",
      ],
      ["/v1/energy-balance", {}, "/forcing"],
      // estimated long (a lag search over 200 months), so asynchronous even when not asked;
      // refused: 24 months of regressor cannot support it
      [
        "/v1/attributions",
        { climate: DEMO.TEMP, regressors: [{ name: "solar", series: inline, max_lag: 200 }] },
        "/",
      ],
    ];
    for (const [path, body, pointer] of cases) {
      const sync = await assertProblem(await svc.post(path, body), 422);
      const res = await svc.post(path, body, ASYNC);
      const problem = await assertProblem(res, 422);
      assert.ok(
        problem.errors?.[0]?.pointer.startsWith(pointer),
        `${path}: ${JSON.stringify(problem)}`,
      );
      // the same answer either way
      assert.deepEqual(problem.errors, sync.errors, path);
      assert.equal(res.headers.get("location"), null);
    }
    await svc.runs.settle();
    assert.deepEqual(await count(), before, "nothing stored");
    // a good asynchronous request is still accepted and runs to its end
    const ok = await svc.post(
      "/v1/lag-correlations",
      { solar: DEMO.TSIM, climate: DEMO.TEMP, surrogates: 100 },
      ASYNC,
    );
    assert.equal(ok.status, 202);
    const run = await ok.json();
    await svc.runs.settle();
    const done = await (await svc.get(`/v1/runs/${run.id}`)).json();
    assert.equal(done.status, "succeeded");
  } finally {
    await svc.close();
  }
});
