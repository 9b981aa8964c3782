import assert from "node:assert/strict";
import { assertProblem, makeTestApp, monthlySeries, uploadSeries } from "./helpers.ts";
import { smoothed13Month, toRegularGrid } from "../../core/cycles/mod.ts";
import { loadDataset } from "../core/cycles/load_dataset.ts";

// R's datasets::sunspot.month and sunspot.year (fixtures/datasets, PROVENANCE.md there), as
// uploads with ISO times; version 1 scale
function rSeries(name: "sunspot_month" | "sunspot_year") {
  const d = loadDataset(name);
  return {
    name: `R datasets ${name.replace("_", ".")}`,
    quantity: "sunspot_number",
    units: "1",
    version: "1",
    time: d.date,
    value: d.value,
  };
}

// invented demo record (fixtures/demo, SYNTHETIC, seed 31415), version 2
function demoSeries() {
  const lines = Deno.readTextFileSync(
    new URL("../../fixtures/demo/sunspot_number_monthly.csv", import.meta.url),
  ).split("\n").filter((l) => l && !l.startsWith("#"));
  const rows = lines.slice(1).map((l) => l.split(","));
  return {
    name: "SYNTHETIC demo monthly sunspot number",
    quantity: "sunspot_number",
    units: "1",
    version: "2",
    time: rows.map((r) => r[0]),
    value: rows.map((r) => Number(r[2])),
    uncertainty: rows.map((r) => Number(r[3])),
  };
}

const pointers = (body: { errors?: { pointer: string }[] }) =>
  (body.errors ?? []).map((e) => e.pointer);

