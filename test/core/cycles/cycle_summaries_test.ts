/**
 * The summaries the solar-cycle analyses report, against base R (fixtures/reference/
 * cycle_summaries_r.R, R 4.2.2: mean, sd, quantile type 7 and lm on R's sunspot.year and
 * longley), and the rules that turn a cycle table into fit windows and hindcast cases.
 */
import assert from "node:assert/strict";
import {
  completeCycleWindows,
  cycleStatistic,
  cycleTable,
  findCycleExtrema,
  type HindcastCase,
  hindcastCase,
  hindcastInterval,
  nextMinimumEstimate,
  pastCycles,
  smoothed13Month,
  summarizeCycleTable,
  toRegularGrid,
  versionOneScale,
} from "../../../core/cycles/mod.ts";
import { coefficientOfDetermination } from "../../../core/stats/mod.ts";
import { InputError } from "../../../core/errors.ts";
import { loadDataset } from "./load_dataset.ts";

const R = JSON.parse(
  Deno.readTextFileSync(
    new URL("../../../fixtures/reference/cycle_summaries_r.json", import.meta.url),
  ),
);
const close = (a: number, b: number, tol: number, what: string) =>
  assert.ok(Math.abs(a - b) <= tol * Math.max(1, Math.abs(b)), `${what}: ${a} vs ${b}`);

Deno.test("cycleStatistic() agrees with R's mean and sd on sunspot.year", async (t) => {
  const y = loadDataset("sunspot_year").value;
  const s = cycleStatistic(y);
  const r = R.sunspot_year;
  close(s.mean!, r.mean, 1e-14, "mean"); // R: mean(sunspot.year)
  close(s.sd!, r.sd, 1e-13, "sd"); // R: sd(sunspot.year)
  assert.deepEqual([s.min, s.max, s.n], [r.min, r.max, r.n]);
  await t.step("empty and one value", () => {
    assert.deepEqual(cycleStatistic([]), { mean: null, sd: null, min: null, max: null, n: 0 });
    assert.deepEqual(cycleStatistic([11]), { mean: 11, sd: null, min: 11, max: 11, n: 1 });
  });
});

Deno.test("hindcastInterval() is the forecast minus R's type-7 quantiles of the errors", async (t) => {
  const y = loadDataset("sunspot_year").value;
  const cases = y.map((v) => ({ error: { time: v / 100, value: v } }));
  const h = hindcastInterval(cases, { time: 2030, value: 200 }, 0.9)!;
  const [q05, q95] = R.sunspot_year["quantile_type7_0.05_0.95"]; // R: quantile(y, c(.05, .95), type = 7)
  assert.equal(h.cases, 289);
  close(h.timeInterval[0], 2030 - q95 / 100, 1e-13, "time lower");
  close(h.timeInterval[1], 2030 - q05 / 100, 1e-13, "time upper");
  close(h.valueInterval[0], 200 - q95, 1e-12, "value lower");
  close(h.valueInterval[1], 200 - q05, 1e-12, "value upper");
  await t.step("the lower value end is cut at 0", () => {
    const low = hindcastInterval(cases, { time: 2030, value: 50 }, 0.9)!;
    assert.equal(low.valueInterval[0], 0);
  });
  await t.step("fewer than 10 cases give no interval", () => {
    assert.equal(hindcastInterval(cases.slice(0, 9), { time: 2030, value: 200 }, 0.9), null);
  });
});

Deno.test("nextMinimumEstimate() is the start plus R's mean and sd of the lengths", () => {
  const y = loadDataset("sunspot_year").value;
  const e = nextMinimumEstimate(2000, y)!;
  close(e.meanLength, R.sunspot_year.mean, 1e-14, "mean");
  close(e.sdLength!, R.sunspot_year.sd, 1e-13, "sd");
  close(e.time, 2000 + R.sunspot_year.mean, 1e-15, "time");
  assert.equal(nextMinimumEstimate(2000, [11])!.sdLength, null);
  assert.equal(nextMinimumEstimate(2000, []), null);
});

