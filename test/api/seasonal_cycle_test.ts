/**
 * The seasonal cycle in the solar–climate analyses: R's nottem (absolute monthly temperatures
 * at one station, °F, 1920–1939; fixtures/datasets/PROVENANCE.md) against R's sunspot.month.
 * Left in, the annual cycle made a phase-surrogate test call a near-zero correlation
 * significant; removed by default for absolute temperatures, it is not, and the numbers equal
 * R's cor() on the deseasonalised, detrended series (fixtures/reference/seasonal_r.R).
 */
import assert from "node:assert/strict";
import type { ChartSpec, Layer } from "../../api/charts/chart.ts";
import { makeTestApp, type TestService, uploadSeries } from "./helpers.ts";
import { loadDataset } from "../core/cycles/load_dataset.ts";
import { attributionsChart } from "../../api/analyses/attributions/chart.ts";
import { AttributionResult } from "../../api/analyses/attributions/result.ts";

// deno-lint-ignore no-explicit-any
type Json = any;

const R = JSON.parse(
  Deno.readTextFileSync(new URL("../../fixtures/reference/seasonal_r.json", import.meta.url)),
);

async function upload(svc: TestService) {
  const ss = loadDataset("sunspot_month"), nt = loadDataset("nottem");
  const solar = await uploadSeries(svc, {
    name: "R sunspot.month",
    quantity: "sunspot_number",
    units: "1",
    version: "1",
    time: ss.date,
    value: ss.value,
  });
  const climate = await uploadSeries(svc, {
    name: "R nottem",
    quantity: "temperature",
    units: "degF",
    time: nt.date,
    value: nt.value,
  });
  return { solar, climate };
}

let lastId = "";

/** The result of a run, waiting for it when it went asynchronous (202). */
async function result(svc: TestService, path: string, body: unknown): Promise<Json> {
  const res = await svc.post(path, body);
  let j = await res.json();
  assert.ok(res.status === 201 || res.status === 202, JSON.stringify(j).slice(0, 600));
  if (res.status === 202) {
    await svc.runs.settle();
    j = await (await svc.get(`/v1/runs/${j.id}`)).json();
  }
  assert.equal(j.status, "succeeded", JSON.stringify(j).slice(0, 600));
  lastId = j.id;
  return j.result;
}

Deno.test("lag correlations remove the seasonal cycle of an absolute temperature by default", async () => {
  const svc = await makeTestApp();
  try {
    const { solar, climate } = await upload(svc);
    // before the fix (deseasonalise false, as every run was): best lag 36, r −0.093, analytic
    // p 0.61, Monte Carlo p 0.002, family-wise 0.018, "the Monte Carlo one is reliable"
    const raw = await result(svc, "/v1/lag-correlations", {
      solar,
      climate,
      deseasonalise: false,
    });
    assert.equal(raw.seasonal_cycle.deseasonalise, false);
    assert.equal(raw.best.lag, 36);
    assert.ok(raw.best.p_family_wise < 0.05 && raw.best.p_analytic > 0.5);
    // r is R's cor() over the overlap after a least-squares line (°F → K leaves r unchanged)
    for (const row of raw.lags) {
      const k = R.lags.indexOf(row.lag);
      assert.ok(Math.abs(row.r - R.r_raw[k]) < 1e-10, `raw r at lag ${row.lag}`);
    }
    // the verdict recommends no p-value a known confounder can produce
    assert.match(raw.which_to_trust, /^Trust none of the p-values/);
    assert.ok(raw.warnings.some((w: string) => /NOT removed/.test(w)));
    assert.ok(raw.warnings.some((w: string) => /Monte Carlo p-values cannot be trusted/.test(w)));
    assert.ok(!raw.warnings.some((w: string) => /reliable answer/.test(w)));
    const clim = raw.seasonal_cycle.series.find((s: Json) => s.input === "climate");
    assert.ok(Math.abs(clim.share - R.nottem_eta2) < 1e-9);
    assert.equal(clim.strong, true);

    // after: on by default for quantity temperature at monthly resolution
    const des = await result(svc, "/v1/lag-correlations", { solar, climate });
    assert.equal(des.seasonal_cycle.deseasonalise, true);
    assert.match(des.seasonal_cycle.reason, /^default: climate is temperature/);
    for (const row of des.lags) {
      const k = R.lags.indexOf(row.lag);
      assert.ok(Math.abs(row.r - R.r_deseasonalised[k]) < 1e-10, `r at lag ${row.lag}`);
    }
    assert.ok(des.best.p_family_wise > 0.3, `family-wise p ${des.best.p_family_wise}`);
    assert.match(des.which_to_trust, /^Trust the Monte Carlo p-values/);
    assert.ok(des.warnings.some((w: string) => /strong annual cycle.*was removed/.test(w)));
    assert.equal(des.outputs.climate_preprocessed.quantity, "temperature_anomaly");
    assert.match(des.outputs.climate_preprocessed.name, /monthly climatology and linear removed/);
    const removed = des.seasonal_cycle.series.find((s: Json) => s.input === "climate");
    // K = (°F − 32) × 5/9 + 273.15 applied to R's tapply(nottem, cycle(nottem), mean)
    removed.climatology.forEach((m: number, k: number) =>
      assert.ok(Math.abs(m - ((R.nottem_climatology_degF[k] - 32) * 5) / 9 - 273.15) < 1e-9)
    );
  } finally {
    await svc.close();
  }
});