Deno.test("POST /v1/smoothing: 13-month smoothing saved as a new series", async () => {
  const svc = await makeTestApp();
  try {
    const series = rSeries("sunspot_month");
    const res = await svc.post("/v1/smoothing", { series });
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run).slice(0, 400));
    const out = run.result.outputs.smoothed;
    const d = loadDataset("sunspot_month");
    const ref = smoothed13Month(toRegularGrid(d.time, d.value, "monthly").value);
    assert.equal(out.value.length, ref.length);
    assert.deepEqual(out.value.slice(0, 6), [null, null, null, null, null, null]);
    for (let i = 6; i < ref.length - 6; i++) assert.ok(Math.abs(out.value[i] - ref[i]) < 1e-9);
    // cycle 16 maximum 78.1 on the V1 scale (SCIENCE.md §4, C): 1928-04
    const k = d.date.indexOf("1928-04");
    assert.ok(Math.abs(out.value[k] - 78.1) < 0.15);
    assert.equal(run.saved_series.length, 1);
    assert.equal(run.saved_series[0].output, "smoothed");
    const saved = await (await svc.get(`/v1/series/${run.saved_series[0].id}`)).json();
    assert.equal(saved.derived_from ?? saved.series?.derived_from, run.id);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/smoothing: uncertainties propagate as independent errors", async () => {
  const svc = await makeTestApp();
  try {
    const series = demoSeries();
    const run = await (await svc.post("/v1/smoothing", { series })).json();
    assert.equal(run.status, "succeeded");
    const u = run.result.outputs.smoothed.uncertainty;
    // GUM (JCGM 100:2008) eq. 10 with zero correlation: √(Σ w² u²) / Σ w, 13-month weights
    const i = 600;
    let s2 = 0;
    for (let k = -6; k <= 6; k++) {
      const w = Math.abs(k) === 6 ? 0.5 : 1;
      s2 += w * w * series.uncertainty[i + k] ** 2;
    }
    assert.ok(Math.abs(u[i] - Math.sqrt(s2) / 12) < 1e-9);
    assert.equal(u[0], null);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/smoothing: running mean and Gaussian, odd and even windows", async () => {
  const svc = await makeTestApp();
  try {
    const series = monthlySeries("ramp", "other", "1", 2000, 60, (i) => 2 * i + 1);
    for (
      const body of [
        { series, method: "running_mean", window: 12 },
        { series, method: "running_mean", window: 5 },
        { series, method: "gaussian", sigma: 2 },
      ]
    ) {
      const res = await svc.post("/v1/smoothing", body);
      const run = await res.json();
      assert.equal(res.status, 201, JSON.stringify(run).slice(0, 300));
      // a linear ramp is unchanged where the window is complete (symmetric kernels)
      const v = run.result.outputs.smoothed.value;
      assert.ok(Math.abs(v[30] - 61) < 1e-9);
      assert.equal(v[0], null);
    }
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/smoothing: problems name the field", async (t) => {
  const svc = await makeTestApp();
  try {
    await t.step("a series too short for the window", async () => {
      const series = monthlySeries("short", "sunspot_number", "1", 2000, 10, (i) => i);
      const body = await assertProblem(await svc.post("/v1/smoothing", { series }), 422);
      assert.deepEqual(pointers(body), ["/series"]);
      assert.equal(body.window_points, 13);
      assert.equal(body.series_points, 10);
    });
    await t.step("13-month smoothing of an annual series", async () => {
      const body = await assertProblem(
        await svc.post("/v1/smoothing", { series: rSeries("sunspot_year") }),
        422,
      );
      assert.deepEqual(pointers(body), ["/method"]);
    });
    await t.step("gaps leave no complete window", async () => {
      const series = monthlySeries(
        "gappy",
        "sunspot_number",
        "1",
        2000,
        40,
        (i) => i % 5 === 0 ? null : i,
      );
      const body = await assertProblem(await svc.post("/v1/smoothing", { series }), 422);
      assert.deepEqual(pointers(body), ["/series"]);
      assert.ok(body.defined < 2, JSON.stringify(body));
    });
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/cycles: the cycle table of R's sunspot.month", async () => {
  const svc = await makeTestApp();
  try {
    const id = await uploadSeries(svc, rSeries("sunspot_month"));
    const res = await svc.post("/v1/cycles", {
      series: id,
      anchor: { cycle: 1, date: "1755-02" },
    });
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run).slice(0, 400));
    const r = run.result;
    assert.equal(r.cycles.length, 24);
    // SCIENCE.md §5 (C): cycle 19 began 1954-04, peaked 1958-03; cycle 24 began 2008-12
    const c19 = r.cycles.find((c: { number: number }) => c.number === 19);
    const d1954 = loadDataset("sunspot_month").date.indexOf("1954-06");
    assert.equal(c19.start.date, "1954-04");
    assert.equal(c19.maximum.date, "1958-03");
    const last = r.cycles[23];
    assert.equal(last.number, 24);
    assert.equal(last.in_progress, true);
    assert.equal(last.end, null);
    assert.equal(last.length_years, null);
    assert.equal(last.start.date, "2008-12");
    // mean cycle length near 11 years (common practice; SCIENCE.md §5 D: 11.03 on V2 minima)
    assert.ok(Math.abs(r.summary.length_years.mean - 11.03) < 0.1);
    assert.equal(r.summary.complete_cycles, 23);
    // default prominence: a tenth of the smoothed series' range (201.3 − 0.0 on V1)
    assert.ok(r.rule.prominence_default && Math.abs(r.rule.prominence - 20.13) < 0.05);
    const phase = r.outputs.phase.value;
    assert.equal(phase.length, r.outputs.smoothed.value.length);
    assert.ok(phase.every((p: number | null) => p === null || (p >= 0 && p < 1)));
    const cyc = r.outputs.cycle.value;
    assert.equal(cyc[d1954], 19);
    assert.equal(cyc[0], null); // 1749-01 precedes the first minimum (1755-02)
    assert.ok(r.cautions.length >= 1);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/cycles: problems and the quantity override", async (t) => {
  const svc = await makeTestApp();
  try {
    const cyc = (i: number) => 1361 + Math.cos((2 * Math.PI * i) / 132) * 0.5;
    const tsi = monthlySeries(
      "invented TSI",
      "tsi",
      "W m-2",
      1950,
      600,
      (i) => 1360.5 + cyc(i) - 1361,
    );
    await t.step("a non-sunspot quantity is refused", async () => {
      const body = await assertProblem(await svc.post("/v1/cycles", { series: tsi }), 422);
      assert.deepEqual(pointers(body), ["/series"]);
      assert.equal(body.quantity, "tsi");
    });
    await t.step("…unless explicitly allowed", async () => {
      const res = await svc.post("/v1/cycles", { series: tsi, allow_any_quantity: true });
      const run = await res.json();
      assert.equal(res.status, 201, JSON.stringify(run).slice(0, 300));
      assert.ok(run.result.cycles.length >= 4);
      for (const c of run.result.cycles.filter((x: { in_progress: boolean }) => !x.in_progress)) {
        assert.ok(Math.abs(c.length_years - 11) < 0.2);
      }
    });
    await t.step("a numbering anchor outside the series", async () => {
      const body = await assertProblem(
        await svc.post("/v1/cycles", {
          series: rSeries("sunspot_month"),
          anchor: { cycle: 1, date: "1700-01" },
        }),
        422,
      );
      assert.deepEqual(pointers(body), ["/anchor/date"]);
    });
    await t.step("a series too short for the 13-month window", async () => {
      const s = monthlySeries("short", "sunspot_number", "1", 2000, 12, (i) => i);
      const body = await assertProblem(await svc.post("/v1/cycles", { series: s }), 422);
      assert.deepEqual(pointers(body), ["/series"]);
    });
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/spectra: Lomb-Scargle of R's sunspot.year against scipy", async () => {
  // fixtures/reference/lomb_scargle_scipy.py (scipy 1.10.1): peak period 11.04 yr on the
  // grid linspace(1/150, 0.5, 2000) cycles/yr
  const ref = JSON.parse(
    Deno.readTextFileSync(
      new URL("../../fixtures/reference/lomb_scargle_scipy.json", import.meta.url),
    ),
  ).sunspot_year_even_grid;
  const svc = await makeTestApp();
  try {
    const res = await svc.post("/v1/spectra", {
      series: rSeries("sunspot_year"),
      periods: { min: 2, max: 150, count: 2000 },
      normalization: "psd",
      false_alarm: "monte_carlo",
      monte_carlo_null: "permutation",
      replicates: 40,
      seed: 5,
    });
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run).slice(0, 400));
    const r = run.result;
    assert.ok(Math.abs(r.dominant.period - ref.peak_period) < 1e-6);
    assert.ok(Math.abs(r.dominant.power - ref.peak_power_psd) / ref.peak_power_psd < 1e-9);
    assert.ok(r.dominant.period_uncertainty > 0 && r.dominant.period_uncertainty < 1);
    assert.equal(r.dominant.false_alarm_monte_carlo, 1 / 41);
    // same seed, same numbers
    const again = await (await svc.post("/v1/spectra", {
      series: rSeries("sunspot_year"),
      periods: { min: 2, max: 150, count: 2000 },
      normalization: "psd",
      false_alarm: "monte_carlo",
      monte_carlo_null: "permutation",
      replicates: 40,
      seed: 5,
    })).json();
    assert.deepEqual(again.result.false_alarm.levels, r.false_alarm.levels);
    // against red noise (AR(1) with the series' persistence) the 11-year peak still stands out
    // at its own period
    const red = await (await svc.post("/v1/spectra", {
      series: rSeries("sunspot_year"),
      periods: { min: 2, max: 150, count: 2000 },
      false_alarm: "both",
      replicates: 40,
      seed: 5,
    })).json();
    assert.equal(red.result.dominant.p_local_monte_carlo, 1 / 41);
    assert.ok(
      red.result.dominant.false_alarm_monte_carlo >= red.result.dominant.p_local_monte_carlo,
    );
    assert.match(red.result.false_alarm.null_hypothesis.monte_carlo, /AR\(1\)/);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/spectra: analytic false alarm, FFT, and empty grids", async (t) => {
  const svc = await makeTestApp();
  try {
    await t.step("Horne-Baliunas FAP of the 11-year peak is tiny", async () => {
      const run = await (await svc.post("/v1/spectra", { series: rSeries("sunspot_year") }))
        .json();
      const r = run.result;
      assert.ok(Math.abs(r.dominant.period - 11) < 0.6);
      assert.ok(r.dominant.false_alarm_analytic < 1e-6);
      assert.deepEqual(r.warnings, []); // default grid: from twice the spacing to the span
      // SCIENCE.md §7: M = −6.362 + 1.193 N + 0.00098 N² for N = 289
      assert.ok(
        Math.abs(
          r.false_alarm.independent_frequencies - (-6.362 + 1.193 * 289 + 0.00098 * 289 ** 2),
        ) < 1e-9,
      );
    });
    await t.step("FFT periodogram of the gap-free monthly series", async () => {
      const res = await svc.post("/v1/spectra", {
        series: rSeries("sunspot_month"),
        method: "fft",
        periods: { min: 5, max: 30 },
      });
      const run = await res.json();
      assert.equal(res.status, 201, JSON.stringify(run).slice(0, 300));
      assert.ok(Math.abs(run.result.dominant.period - 11) < 1);
    });
    await t.step("FFT of a gappy series is refused", async () => {
      const s = monthlySeries(
        "gappy",
        "sunspot_number",
        "1",
        1900,
        240,
        (i) => i === 50 ? null : 50 + 40 * Math.sin(i / 20),
      );
      const body = await assertProblem(
        await svc.post("/v1/spectra", { series: s, method: "fft" }),
        422,
      );
      assert.deepEqual(pointers(body), ["/method"]);
    });
    await t.step("an empty period grid", async () => {
      let body = await assertProblem(
        await svc.post("/v1/spectra", {
          series: rSeries("sunspot_year"),
          periods: { min: 20, max: 10 },
        }),
        422,
      );
      assert.deepEqual(pointers(body), ["/periods"]);
      body = await assertProblem(
        await svc.post("/v1/spectra", { series: rSeries("sunspot_year"), period_list: [] }),
        422,
      );
      assert.deepEqual(pointers(body), ["/period_list"]);
      body = await assertProblem(
        await svc.post("/v1/spectra", {
          series: rSeries("sunspot_year"),
          periods: { count: 0 },
        }),
        422,
      );
      assert.deepEqual(pointers(body), ["/periods/count"]);
    });
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/cycle-fits: shape parameters and the Waldmeier relation", async () => {
  const svc = await makeTestApp();
  try {
    const res = await svc.post("/v1/cycle-fits", {
      series: rSeries("sunspot_month"),
      anchor: { cycle: 1, date: "1755-02" },
    });
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run).slice(0, 400));
    const r = run.result;
    assert.equal(r.cycles.length, 23);
    for (const c of r.cycles) {
      assert.ok(c.a.value > 0 && c.b.value > 20 && c.b.value < 90, `cycle ${c.number}`);
      assert.ok(c.a.standard_error > 0 && c.a.standard_error_ar1 >= c.a.standard_error);
      assert.ok(c.r_squared > 0.5 && c.r_squared < 1, `cycle ${c.number}: R² ${c.r_squared}`);
      // the fitted maximum lies within two years of the observed smoothed one (measured: 1.6
      // years for the flat cycle 5, under a year for the others)
      assert.ok(
        Math.abs(
          c.maximum.decimal_year - (Number(c.observed.maximum_date.slice(0, 4)) +
            (Number(c.observed.maximum_date.slice(5, 7)) - 0.5) / 12),
        ) < 2,
        `cycle ${c.number}`,
      );
    }
    // Waldmeier effect: rise time falls with amplitude (Hathaway 2010 eq. 7)
    assert.ok(r.waldmeier.observed.correlation_rise_amplitude < -0.5);
    assert.ok(r.waldmeier.fitted.correlation_rise_amplitude < 0);
    assert.equal(r.outputs.fitted.value.length, r.outputs.fitted.time.length);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/cycle-fits: a non-sunspot quantity and too few minima", async () => {
  const svc = await makeTestApp();
  try {
    const body = await assertProblem(
      await svc.post("/v1/cycle-fits", {
        series: monthlySeries("t", "temperature_anomaly", "K", 1950, 300, (i) => Math.sin(i / 20)),
      }),
      422,
    );
    assert.deepEqual(pointers(body), ["/series"]);
    const one = monthlySeries(
      "one minimum",
      "sunspot_number",
      "1",
      2000,
      100,
      (i) => Math.abs(i - 50) + 1,
    );
    const b2 = await assertProblem(await svc.post("/v1/cycle-fits", { series: one }), 422);
    assert.deepEqual(pointers(b2), ["/series"]);
    assert.equal(b2.complete_cycles, 0);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/cycle-forecasts: the demo's cycle in progress, band and hindcast", async () => {
  const svc = await makeTestApp({ config: { asyncSeconds: 1000 } });
  try {
    const manifest = JSON.parse(
      Deno.readTextFileSync(new URL("../../fixtures/demo/manifest.json", import.meta.url)),
    );
    const truth = manifest.truth.cycles.list.at(-1); // the cycle in progress (SYNTHETIC)
    const res = await svc.post("/v1/cycle-forecasts", {
      series: demoSeries(),
      replicates: 100,
      hindcast_replicates: 40,
      seed: 11,
    });
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run).slice(0, 400));
    const r = run.result;
    assert.equal(r.cycle_in_progress.in_progress, true);
    assert.ok(r.cycle_in_progress.months_observed >= 60);
    const m = r.forecast.maximum;
    assert.ok(m.value_interval[0] <= m.value && m.value <= m.value_interval[1]);
    // the empirical interval from past errors at the same phase brackets the forecast too
    const hi = m.hindcast_interval;
    assert.ok(hi.cases >= 20);
    assert.ok(hi.value_interval[0] <= hi.value_interval[1]);
    // recovery (invented data): the predicted maximum is near the true one of the manifest
    assert.ok(Math.abs(m.value / truth.maximum_v2 - 1) < 0.15, `${m.value} vs ${truth.maximum_v2}`);
    assert.ok(Math.abs(m.decimal_year - truth.peak_decimal_year) < 0.5);
    // hindcast errors are reported at the same phase and at mid-rise
    for (const h of [r.hindcast.same_phase, r.hindcast.mid_rise]) {
      assert.ok(h.summary.cases >= 20);
      assert.ok(Number.isFinite(h.summary.maximum_value.rmse));
      assert.ok(Number.isFinite(h.summary.maximum_time_years.mean_absolute_error));
    }
    assert.ok(r.forecast.next_minimum.decimal_year > r.cycle_in_progress.start.decimal_year + 8);
    const out = r.outputs.forecast;
    assert.equal(out.lower.length, out.time.length);
    assert.match(out.interval, /90 %/);
    assert.ok(r.cautions.some((c: string) => /hindcast/.test(c)));
    // the demo's maximum (2024-04, manifest) is already observed: the predictive interval of
    // the smoothed maximum has collapsed onto the observed smoothed maximum
    const so = m.smoothed_observation;
    assert.ok(so.value_interval[0] <= so.value_interval[1]);
    assert.ok(Math.abs(so.decimal_year_interval[0] - truth.peak_decimal_year) < 0.5);
    // past cycles at the same phase: coverage of the predictive interval is reported per case
    const cs = r.hindcast.same_phase.cases;
    assert.ok(
      cs.every((c: { covered: { value: boolean } }) => typeof c.covered.value === "boolean"),
    );
    assert.ok(r.hindcast.same_phase.summary.maximum_value.coverage >= 0.7);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/cycle-forecasts: too few months into the cycle in progress", async () => {
  const svc = await makeTestApp({ config: { asyncSeconds: 1000 } });
  try {
    // invented: three 11-year cosine cycles, the record ending 10 months after the last
    // minimum; a low prominence lets that minimum be found from 4 smoothed months (it rises
    // 0.76 in the 3 months after it)
    const n = 3 * 132 + 66 + 10;
    const s = monthlySeries(
      "invented",
      "sunspot_number",
      "1",
      1950,
      n,
      (i) => 80 - 75 * Math.cos((2 * Math.PI * (i - 66)) / 132),
    );
    const body = await assertProblem(
      await svc.post("/v1/cycle-forecasts", { series: s, prominence: 0.5 }),
      422,
    );
    assert.deepEqual(pointers(body), ["/series"]);
    assert.equal(body.months_observed, 10);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/spectra: a large grid in parallel chunks gives the same numbers on 0 and 2 workers", async () => {
  // 3,177 months × 2,000 periods is above the parallel threshold (4e6 point-frequencies)
  const body = {
    series: rSeries("sunspot_month"),
    periods: { min: 0.5, max: 100, count: 2000 },
  };
  const one = await makeTestApp({ config: { asyncSeconds: 1000 } });
  const two = await makeTestApp({ workers: 2, config: { asyncSeconds: 1000 } });
  try {
    const a = await (await one.post("/v1/spectra", body)).json();
    const b = await (await two.post("/v1/spectra", body)).json();
    assert.equal(a.status, "succeeded");
    assert.deepEqual(a.result.periodogram.power, b.result.periodogram.power);
    assert.equal(a.result_digest, b.result_digest);
    assert.ok(Math.abs(a.result.dominant.period - 11) < 0.6);
  } finally {
    await one.close();
    await two.close();
  }
});

Deno.test("POST /v1/cycles: yearly values of R's sunspot.year, unsmoothed", async () => {
  const svc = await makeTestApp();
  try {
    const run = await (await svc.post("/v1/cycles", {
      series: rSeries("sunspot_year"),
      anchor: { cycle: 1, date: 1755 },
    })).json();
    assert.equal(run.status, "succeeded");
    const r = run.result;
    assert.equal(r.smoothing, "none");
    // SCIENCE.md §5 minima (C) by year: cycle 1 1755, 10 1855-12 (yearly minimum 1856), 19 1954
    const start = (k: number) =>
      r.cycles.find((c: { number: number }) => c.number === k).start.date;
    assert.equal(start(1), "1755");
    assert.ok(["1855", "1856"].includes(start(10)));
    assert.equal(start(19), "1954");
    assert.ok(Math.abs(r.summary.length_years.mean - 11) < 0.3); // common practice
    const bad = await assertProblem(
      await svc.post("/v1/cycles", { series: rSeries("sunspot_year"), smoothing: "13_month" }),
      422,
    );
    assert.deepEqual(pointers(bad), ["/smoothing"]);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/cycle-forecasts: cycle 24 forecast from R's sunspot.month, checked against its published maximum", async () => {
  // R's series ends 2013-09, before cycle 24's smoothed maximum of 2014-04 (SCIENCE.md §5, C;
  // 116.4 on V2, about 116.4 / 1.41 = 82 on R's V1 scale by the post-1947 ratio of §4, D).
  // The empirical interval from same-phase hindcast errors contains both; the bootstrap band,
  // which the run warns is too narrow at this phase, does not have to.
  const svc = await makeTestApp({ config: { asyncSeconds: 1000 } });
  try {
    const run = await (await svc.post("/v1/cycle-forecasts", {
      series: rSeries("sunspot_month"),
      anchor: { cycle: 1, date: "1755-02" },
      replicates: 60,
      hindcast_replicates: 30,
    })).json();
    assert.equal(run.status, "succeeded");
    const r = run.result;
    assert.equal(r.cycle_in_progress.number, 24);
    const hi = r.forecast.maximum.hindcast_interval;
    const published = 2014 + (3 + 0.5) / 12; // mid-April 2014
    assert.ok(
      hi.decimal_year_interval[0] <= published && published <= hi.decimal_year_interval[1],
      JSON.stringify(hi),
    );
    const v1 = 116.4 / (1 / (0.6 * 1.18));
    assert.ok(hi.value_interval[0] <= v1 && v1 <= hi.value_interval[1], JSON.stringify(hi));
    // next minimum from the mean cycle length: cycle 25 began 2019-12 (SCIENCE.md §5, C)
    assert.ok(Math.abs(r.forecast.next_minimum.decimal_year - (2019 + 11.5 / 12)) < 1);
  } finally {
    await svc.close();
  }
});

Deno.test("POST /v1/cycle-forecasts: the same digest on 0 and 2 workers", async () => {
  const body = {
    series: rSeries("sunspot_month"),
    replicates: 20,
    hindcast_replicates: 20,
    seed: 3,
  };
  const one = await makeTestApp({ config: { asyncSeconds: 1000 } });
  const two = await makeTestApp({ workers: 2, config: { asyncSeconds: 1000 } });
  try {
    const a = await (await one.post("/v1/cycle-forecasts", body)).json();
    const b = await (await two.post("/v1/cycle-forecasts", body)).json();
    assert.equal(a.status, "succeeded");
    assert.equal(a.result_digest, b.result_digest);
    assert.deepEqual(a.result.hindcast, b.result.hindcast);
  } finally {
    await one.close();
    await two.close();
  }
});
