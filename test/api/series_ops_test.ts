import assert from "node:assert/strict";
import { assertProblem, makeTestApp, monthlySeries, uploadSeries } from "./helpers.ts";
import { parseIsoTime } from "../../core/time/mod.ts";

function dailyJson(name: string, y0: number, y1: number, f: (i: number) => number | null) {
  const time: string[] = [], value: (number | null)[] = [];
  let i = 0;
  for (let t = Date.UTC(y0, 0, 1); t < Date.UTC(y1 + 1, 0, 1); t += 86_400_000, i++) {
    time.push(new Date(t).toISOString().slice(0, 10));
    value.push(f(i));
  }
  return { name, quantity: "sunspot_area", units: "MSH", time, value };
}

Deno.test("POST /v1/resampling: monthly means with the 20-day rule, gaps reported, output saved", async () => {
  const svc = await makeTestApp();
  // 2001: every day has value = day index; March 2001 keeps only 10 days
  const s = dailyJson("Probe areas", 2001, 2001, (i) => (i >= 59 + 10 && i < 90 ? null : i));
  const res = await svc.post("/v1/resampling", { series: s, to: "monthly" });
  const run = await res.json();
  assert.equal(res.status, 201, JSON.stringify(run));
  const r = run.result;
  assert.equal(run.params.min_days_per_month, 20);
  assert.equal(r.periods, 12);
  assert.equal(r.gaps, 1);
  const mar = r.coverage[2];
  assert.deepEqual([mar.period, mar.count, mar.required, mar.covered], ["2001-03", 10, 20, false]);
  assert.equal(r.outputs.resampled.value[2], null);
  // January: mean of 0..30 = 15; units were rewritten to the canonical "1e-6"
  assert.equal(r.outputs.resampled.value[0], 15);
  assert.equal(r.outputs.resampled.units, "1e-6");
  assert.equal(r.outputs.resampled.time[0], parseIsoTime("2001-01").decimalYear);
  assert.match(r.warnings[0], /1 of 12 monthly periods failed the coverage rule/);
  // the output was saved as a series derived from the run (11 covered months)
  const list = await (await svc.get("/v1/series")).json();
  const saved = list.items.find((x: { derived_from: string | null }) => x.derived_from === run.id);
  assert.ok(saved, "auto-saved output");
  assert.equal(saved.n, 11);
  assert.equal(saved.resolution, "monthly");
  await svc.close();
});

Deno.test("POST /v1/resampling: a finer target is a 422 naming /to, and nothing is stored", async () => {
  const svc = await makeTestApp();
  const id = await uploadSeries(svc, monthlySeries("m", "other", "1", 2000, 24, (i) => i));
  const before = (await (await svc.get("/v1/series")).json()).total;
  const body = await assertProblem(
    await svc.post("/v1/resampling", { series: id, to: "daily" }),
    422,
  );
  assert.equal(body.errors[0].pointer, "/to");
  assert.equal(body.reason, "unsupported");
  assert.equal((await (await svc.get("/v1/series")).json()).total, before);
  const bad = await assertProblem(
    await svc.post("/v1/resampling", { series: id, to: "annual", min_months_per_year: 13 }),
    422,
  );
  assert.equal(bad.errors[0].pointer, "/min_months_per_year");
  await svc.close();
});

Deno.test("POST /v1/anomalies: base period mean and monthly climatology", async () => {
  const svc = await makeTestApp();
  // temperature with a seasonal cycle 2·m and +0.01 K per month; base 2001..2002
  const temps = monthlySeries(
    "Probe station",
    "temperature",
    "K",
    2000,
    48,
    (i) => 280 + 2 * (i % 12) + 0.01 * i,
  );
  const res = await svc.post("/v1/anomalies", {
    series: temps,
    base: { start: "2001", end: "2002" },
  });
  const run = await res.json();
  assert.equal(res.status, 201, JSON.stringify(run));
  const r = run.result;
  assert.equal(r.base.climatology, "monthly");
  assert.equal(r.base.start_date, "2001-01-01");
  assert.equal(r.base.last_date, "2002-12-31");
  assert.equal(r.base.means.length, 12);
  // January base mean: months 12 and 24 → 280 + 0.01·18 = 280.18
  assert.ok(Math.abs(r.base.means[0].mean - 280.18) < 1e-9);
  assert.equal(r.base.means[0].count, 2);
  assert.equal(r.outputs.anomalies.quantity, "temperature_anomaly");
  // month i has anomaly 0.01·i − (January base mean − 280) = 0.01·i − 0.18 for January 2000
  assert.ok(Math.abs(r.outputs.anomalies.value[0] + 0.18) < 1e-9);
  const mean = await (await svc.post("/v1/anomalies", {
    series: run.params.series,
    base: { start: 2001, end: 2003 },
    climatology: "mean",
  })).json();
  assert.equal(mean.result.base.means.length, 1);
  assert.equal(mean.result.base.means[0].count, 24);
  await svc.close();
});