Deno.test("deseasonalise: anomalies stay as they are; too short an overlap is a 422", async () => {
  const svc = await makeTestApp();
  try {
    const { solar } = await upload(svc);
    const nt = loadDataset("nottem");
    const anomaly = await uploadSeries(svc, {
      name: "nottem, not deseasonalised, declared an anomaly",
      quantity: "temperature_anomaly",
      units: "K",
      time: nt.date,
      value: nt.value.map((v) => ((v - 50) * 5) / 9),
    });
    // the default does not remove it, but the warning and the verdict still catch the cycle
    const r = await result(svc, "/v1/lag-correlations", { solar, climate: anomaly });
    assert.equal(r.seasonal_cycle.deseasonalise, false);
    assert.match(r.seasonal_cycle.reason, /no input is an absolute quantity/);
    assert.match(r.which_to_trust, /^Trust none/);
    // 20 months: a calendar month seen once cannot have its mean removed
    const res = await svc.post("/v1/lag-correlations", {
      solar,
      climate: { ...shortNottem(), name: "short" },
      max_lag: 3,
      significance: "none",
    });
    const p = await res.json();
    assert.equal(res.status, 422, JSON.stringify(p));
    assert.equal(p.errors[0].pointer, "/deseasonalise");
    assert.match(p.detail, /at least 2 values/);
    const ok = await result(svc, "/v1/lag-correlations", {
      solar,
      climate: { ...shortNottem(), name: "short" },
      max_lag: 3,
      significance: "none",
      deseasonalise: false,
    });
    assert.equal(ok.seasonal_cycle.deseasonalise, false);
  } finally {
    await svc.close();
  }
});

function shortNottem() {
  const nt = loadDataset("nottem");
  return {
    quantity: "temperature",
    units: "degF",
    time: nt.date.slice(0, 20),
    value: nt.value.slice(0, 20),
  };
}

