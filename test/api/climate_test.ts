import assert from "node:assert/strict";
import {
  assertProblem,
  inventedAttributionRequest,
  makeTestApp,
  monthlySeries,
} from "./helpers.ts";
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
      assert.ok(body.errors.some((e: { pointer: string }) => e.pointer === "/surrogates"));
    });
    await t.step("no overlap and fewer than 10 overlapping points", async () => {
      const late = monthlySeries("late", "temperature_anomaly", "K", 2100, 60, (i) => Math.sin(i));
      const none = await assertProblem(
        await svc.post("/v1/lag-correlations", { solar, climate: late }),
        422,
      );
      assert.equal(none.errors[0].pointer, "/climate");
      assert.equal(none.reason, "no_overlap");
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
      assert.equal(body.errors[0].pointer, "/climate");
      assert.equal(body.periods, 8);
      assert.equal(body.min_periods, 10);
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

Deno.test("POST /v1/attributions recovers an invented solar sensitivity and lag", async () => {
  const svc = await makeTestApp();
  try {
    const body = inventedAttributionRequest({ n: 480, startYear: 1900, trendPerMonth: 0.001 });
    const res = await svc.post("/v1/attributions", body);
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run).slice(0, 600));
    const r = run.result;
    assert.equal(r.lags.solar, 6);
    assert.equal(r.lags.enso, 2);
    assert.equal(r.lag_search, "exhaustive");
    assert.equal(r.lag_grid.aic.length, 13 * 7);
    assert.deepEqual(r.lag_grid.regressors, ["solar", "enso", "trend"]);
    // within 3 standard errors (a 95 % interval misses the truth in 1 case of 20; this noise
    // realisation correlates −0.08 with the solar term, numpy lstsq on the same design agrees)
    const sc = r.coefficients.find((c: { name: string }) => c.name === "solar");
    assert.ok(Math.abs(sc.estimate - 0.1) < 3 * sc.standard_error, JSON.stringify(sc));
    assert.equal(r.solar.sensitivity_units, "K per W m-2");
    // peak-to-trough of the invented TSI is 1 W m-2 → about 0.1 K
    assert.ok(Math.abs(r.solar.max_minus_min - 0.1) < 0.03, `max-min ${r.solar.max_minus_min}`);
    assert.equal(r.lag_surface.length, 3);
    assert.ok(run.result.outputs.contribution_solar.value.length === r.n);
    assert.ok(r.cautions.some((c: string) => /before 1978/.test(c)));
    // a real response survives paying for the search over 13 solar lags: no surrogate of 100
    // reaches its p-value
    const ls = r.solar.lag_search_significance;
    assert.equal(ls.method, "phase");
    assert.equal(ls.lags_searched, 13);
    assert.equal(ls.p_search, 1 / 101);
    assert.equal(ls.p_naive, sc.p_value);
    assert.match(ls.which_to_trust, /enso in `coefficients` are naive/);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/attributions rejects more regressors than the data can carry", async () => {
  const svc = await makeTestApp();
  try {
    const n = 40;
    const regressors = Array.from({ length: 4 }, (_, k) => ({
      name: `x${k}`,
      series: monthlySeries(`x${k}`, "other", "1", 2000, n, (i) => Math.sin(i * (k + 1) * 0.7)),
    }));
    const climate = monthlySeries("t", "temperature_anomaly", "K", 2000, n, (i) => Math.cos(i));
    const body = await assertProblem(
      await svc.post("/v1/attributions", { climate, regressors }),
      422,
    );
    assert.equal(body.errors[0].pointer, "/regressors");
    // 4 regressors, the trend and the intercept need 60 observations (10 per coefficient)
    assert.equal(body.coefficients, 6);
    assert.equal(body.observations, 40);
    const dup = await assertProblem(
      await svc.post("/v1/attributions", {
        climate,
        regressors: [regressors[0], { ...regressors[1], name: "x0" }],
      }),
      422,
    );
    assert.equal(dup.errors[0].pointer, "/regressors/1/name");
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/composites finds an invented response after given epochs", async () => {
  const svc = await makeTestApp();
  try {
    const st = randomStream(5, 0);
    const years = Array.from({ length: 150 }, (_, i) => 1850 + i);
    const epochs = [1860, 1871, 1883, 1894, 1905, 1917, 1928, 1939, 1950, 1961, 1972, 1983];
    const v = years.map((y) =>
      0.1 * st.normal() + (epochs.some((e) => y - e >= 1 && y - e <= 2) ? 0.3 : 0)
    );
    const series = {
      name: "invented annual station",
      quantity: "temperature_anomaly",
      units: "K",
      time: years.map(String),
      value: v,
    };
    const res = await svc.post("/v1/composites", {
      series,
      epoch_dates: epochs.map(String),
      before_years: 3,
      after_years: 4,
      bootstrap: 300,
      random_sets: 300,
      preprocess: "mean",
    });
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run).slice(0, 600));
    const r = run.result;
    assert.equal(r.resolution, "annual");
    assert.equal(r.offsets.length, 8);
    const at = (o: number) => r.offsets.find((x: { offset: number }) => x.offset === o);
    assert.ok(at(1).composite > 0.2 && at(2).composite > 0.2);
    assert.ok(at(1).band_lower > 0.1);
    assert.ok(r.p_family_wise < 0.01);
    assert.equal(r.epochs_used.length, 12);
    // fewer than two epochs inside the series
    const bad = await assertProblem(
      await svc.post("/v1/composites", { series, epoch_dates: ["1700", "1851"], before_years: 3 }),
      422,
    );
    assert.equal(bad.errors[0].pointer, "/epoch_dates");
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/energy-balance matches the analytic sinusoid response (one- and two-box)", async () => {
  const svc = await makeTestApp();
  try {
    for (const model of ["one_box", "two_box"]) {
      const res = await svc.post("/v1/energy-balance", { model, sinusoid: {} });
      const run = await res.json();
      assert.equal(res.status, 201, JSON.stringify(run).slice(0, 600));
      const r = run.result;
      assert.ok(Math.abs(r.sinusoid_numerical.relative_difference_amplitude) < 1e-4);
      assert.ok(Math.abs(r.sinusoid_numerical.relative_difference_lag) < 1e-4);
      if (model === "one_box") {
        // derived from the one-box steady state: λ = 1.3, C = 8 → 0.0374 K peak to peak, 2.26 yr
        assert.ok(Math.abs(r.sinusoid_analytic.peak_to_peak_k - 0.0374) < 5e-5);
        assert.ok(Math.abs(r.sinusoid_analytic.lag_years - 2.26) < 5e-3);
      }
    }
    // a forcing series: constant 1.3 W m-2 from rest approaches F/λ = 1 K
    const forcing = monthlySeries("step", "radiative_forcing", "W m-2", 1900, 1200, () => 1.3);
    const run = await (await svc.post("/v1/energy-balance", { forcing })).json();
    const T = run.result.outputs.temperature.value;
    assert.ok(Math.abs(T[T.length - 1] - 1) < 1e-4);
    await assertProblem(await svc.post("/v1/energy-balance", { forcing, sinusoid: {} }), 422);
    const tsi = monthlySeries("tsi", "tsi", "W m-2", 1900, 24, () => 1361);
    const wrong = await assertProblem(await svc.post("/v1/energy-balance", { forcing: tsi }), 422);
    assert.equal(wrong.errors[0].pointer, "/forcing");
  } finally {
    await svc.close();
  }
});

/** A demo CSV (fixtures/demo) as an inline series. */
async function demoSeries(
  file: string,
  column: string,
  meta: { name: string; quantity: string; units: string; version?: string },
  from = "",
) {
  const text = await Deno.readTextFile(new URL(`../../fixtures/demo/${file}`, import.meta.url));
  const lines = text.split("\n").filter((l) => l && !l.startsWith("#"));
  const head = lines[0].split(",");
  const ci = head.indexOf(column), di = head.indexOf("date");
  const rows = lines.slice(1).map((l) => l.split(",")).filter((c) => c[di] >= from);
  return { ...meta, time: rows.map((c) => c[di]), value: rows.map((c) => Number(c[ci])) };
}

Deno.test("demo scenario: attribution recovers the solar sensitivity and lag; composites run on a cycle table", async () => {
  // invented data (fixtures/demo, seed 31415); truth in fixtures/demo/manifest.json
  const truth = JSON.parse(
    await Deno.readTextFile(new URL("../../fixtures/demo/manifest.json", import.meta.url)),
  ).truth.temperature;
  const svc = await makeTestApp();
  try {
    const temp = await demoSeries("temperature_anomaly_monthly.csv", "temperature_anomaly", {
      name: "SYNTHETIC station temperature",
      quantity: "temperature_anomaly",
      units: "K",
    });
    const tsi = await demoSeries("tsi_monthly_composite.csv", "tsi", {
      name: "SYNTHETIC TSI composite",
      quantity: "tsi",
      units: "W m-2",
    }, "1860");
    const enso = await demoSeries("enso_index_monthly.csv", "enso_index", {
      name: "SYNTHETIC ENSO-like index",
      quantity: "enso_index",
      units: "1",
    });
    const aod = await demoSeries("aerosol_optical_depth_monthly.csv", "aod", {
      name: "SYNTHETIC aerosol optical depth",
      quantity: "aerosol_optical_depth",
      units: "1",
    });
    const res = await svc.post("/v1/attributions", {
      climate: temp,
      regressors: [
        { name: "solar", role: "solar", series: tsi, min_lag: 0, max_lag: 24 },
        { name: "enso", role: "enso", series: enso, min_lag: 0, max_lag: 6 },
        { name: "volcanic", role: "volcanic", series: aod, min_lag: 0, max_lag: 12 },
      ],
      lag_search_test: "sidak",
    });
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run).slice(0, 600));
    const s = run.result.solar;
    assert.equal(s.lag, truth.lag_solar_months);
    assert.ok(
      s.lag_support[0] <= truth.lag_solar_months && truth.lag_solar_months <= s.lag_support[1],
    );
    const k = truth.solar_sensitivity_k_per_w_m2;
    assert.ok(s.sensitivity_ci[0] < k && k < s.sensitivity_ci[1], JSON.stringify(s));
    assert.equal(s.max_minus_min_units, "K");
    // the scenario's TSI cycles span 0.7–1.25 W m-2, so about 0.07–0.13 K
    assert.ok(s.max_minus_min > 0.05 && s.max_minus_min < 0.2, `max-min ${s.max_minus_min} K`);

    const sunspots = await demoSeries("sunspot_number_monthly.csv", "sunspot_number", {
      name: "SYNTHETIC sunspot number",
      quantity: "sunspot_number",
      units: "1",
      version: "2",
    }, "1850");
    const cyc = await (await svc.post("/v1/cycles", { series: sunspots })).json();
    assert.equal(cyc.status, "succeeded", JSON.stringify(cyc).slice(0, 400));
    const comp = await svc.post("/v1/composites", {
      series: temp,
      cycle_run: cyc.id,
      cycle_epoch: "maximum",
      before_years: 3,
      after_years: 5,
      bootstrap: 200,
      random_sets: 200,
    });
    const cr = await comp.json();
    assert.equal(comp.status, 201, JSON.stringify(cr).slice(0, 600));
    assert.ok(cr.result.epochs_used.length >= 10);
    assert.equal(cr.result.offsets.length, 3 * 12 + 5 * 12 + 1);
    assert.ok(cr.result.p_family_wise > 0 && cr.result.p_family_wise <= 1);
    assert.deepEqual(cr.input_runs, [cyc.id]);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/energy-balance runs on a /v1/forcing run's output", async () => {
  const svc = await makeTestApp();
  try {
    // invented TSI: an 11-year sinusoid of 1 W m-2 peak to peak around 1361 W m-2, monthly
    const tsi = monthlySeries(
      "invented tsi",
      "tsi",
      "W m-2",
      1900,
      1320,
      (i) => 1361 + 0.5 * Math.sin((2 * Math.PI * i) / 132),
    );
    const f = await (await svc.post("/v1/forcing", {
      tsi,
      reference: { kind: "period", period: { start: "1900", end: "2009" } },
    })).json();
    assert.equal(f.status, "succeeded", JSON.stringify(f).slice(0, 400));
    const res = await svc.post("/v1/energy-balance", { forcing_run: f.id });
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run).slice(0, 400));
    assert.deepEqual(run.input_runs, [f.id]);
    // after the transient, the response swings about 2 · 0.08875 · gain peak to peak
    const T: number[] = run.result.outputs.temperature.value;
    const last = T.slice(-264);
    const pp = Math.max(...last) - Math.min(...last);
    assert.ok(
      Math.abs(pp - run.result.sinusoid_analytic.gain_k_per_w_m2 * 2 * 0.08875) < 0.003,
      `pp ${pp}`,
    );
    // a run without a forcing output
    const wrong = await assertProblem(
      await svc.post("/v1/energy-balance", { forcing_run: run.id }),
      422,
    );
    assert.equal(wrong.errors[0].pointer, "/forcing_run");
  } finally {
    await svc.close();
  }
});

