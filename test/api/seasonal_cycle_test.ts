/**
 * The seasonal cycle in the solar–climate analyses: R's nottem (absolute monthly temperatures
 * at one station, °F, 1920–1939; fixtures/datasets/PROVENANCE.md) against R's sunspot.month.
 * Left in, the annual cycle made a phase-surrogate test call a near-zero correlation
 * significant; removed by default for absolute temperatures, it is not, and the numbers equal
 * R's cor() on the deseasonalised, detrended series (fixtures/reference/seasonal_r.R).
 */
import assert from "node:assert/strict";
import { makeTestApp, type TestService, uploadSeries } from "./helpers.ts";
import { loadDataset } from "../core/cycles/load_dataset.ts";

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

async function result(svc: TestService, path: string, body: unknown): Promise<Json> {
  const res = await svc.post(path, body);
  const j = await res.json();
  assert.equal(res.status, 201, JSON.stringify(j).slice(0, 600));
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