Deno.test("attributions: the seasonal cycle and the solar lag search, before and after", async () => {
  const svc = await makeTestApp();
  try {
    const { solar, climate } = await upload(svc);
    const body = (extra: Record<string, unknown>) => ({
      climate,
      regressors: [{ name: "solar", series: solar, role: "solar", min_lag: 0, max_lag: 36 }],
      surrogates: 200,
      ...extra,
    });
    // before: lag 31, p 0.065 at the chosen lag as if fixed, the annual cycle left in
    const raw = await result(svc, "/v1/attributions", body({ deseasonalise: false }));
    assert.equal(raw.solar.lag, 31);
    assert.ok(Math.abs(raw.solar.lag_search_significance.p_naive - 0.0645) < 5e-4);
    assert.match(raw.solar.lag_search_significance.which_to_trust, /^Trust none/);
    assert.ok(raw.warnings.some((w: string) => /NOT removed/.test(w)));
    // after: the monthly climatology removed by default; the naive p-value of the chosen lag
    // (just under 0.05) does not survive paying for the search over 37 lags
    const des = await result(svc, "/v1/attributions", body({}));
    assert.equal(des.seasonal_cycle.deseasonalise, true);
    const ls = des.solar.lag_search_significance;
    assert.equal(ls.lags_searched, 37);
    assert.equal(ls.method, "phase");
    assert.ok(ls.p_naive < 0.05, `naive ${ls.p_naive}`);
    assert.ok(ls.p_search > 0.2, `search ${ls.p_search}`);
    assert.ok(ls.p_sidak >= ls.p_naive && ls.p_sidak <= 1);
    // Šidák 1967: 1 − (1 − p)^37
    assert.ok(Math.abs(ls.p_sidak - (1 - (1 - ls.p_naive) ** 37)) < 1e-12);
    assert.ok(ls.naive_p_for_5_percent < 0.05);
    assert.match(ls.which_to_trust, /^Use p_search/);
    assert.ok(des.warnings.some((w: string) => /significant only if its AIC-chosen lag/.test(w)));
    assert.equal(des.outputs.fitted.quantity, "temperature_anomaly");
    // the Šidák-only variant answers at once with the bound; a fixed lag has nothing to pay for
    const adjustedRun = lastId;
    const sidak = await result(svc, "/v1/attributions", body({ lag_search_test: "sidak" }));
    assert.equal(sidak.solar.lag_search_significance.p_search, null);
    assert.equal(sidak.solar.lag_search_significance.p_sidak, ls.p_sidak);
    assert.match(sidak.solar.lag_search_significance.which_to_trust, /^Use p_sidak/);
    const fixed = await result(svc, "/v1/attributions", {
      ...body({}),
      regressors: [{ name: "solar", series: solar, role: "solar", min_lag: 20, max_lag: 20 }],
    });
    assert.equal(fixed.solar.lag_search_significance.method, "fixed_lag");
    assert.equal(
      fixed.solar.lag_search_significance.p_sidak,
      fixed.solar.lag_search_significance.p_naive,
    );
    // the chart says which p-value is which, in the solar line's legend and in a note
    const run = await (await svc.get(`/v1/runs/${adjustedRun}`)).json();
    const chart = attributionsChart.build(
      run,
      AttributionResult.parse(run.result),
      [],
    ) as ChartSpec;
    const solarLine = chart.layers.find((l: Layer) =>
      l.type === "line" && /^solar/.test(l.label ?? "")
    );
    assert.match(solarLine!.label!, /paying for the lag search, 0\.0\d\d if the lag were fixed/);
    assert.ok(chart.notes!.some((n) => /naive \(chosen lag taken as fixed, too small\)/.test(n)));
  } finally {
    await svc.close();
  }
});

Deno.test("composites: the seasonal cycle is removed by default and warned about", async () => {
  const svc = await makeTestApp();
  try {
    const { climate } = await upload(svc);
    // cycle 16 and 17 minima and maxima (version 2 table dates; sunspot.month is version 1,
    // the dates agree to a few months)
    const body = {
      series: climate,
      epoch_dates: ["1923-08", "1928-04", "1933-09", "1937-04"],
      before_years: 2,
      after_years: 2,
      bootstrap: 200,
      random_sets: 200,
    };
    const raw = await result(svc, "/v1/composites", { ...body, deseasonalise: false });
    assert.ok(raw.warnings.some((w: string) => /random epochs cannot be trusted/.test(w)));
    const des = await result(svc, "/v1/composites", body);
    assert.equal(des.seasonal_cycle.deseasonalise, true);
    assert.ok(!des.warnings.some((w: string) => /cannot be trusted/.test(w)));
    assert.ok(des.warnings.some((w: string) => /strong annual cycle.*was removed/.test(w)));
    assert.equal(des.outputs.composite.quantity, "temperature_anomaly");
    // the composite of anomalies swings far less than that of the raw months (a 25 °F cycle)
    const span = (r: Json) => {
      const v = r.offsets.map((o: Json) => o.composite).filter((x: number | null) => x !== null);
      return Math.max(...v) - Math.min(...v);
    };
    assert.ok(span(des) < span(raw) / 2, `${span(des)} vs ${span(raw)}`);
  } finally {
    await svc.close();
  }
});
