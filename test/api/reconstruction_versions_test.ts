/**
 * The reconstruction with a sunspot series on another version than its model: R's
 * sunspot.month (version 1; fixtures/datasets/PROVENANCE.md) through the demo model (calibrated
 * on version 2), converted by a constant factor (the old request form) and by the published
 * time-dependent conversion. The per-cycle amplitude check compares each back-extended cycle
 * with what its sunspot amplitude implies and must fire for the constant factor only; cells
 * follow the coverage rule of core/series (2013 has 9 months in R's series: no annual cell).
 */
import assert from "node:assert/strict";
import { loadDemo } from "../../api/demo.ts";
import { makeTestApp, type TestService, uploadSeries } from "./helpers.ts";
import { demoIrradianceModel } from "./demo_inputs.ts";
import { loadDataset } from "../core/cycles/load_dataset.ts";
import { sunspotVersionFactor } from "../../core/series/mod.ts";

// deno-lint-ignore no-explicit-any
type Json = any;

async function setUp(svc: TestService) {
  const ss = loadDataset("sunspot_month");
  const spots = await uploadSeries(svc, {
    name: "R sunspot.month",
    quantity: "sunspot_number",
    units: "1",
    version: "1",
    time: ss.date,
    value: ss.value,
  });
  await loadDemo(svc.store);
  const { model } = await demoIrradianceModel(svc);
  return { spots, model: model.id as string };
}

async function reconstruct(svc: TestService, body: Record<string, unknown>): Promise<Json> {
  const res = await svc.post("/v1/irradiance/reconstructions", body);
  const j = await res.json();
  assert.equal(res.status, 201, JSON.stringify(j).slice(0, 600));
  return j.result;
}

Deno.test("reconstruction: published vs constant sunspot-version conversion, per-cycle amplitude check", async () => {
  const svc = await makeTestApp();
  try {
    const { spots, model } = await setUp(svc);
    const base = {
      model,
      sunspot_number: spots,
      period: { start: "1749", end: "2014" },
      resolution: "annual",
    };
    // no conversion: the hint names the published one
    const res = await svc.post("/v1/irradiance/reconstructions", base);
    const p = await res.json();
    assert.equal(res.status, 422);
    assert.equal(p.errors[0].pointer, "/sunspot_number");
    assert.match(p.detail, /\{"method": "published"\}/);

    // before: the old request form { factor }, still accepted as a constant factor
    const constant = await reconstruct(svc, { ...base, sunspot_conversion: { factor: 1 / 0.6 } });
    assert.match(constant.sunspot_conversion, /× 1\.666/);
    assert.ok(constant.warnings.some((w: string) => /applied across 1947/.test(w)));
    const c = constant.cycle_amplitude_check;
    assert.ok(c.reference_conversion.includes("published time-dependent conversion"));
    const judged = c.cycles.filter((x: Json) => x.from_sunspots);
    assert.equal(judged.length, c.cycles.length, "no direct proxies: every cycle is judged");
    for (const x of judged) {
      // V2/V1 is 1/0.6 before 1849 and in 1868–1946 (no step), 1.14/0.6 in 1849–1867 and
      // 1/(0.6 × 1.177) from 1947 (Clette & Lefèvre 2016, factors from memory)
      const f = sunspotVersionFactor(x.minimum_year + 0.5, "1", "2") * 0.6;
      const g = sunspotVersionFactor(x.maximum_year + 0.5, "1", "2") * 0.6;
      if (f === 1 && g === 1) assert.ok(Math.abs(x.ratio - 1) < 1e-9, JSON.stringify(x));
      if (x.minimum_year >= 1947) assert.ok(x.ratio > 1.05 && x.consistent === false);
    }
    const wolf = judged.find((x: Json) => x.minimum_year >= 1849 && x.maximum_year < 1868);
    assert.ok(wolf.ratio < 0.95 && wolf.consistent === false, JSON.stringify(wolf));
    const warning = constant.warnings.find((w: string) =>
      /from what their sunspot amplitudes/.test(w)
    );
    assert.ok(warning, JSON.stringify(constant.warnings));
    assert.match(warning, /1954–1957/);
    assert.match(c.compared, /what that cycle's sunspot amplitude implies/);

    // after: the published conversion; the check stays silent, every cycle agrees exactly
    const published = await reconstruct(svc, {
      ...base,
      sunspot_conversion: { method: "published" },
    });
    assert.match(published.sunspot_conversion, /published time-dependent factors/);
    assert.ok(!published.warnings.some((w: string) => /sunspot amplitudes imply/.test(w)));
    assert.ok(!published.warnings.some((w: string) => /applied across/.test(w)));
    assert.ok(published.warnings.some((w: string) => /pilot-station drift/.test(w)));
    for (const x of published.cycle_amplitude_check.cycles) {
      assert.ok(Math.abs(x.ratio - 1) < 1e-9 && x.consistent === true);
    }
    // the constant factor shifts TSI after 1947 upwards (issue: about +0.07 W m-2)
    const at = (r: Json, y: number) => r.outputs.tsi.value[r.outputs.tsi.time.indexOf(y + 0.5)];
    const diffs: number[] = [];
    for (let y = 1947; y <= 2012; y++) diffs.push(at(constant, y) - at(published, y));
    const mean = diffs.reduce((a, b) => a + b, 0) / diffs.length;
    assert.ok(mean > 0.03 && mean < 0.15, `mean shift ${mean}`);
    for (let y = 1870; y < 1947; y++) assert.equal(at(constant, y), at(published, y));

    // partial years: R's series ends 2013-09, nine months, short of the 10 an annual cell needs
    assert.equal(at(published, 2012) === null, false);
    assert.equal(at(published, 2013), null);
    const monthly = await reconstruct(svc, {
      ...base,
      period: { start: "2013-01", end: "2013-12" },
      resolution: "monthly",
      sunspot_conversion: { method: "published" },
    });
    assert.deepEqual(monthly.outputs.tsi.value.map((v: number | null) => v !== null), [
      ...Array(9).fill(true),
      ...Array(3).fill(false),
    ]);
  } finally {
    await svc.close();
  }
});

Deno.test("a reconstruction with empty cells serves as solar input; its partial year is no annual value", async () => {
  const svc = await makeTestApp();
  try {
    const { spots, model } = await setUp(svc);
    const rec = await (await svc.post("/v1/irradiance/reconstructions", {
      model,
      sunspot_number: spots,
      sunspot_conversion: { method: "published" },
      period: { start: "1950-01", end: "2013-12" },
      resolution: "monthly",
    })).json();
    assert.equal(rec.status, "succeeded");
    const years = Array.from({ length: 64 }, (_, i) => 1950 + i);
    const climate = {
      name: "invented annual anomaly",
      quantity: "temperature_anomaly",
      units: "K",
      time: years.map(String),
      value: years.map((y) => 0.1 * Math.sin(y * 1.3) + 0.01 * (y - 1950)),
    };
    const lc = await (await svc.post("/v1/lag-correlations", {
      solar_run: rec.id,
      climate,
      resolution: "annual",
      max_lag: 3,
      significance: "none",
    })).json();
    // before: the three empty months (null) made the alignment refuse the run's output
    assert.equal(lc.status, "succeeded", JSON.stringify(lc).slice(0, 400));
    assert.equal(lc.result.start_period, "1950");
    assert.equal(lc.result.end_period, "2012");
  } finally {
    await svc.close();
  }
});