Deno.test("lag correlations and attributions take the solar series from a forcing run", async () => {
  const svc = await makeTestApp();
  try {
    const st = randomStream(31, 0);
    const n = 600;
    const tsiv = Array.from(
      { length: n },
      (_, i) => 1361 + 0.5 * Math.sin((2 * Math.PI * i) / 132) + 0.2 * st.normal(),
    );
    const tsi = monthlySeries("invented tsi", "tsi", "W m-2", 1900, n, (i) => tsiv[i]);
    const f = await (await svc.post("/v1/forcing", {
      tsi,
      reference: { kind: "period", period: { start: "1900", end: "1949" } },
    })).json();
    assert.equal(f.status, "succeeded", JSON.stringify(f).slice(0, 300));
    let e = 0;
    const climate = monthlySeries("invented station", "temperature_anomaly", "K", 1900, n, (i) => {
      e = 0.5 * e + 0.02 * st.normal();
      return 0.5 * (i >= 8 ? tsiv[i - 8] - 1361 : 0) * 0.1775 + e;
    });
    const lc = await (await svc.post("/v1/lag-correlations", {
      solar_run: f.id,
      climate,
      max_lag: 24,
      surrogates: 100,
    })).json();
    assert.equal(lc.status, "succeeded", JSON.stringify(lc).slice(0, 300));
    assert.equal(lc.result.best.lag, 8);
    assert.deepEqual(lc.input_runs, [f.id]);
    const at = await (await svc.post("/v1/attributions", {
      climate,
      regressors: [{ name: "solar", role: "solar", run: f.id, min_lag: 0, max_lag: 24 }],
      surrogates: 100,
    })).json();
    assert.equal(at.status, "succeeded", JSON.stringify(at).slice(0, 300));
    assert.equal(at.result.solar.lag, 8);
    assert.equal(at.result.solar.sensitivity_units, "K per W m-2");
    const both = await assertProblem(
      await svc.post("/v1/lag-correlations", { solar: tsi, solar_run: f.id, climate }),
      422,
    );
    assert.equal(both.errors[0].pointer, "/solar");
  } finally {
    await svc.close();
  }
});