Deno.test("POST /v1/anomalies: a base period without data is a 422 and stores nothing", async () => {
  const svc = await makeTestApp();
  const id = await uploadSeries(
    svc,
    monthlySeries("m", "temperature_anomaly", "K", 2000, 24, (i) => i),
  );
  const runsBefore = (await (await svc.get("/v1/runs")).json()).total;
  const body = await assertProblem(
    await svc.post("/v1/anomalies", { series: id, base: { start: "1961", end: "1990" } }),
    422,
  );
  assert.equal(body.errors[0].pointer, "/base");
  assert.equal(body.reason, "no_overlap");
  const bad = await assertProblem(
    await svc.post("/v1/anomalies", { series: id, base: { start: "1961-13", end: "1990" } }),
    422,
  );
  assert.equal(bad.errors[0].pointer, "/base/start");
  assert.equal((await (await svc.get("/v1/runs")).json()).total, runsBefore);
  await svc.close();
});

Deno.test("POST /v1/alignments: daily and monthly onto a monthly axis, drops reported", async () => {
  const svc = await makeTestApp();
  const daily = dailyJson("Probe areas", 2001, 2001, (i) => i);
  const monthly = monthlySeries("Probe index", "facular_index", "1", 2000, 36, (i) => i);
  const res = await svc.post("/v1/alignments", { series: [daily, monthly] });
  const run = await res.json();
  assert.equal(res.status, 201, JSON.stringify(run));
  const r = run.result;
  assert.equal(r.resolution, "monthly");
  assert.equal(r.n, 12);
  assert.equal(r.start_period, "2001-01");
  assert.equal(r.inputs[1].dropped_outside_span, 24);
  assert.deepEqual(r.coverage[1].counts, [28, 1]);
  assert.deepEqual(r.outputs.aligned_1.value, Array.from({ length: 12 }, (_, k) => 12 + k));
  assert.match(r.warnings[0], /series 1 \(Probe index\): 24 covered monthly period\(s\) dropped/);
  const derived = (await (await svc.get("/v1/series?limit=50")).json()).items.filter((
    x: { derived_from: string | null },
  ) => x.derived_from === run.id);
  assert.equal(derived.length, 2);
  // coarser input than the requested axis
  const bad = await assertProblem(
    await svc.post("/v1/alignments", { series: [daily, monthly], resolution: "daily" }),
    422,
  );
  assert.equal(bad.errors[0].pointer, "/series/1");
  await svc.close();
});

Deno.test("POST /v1/resampling: a span with too many output periods is refused before computing", async () => {
  const svc = await makeTestApp();
  const s = {
    name: "long irregular",
    quantity: "other",
    units: "1",
    time: [-1000.1234, 999.77, 1500.3],
    value: [1, 2, 3],
  };
  const body = await assertProblem(
    await svc.post("/v1/resampling", { series: s, to: "daily" }),
    422,
  );
  assert.equal(body.errors[0].pointer, "/to");
  assert.equal(body.max_periods, 500_000);
  assert.ok(body.periods > 500_000);
  await svc.close();
});

Deno.test("POST /v1/anomalies: warns only when the base period really reaches beyond the data", async () => {
  const svc = await makeTestApp();
  const s = monthlySeries("m", "temperature_anomaly", "K", 1990, 36, (i) => i % 12);
  const inside =
    await (await svc.post("/v1/anomalies", { series: s, base: { start: "1990", end: "1991" } }))
      .json();
  assert.deepEqual(inside.result.warnings, []);
  const beyond =
    await (await svc.post("/v1/anomalies", { series: s, base: { start: "1985", end: "1991" } }))
      .json();
  assert.match(
    beyond.result.warnings[0],
    /base period 1985-01-01 to 1991-12-31 reaches beyond the series \(1990-01 to 1992-12\)/,
  );
  await svc.close();
});

Deno.test("POST /v1/resampling: max_missing_run_days turns a month with a long run of gaps into a gap", async () => {
  const svc = await makeTestApp();
  // January 2001 without the 10th..14th (26 days, a run of 5 missing)
  const s = dailyJson("Probe areas", 2001, 2001, (i) => (i >= 9 && i <= 13 ? null : 1));
  const run =
    await (await svc.post("/v1/resampling", { series: s, to: "monthly", max_missing_run_days: 4 }))
      .json();
  const jan = run.result.coverage[0];
  assert.deepEqual([jan.count, jan.longest_missing_run, jan.covered], [26, 5, false]);
  assert.equal(run.result.coverage[1].longest_missing_run, 0);
  assert.match(run.result.rule, /no run of more than 4 missing days/);
  await svc.close();
});
