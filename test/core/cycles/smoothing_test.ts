import assert from "node:assert/strict";
import {
  gaussianSmooth,
  runningMean,
  runningMeanWeights,
  smoothed13Month,
  toRegularGrid,
  weightedMovingAverage,
} from "../../../core/cycles/mod.ts";
import { loadDataset } from "./load_dataset.ts";

const nanToNull = (a: Float64Array) => [...a].map((v) => (Number.isNaN(v) ? null : v));

Deno.test("smoothed13Month() reproduces the worked values of the standard definition", async (t) => {
  // shared/SCIENCE.md §4 (C for the formula, D for these values)
  await t.step("a ramp 1..13 gives 7.0 at the centre", () => {
    const r = smoothed13Month(Float64Array.from({ length: 13 }, (_, i) => i + 1));
    assert.ok(Math.abs(r[6] - 7.0) < 1e-12);
  });
  await t.step("a spike of 12 at the centre gives 1.0", () => {
    const x = new Float64Array(13);
    x[6] = 12;
    assert.ok(Math.abs(smoothed13Month(x)[6] - 1.0) < 1e-12);
  });
  await t.step("a spike of 12 at an end month gives 0.5", () => {
    const x = new Float64Array(13);
    x[0] = 12;
    assert.ok(Math.abs(smoothed13Month(x)[6] - 0.5) < 1e-12);
    const y = new Float64Array(13);
    y[12] = 12;
    assert.ok(Math.abs(smoothed13Month(y)[6] - 0.5) < 1e-12);
  });
  await t.step("undefined for the first and last 6 months", () => {
    const r = smoothed13Month(Float64Array.from({ length: 20 }, () => 3));
    const out = nanToNull(r);
    assert.deepEqual(out.slice(0, 6), [null, null, null, null, null, null]);
    assert.deepEqual(out.slice(14), [null, null, null, null, null, null]);
    assert.ok(out.slice(6, 14).every((v) => v !== null && Math.abs(v - 3) < 1e-12));
  });
  await t.step("shorter than 13 months gives no value at all", () => {
    assert.ok(nanToNull(smoothed13Month(new Float64Array(12).fill(5))).every((v) => v === null));
    assert.equal(smoothed13Month(new Float64Array(0)).length, 0);
  });
});

Deno.test("smoothed13Month() gap policy: no biased value from an incomplete window", async (t) => {
  const x = Float64Array.from({ length: 40 }, (_, i) => i);
  x[20] = NaN;
  await t.step("by default a missing month voids every window that contains it", () => {
    const r = smoothed13Month(x);
    for (let i = 14; i <= 26; i++) assert.ok(Number.isNaN(r[i]), `month ${i}`);
    assert.ok(Math.abs(r[13] - 13) < 1e-12 && Math.abs(r[27] - 27) < 1e-12);
  });
  await t.step("maxMissingWeight 1/12 admits one interior missing month, renormalised", () => {
    const r = smoothed13Month(x, { maxMissingWeight: 1 / 12 });
    // window centred on 20 misses its centre: the rest of a symmetric ramp still averages 20
    assert.ok(Math.abs(r[20] - 20) < 1e-12);
    // a missing end month (weight 0.5/12) is also admitted
    assert.ok(Number.isFinite(r[14]));
  });
  await t.step("rejects a policy outside [0, 1)", () => {
    assert.throws(() => smoothed13Month(x, { maxMissingWeight: 1 }), RangeError);
    assert.throws(() => smoothed13Month(x, { maxMissingWeight: -0.1 }), RangeError);
  });
});

Deno.test("runningMean() handles odd and even windows", async (t) => {
  await t.step("even window 12 equals the 13-month smoothing", () => {
    const x = Float64Array.from({ length: 50 }, (_, i) => Math.sin(i / 3) * 10 + i);
    const a = runningMean(x, 12), b = smoothed13Month(x);
    for (let i = 0; i < 50; i++) {
      assert.ok(Number.isNaN(a[i]) ? Number.isNaN(b[i]) : Math.abs(a[i] - b[i]) < 1e-12);
    }
  });
  await t.step("weights sum to 1 for windows 1..25", () => {
    for (let w = 1; w <= 25; w++) {
      const s = runningMeanWeights(w).reduce((p, q) => p + q, 0);
      assert.ok(Math.abs(s - 1) < 1e-12, `window ${w}`);
    }
  });
  await t.step("window 1 is the identity", () => {
    const x = Float64Array.from([3, 1, 4]);
    assert.deepEqual([...runningMean(x, 1)], [3, 1, 4]);
  });
  await t.step("odd window 5 on known values", () => {
    // mean of 1..5 = 3 (arithmetic)
    const y = runningMean(Float64Array.from([1, 2, 3, 4, 5, 6]), 5);
    assert.deepEqual(nanToNull(y), [null, null, 3, 4, null, null]);
  });
  await t.step("rejects non-integer or zero windows", () => {
    assert.throws(() => runningMean(new Float64Array(5), 0), RangeError);
    assert.throws(() => runningMean(new Float64Array(5), 2.5), RangeError);
  });
});

