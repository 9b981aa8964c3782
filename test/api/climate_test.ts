import assert from "node:assert/strict";
import { assertProblem, makeTestApp, monthlySeries } from "./helpers.ts";
import { randomStream } from "../../core/random/random_stream.ts";

/** Invented monthly pair: an 11-year solar cycle with noise, and a climate series following it
 * by 14 months plus AR(1) noise. */
function pair(months = 600, seed = 4) {
  const st = randomStream(seed, 0);
  const solar: number[] = [], climate: number[] = [];
  let e = 0;
  for (let i = 0; i < months + 14; i++) {
    solar.push(Math.sin((2 * Math.PI * i) / 132) + 0.3 * st.normal());
  }
  for (let i = 0; i < months; i++) {
    e = 0.5 * e + 0.1 * st.normal();
    climate.push(0.1 * solar[i] + e);
  }
  return {
    solar: monthlySeries(
      "invented cycle",
      "tsi",
      "W m-2",
      1950,
      months,
      (i) => 1361 + solar[i + 14],
    ),
    climate: monthlySeries(
      "invented station",
      "temperature_anomaly",
      "K",
      1950,
      months,
      (i) => climate[i] + 0 * i,
    ),
  };
}

Deno.test("POST /v1/lag-correlations finds the lag with analytic and Monte Carlo p-values", async () => {
  const svc = await makeTestApp();
  try {
    // the climate value of month i is 0.1 × the solar value of month i − 14: lag +14
    const { solar, climate } = pair();
    const res = await svc.post("/v1/lag-correlations", {
      solar,
      climate,
      max_lag: 24,
      surrogates: 200,
      seed: 3,
    });
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run).slice(0, 500));
    const r = run.result;
    assert.equal(r.resolution, "monthly");
    assert.equal(r.lags.length, 49);
    assert.equal(r.best.lag, 14);
    assert.ok(r.best.p_family_wise <= 0.01);
    assert.ok(r.best.p_analytic < 0.001);
    const row = r.lags[r.best.lag + 24];
    assert.equal(row.n, 600 - 14);
    assert.ok(row.n_eff < row.n);
    assert.ok(row.ci_lower < row.r && row.r < row.ci_upper);
    assert.match(r.which_to_trust, /Monte Carlo/);
    assert.ok(run.result.cautions.some((c: string) => /not attribution/.test(c)));
    assert.equal(run.seed, 3);
    // replay gives the same digest
    const rep = await (await svc.post(`/v1/runs/${run.id}/replay`, {})).json();
    assert.equal(rep.replay_digest, run.result_digest);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/lag-correlations: same numbers with 0 and 2 workers", async () => {
  const { solar, climate } = pair(300, 8);
  const body = { solar, climate, max_lag: 12, surrogates: 300, seed: 11 };
  const a = await makeTestApp();
  const b = await makeTestApp({ workers: 2 });
  try {
    const ra = await (await a.post("/v1/lag-correlations", body)).json();
    const rb = await (await b.post("/v1/lag-correlations", body)).json();
    assert.equal(ra.status, "succeeded", JSON.stringify(ra).slice(0, 300));
    assert.equal(rb.status, "succeeded", JSON.stringify(rb).slice(0, 300));
    assert.equal(ra.result_digest, rb.result_digest);
  } finally {
    await a.close();
    await b.close();
  }
});

Deno.test("POST /v1/lag-correlations rejects bad input with 422 problems naming the field", async (t) => {
  const svc = await makeTestApp();
  try {
    const { solar, climate } = pair(120, 2);
    await t.step("lag window larger than a third of the overlap", async () => {
      const body = await assertProblem(
        await svc.post("/v1/lag-correlations", {
          solar,
          climate,
          max_lag: 41,
          significance: "none",
        }),
        422,
      );
      assert.equal(body.errors[0].pointer, "/max_lag");
    });
    await t.step("constant series", async () => {
      const flat = monthlySeries("flat", "temperature_anomaly", "K", 1950, 120, () => 0.2);
      const body = await assertProblem(
        await svc.post("/v1/lag-correlations", { solar, climate: flat, significance: "none" }),
        422,
      );
      assert.equal(body.errors[0].pointer, "/climate");
    });
    await t.step("surrogate count out of range", async () => {
      const body = await assertProblem(
        await svc.post("/v1/lag-correlations", { solar, climate, surrogates: 50 }),
        422,
      );
      assert.match(JSON.stringify(body.errors), /surrogates/);
    });
    await t.step("no overlap and fewer than 10 overlapping points", async () => {
      const late = monthlySeries("late", "temperature_anomaly", "K", 2100, 60, (i) => Math.sin(i));
      await assertProblem(await svc.post("/v1/lag-correlations", { solar, climate: late }), 422);
      const short = monthlySeries(
        "short",
        "temperature_anomaly",
        "K",
        1959,
        18,
        (i) => Math.sin(i),
      );
      // 1959-05..1960-06: 8 months overlap the solar series (which ends 1959-12)
      const late8 = { ...short, time: short.time.slice(4), value: short.value.slice(4) };
      const body = await assertProblem(
        await svc.post("/v1/lag-correlations", { solar, climate: late8, significance: "none" }),
        422,
      );
      assert.match(body.detail, /at least 10/);
    });
    await t.step("high-pass without a cutoff", async () => {
      const body = await assertProblem(
        await svc.post("/v1/lag-correlations", { solar, climate, preprocess: "high_pass" }),
        422,
      );
      assert.equal(body.errors[0].pointer, "/high_pass_cutoff_years");
    });
  } finally {
    await svc.close();
  }
});