Deno.test("coefficientOfDetermination() equals R's summary(lm)$r.squared for longley", () => {
  const r = R.longley_employed_on_gnp; // R: lm(Employed ~ GNP, data = longley)
  const text = Deno.readTextFileSync(
    new URL("../../../fixtures/datasets/longley.csv", import.meta.url),
  ).split("\n").filter((l) => l && !l.startsWith("#"));
  const col = text[0].split(",").indexOf("Employed");
  const employed = text.slice(1).map((l) => Number(l.split(",")[col]));
  close(coefficientOfDetermination(employed, r.rss)!, r.r_squared, 1e-13, "R²");
  assert.equal(coefficientOfDetermination([NaN, 1], 0), null, "one finite value");
  assert.equal(coefficientOfDetermination([2, 2, NaN], 0), null, "constant values");
});

Deno.test("summarizeCycleTable(), completeCycleWindows() and pastCycles() on R's sunspot.month", () => {
  const d = loadDataset("sunspot_month");
  const g = toRegularGrid(d.time, d.value, "monthly");
  const rows = cycleTable(g.time, findCycleExtrema(g.time, smoothed13Month(g.value)), {
    activity: g.value,
  });
  const s = summarizeCycleTable(rows);
  const complete = rows.filter((r) => !r.inProgress);
  assert.equal(s.completeCycles, complete.length);
  assert.equal(s.lengthYears.n, complete.length);
  // the mean length of the solar cycles is about 11 years (Hathaway 2010, Living Rev. Sol.
  // Phys. 7, 1)
  assert.ok(Math.abs(s.lengthYears.mean! - 11) < 0.5, `${s.lengthYears.mean}`);
  const w = completeCycleWindows(g, rows);
  w.rows.forEach((r, k) => {
    // each window runs from the cycle's starting minimum to the next one, on the grid's times
    assert.equal(g.time[w.windows[k].start], r.start.time);
    assert.equal(g.time[w.windows[k].end], r.end!.time);
  });
  const past = pastCycles(g, w.rows, w.windows);
  assert.equal(past.length, w.rows.length);
  assert.equal(past[0].time[0], w.rows[0].start.time);
  assert.ok(past.every((c) => Array.from(c.value).every(Number.isFinite)));
  const fits = w.rows.map(() => ({ t0: 0, a: 1, b: 1, c: 0.71, previous: true }));
  const withPrev = pastCycles(g, w.rows, w.windows, fits as never);
  assert.equal(withPrev.length, w.rows.length - 1, "the first cycle has no predecessor");
  assert.equal(withPrev[0].previousCycle, fits[0]);
});

Deno.test("hindcastCase() skips a cycle the shape cannot be fitted to, and throws for bad options", () => {
  const time = Array.from({ length: 40 }, (_, i) => 2000 + (i + 0.5) / 12);
  const flat = {
    id: 1,
    time,
    value: time.map(() => 0),
    start: 2000,
    maximum: { time: 2004, value: 1 },
  };
  assert.equal(hindcastCase(flat, 24, 0, { seed: 1 }), null);
  const ok = { ...flat, value: time.map((_, i) => 1 + i) };
  assert.throws(
    () => hindcastCase(ok, 24, 0, { seed: 1, replicates: 5 }),
    (e) => e instanceof InputError && e.field === "replicates",
  );
  const one: HindcastCase | null = hindcastCase(ok, 24, 0, { seed: 1, replicates: 20 });
  assert.ok(one && one.monthsUsed === 24);
});

Deno.test("versionOneScale() puts version 2 sunspot numbers on the version 1 scale", () => {
  // V1 ≈ 0.6 × V2 (Clette et al. 2014, Space Sci. Rev. 186, 35)
  assert.equal(versionOneScale("sunspot_number", "2").scale, 0.6);
  assert.deepEqual(versionOneScale("sunspot_number", "1"), { scale: 1, known: true });
  assert.deepEqual(versionOneScale("sunspot_group_number", null), { scale: 1, known: true });
  assert.equal(versionOneScale("sunspot_number", "3").known, false);
});
