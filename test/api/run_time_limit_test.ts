/**
 * The per-run wall-time limit (`SUNLAG_RUN_WALL_SECONDS`): a run still computing after it
 * fails with a problem naming the limit, and its work stops as for a cancel; a synchronous
 * request that runs past it gets the same problem and stores nothing.
 */
import assert from "node:assert/strict";
import { assertProblem, makeTestApp } from "./helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { readConfig } from "../../api/config.ts";
import { DEMO } from "./demo_inputs.ts";

const HEAVY = {
  solar: DEMO.TSIM,
  climate: DEMO.TEMP,
  surrogates: 100_000,
  preprocess: "high_pass",
  high_pass_cutoff_years: 30,
};

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

Deno.test("time limit: an asynchronous run fails with the limit as its reason, and its workers stop", async () => {
  const svc = await makeTestApp({ workers: 2, config: { runWallSeconds: 1 } });
  try {
    await loadDemo(svc.store);
    // a small run first, so that the workers have loaded the analyses before the clock runs
    // (under the 1 s limit it may itself run out of time while they load)
    await svc.post("/v1/lag-correlations", { ...HEAVY, surrogates: 100 }, {
      prefer: "respond-async",
    });
    await svc.runs.settle();
    const res = await svc.post("/v1/lag-correlations", HEAVY, { prefer: "respond-async" });
    assert.equal(res.status, 202);
    const { id } = await res.json();
    const t0 = performance.now();
    let run;
    do {
      await sleep(50);
      run = await (await svc.get(`/v1/runs/${id}`)).json();
    } while (run.status !== "failed" && performance.now() - t0 < 10_000);
    const failedAfter = performance.now() - t0;
    assert.equal(run.status, "failed");
    assert.equal(run.error.type, "https://sunlag.invalid/problems/time-limit");
    assert.equal(run.error.limit_seconds, 1);
    assert.match(run.error.detail, /wall-time limit of 1 s \(SUNLAG_RUN_WALL_SECONDS\)/);
    assert.equal(run.result, null);
    // the run's processing (its work on the workers) ends soon after the failure
    const t1 = performance.now();
    await svc.runs.settle();
    const stoppedAfter = performance.now() - t1;
    assert.ok(stoppedAfter < 1000, `work stopped ${stoppedAfter.toFixed(0)} ms after the failure`);
    console.log(
      `failed ${failedAfter.toFixed(0)} ms after submission; work stopped ` +
        `${stoppedAfter.toFixed(0)} ms later`,
    );
    // a terminal state never changes
    await sleep(200);
    assert.equal((await (await svc.get(`/v1/runs/${id}`)).json()).status, "failed");
  } finally {
    await svc.close();
  }
});

Deno.test("time limit: a synchronous run past the limit gets a problem naming it and stores nothing", async () => {
  // computed in this thread: the limit is seen by the clock inside the surrogate loop
  const svc = await makeTestApp({ config: { runWallSeconds: 1, asyncSeconds: 1e6 } });
  try {
    await loadDemo(svc.store);
    const before = (await (await svc.get("/v1/runs")).json()).total;
    const t0 = performance.now();
    const res = await svc.post("/v1/lag-correlations", HEAVY);
    const took = performance.now() - t0;
    const problem = await assertProblem(res, 422);
    assert.equal(problem.type, "https://sunlag.invalid/problems/time-limit");
    assert.equal(problem.limit_seconds, 1);
    assert.ok(took < 2500, `answered after ${took.toFixed(0)} ms`);
    assert.equal((await (await svc.get("/v1/runs")).json()).total, before);
  } finally {
    await svc.close();
  }
});

Deno.test("time limit: SUNLAG_RUN_WALL_SECONDS is read, defaults to an hour and refuses nonsense", () => {
  assert.equal(readConfig({}).runWallSeconds, 3600);
  assert.equal(readConfig({ SUNLAG_RUN_WALL_SECONDS: "90" }).runWallSeconds, 90);
  assert.throws(() => readConfig({ SUNLAG_RUN_WALL_SECONDS: "0" }), /SUNLAG_RUN_WALL_SECONDS/);
  assert.throws(() => readConfig({ SUNLAG_RUN_WALL_SECONDS: "soon" }), /SUNLAG_RUN_WALL_SECONDS/);
});