Deno.test("gaussianSmooth() preserves polynomials of degree 1 and keeps the mean of a constant", () => {
  const x = Float64Array.from({ length: 100 }, (_, i) => 5 - 0.3 * i);
  const y = gaussianSmooth(x, 4);
  for (let i = 12; i < 88; i++) assert.ok(Math.abs(y[i] - x[i]) < 1e-10);
  for (let i = 0; i < 12; i++) assert.ok(Number.isNaN(y[i]));
  assert.throws(() => gaussianSmooth(x, 0), RangeError);
  assert.throws(() => gaussianSmooth(x, NaN), RangeError);
});

Deno.test("gaussianSmooth() attenuates a sinusoid by the kernel's transfer function", () => {
  // The Gaussian kernel's frequency response is exp(−2π²σ²f²) (Fourier transform of a
  // Gaussian; common practice); truncation at 5σ makes the discrete kernel match it closely.
  const sigma = 6, period = 60;
  const x = Float64Array.from({ length: 600 }, (_, i) => Math.cos((2 * Math.PI * i) / period));
  const y = gaussianSmooth(x, sigma, { truncate: 5 });
  const gain = Math.exp(-2 * Math.PI ** 2 * sigma ** 2 / period ** 2);
  for (let i = 40; i < 560; i++) assert.ok(Math.abs(y[i] - gain * x[i]) < 1e-4);
});

Deno.test("weightedMovingAverage() rejects bad kernels", () => {
  assert.throws(() => weightedMovingAverage([1, 2, 3], [1, 1]), /odd/);
  assert.throws(() => weightedMovingAverage([1, 2, 3], [1, -1, 1]), RangeError);
  assert.throws(() => weightedMovingAverage([1, 2, 3], [0, 0, 0]), RangeError);
});

Deno.test("toRegularGrid() fills missing months with NaN and rejects duplicates", () => {
  // mid-month instants of Jan, Feb and Apr 2001 (non-leap): (0+15.5)/365, (31+14)/365, (90+15)/365
  const t = [2001 + 15.5 / 365, 2001 + 45 / 365, 2001 + 105 / 365];
  const g = toRegularGrid(t, [1, 2, 4], "monthly");
  assert.equal(g.value.length, 4);
  assert.deepEqual(nanToNull(g.value), [1, 2, null, 4]);
  assert.ok(Math.abs(g.time[2] - (2001 + (59 + 15.5) / 365)) < 1e-12);
  assert.throws(() => toRegularGrid([2001.01, 2001.02], [1, 2], "monthly"), /same month/);
  assert.throws(() => toRegularGrid([], [], "monthly"), RangeError);
});

Deno.test("smoothed13Month() and runningMean() match R's stats::filter on R's sunspot series", async (t) => {
  // Reference: fixtures/reference/smoothing_r.R (R 4.2.2, stats::filter with sides = 2),
  // which records the exact calls; NA there is null here
  const ref = JSON.parse(
    Deno.readTextFileSync(new URL("../../../fixtures/reference/smoothing_r.json", import.meta.url)),
  );
  const same = (a: Float64Array, b: (number | null)[]) => {
    assert.equal(a.length, b.length);
    for (let i = 0; i < a.length; i++) {
      if (b[i] === null) assert.ok(Number.isNaN(a[i]), `index ${i}`);
      else assert.ok(Math.abs(a[i] - b[i]!) < 1e-9, `index ${i}: ${a[i]} vs ${b[i]}`);
    }
  };
  await t.step("13-month smoothing of sunspot.month", () => {
    same(
      smoothed13Month(Float64Array.from(loadDataset("sunspot_month").value)),
      ref.sunspot_month_13_month.values,
    );
  });
  const year = Float64Array.from(loadDataset("sunspot_year").value);
  await t.step("5-year running mean of sunspot.year", () => {
    same(runningMean(year, 5), ref.sunspot_year_running_mean_5.values);
  });
  await t.step("4-year (even) running mean of sunspot.year", () => {
    same(runningMean(year, 4), ref.sunspot_year_running_mean_4.values);
  });
});
