/**
 * Combining a chunked Monte Carlo periodogram null: the result does not depend on the chunking,
 * the local p-values follow Davison & Hinkley (1997, eq. 4.11) and the power levels are R's
 * type-7 quantiles (fixtures/reference/cycle_summaries_r.R) of the replicate maxima; and the
 * helpers of the default period range and of an FFT period band.
 */
import assert from "node:assert/strict";
import {
  combineMonteCarloNull,
  defaultPeriodRange,
  medianSamplingInterval,
  monteCarloFalseAlarm,
  monteCarloMaximaChunk,
  monteCarloPowerLevel,
  periodBand,
} from "../../../core/spectral/mod.ts";
import { loadDataset } from "../cycles/load_dataset.ts";

const R = JSON.parse(
  Deno.readTextFileSync(
    new URL("../../../fixtures/reference/cycle_summaries_r.json", import.meta.url),
  ),
);

Deno.test("combineMonteCarloNull() gives the same answer for any chunking", () => {
  const d = loadDataset("sunspot_year");
  const time = d.time.slice(0, 120), value = d.value.slice(0, 120);
  const frequency = Array.from({ length: 60 }, (_, k) => 0.01 + k * 0.008);
  const probe = [10, 12];
  const chunk = (first: number, n: number) =>
    monteCarloMaximaChunk({
      time,
      value,
      frequency,
      seed: 5,
      replicates: n,
      firstReplicate: first,
      probe,
    });
  const peak = [3, 5];
  const whole = combineMonteCarloNull([chunk(0, 40)], peak);
  const split = combineMonteCarloNull([chunk(0, 15), chunk(15, 25)], peak);
  assert.deepEqual(split, whole);
  // sorted, and the family-wise p-value of a peak from these maxima is the library's
  for (let r = 1; r < whole.maxima.length; r++) assert.ok(whole.maxima[r - 1] <= whole.maxima[r]);
  assert.equal(
    monteCarloFalseAlarm(peak[0], whole.maxima),
    (1 + whole.maxima.filter((m) => m >= peak[0]).length) / 41,
  );
  whole.localP.forEach((p) => assert.ok(p > 0 && p <= 1));
  assert.throws(() => combineMonteCarloNull([], peak), RangeError);
});

Deno.test("monteCarloPowerLevel() is R's type-7 quantile of the maxima", () => {
  const y = loadDataset("sunspot_year").value.slice().sort((a, b) => a - b);
  const q90 = R.sunspot_year["quantile_type7_0.9"]; // R: quantile(sunspot.year, 0.9, type = 7)
  assert.ok(Math.abs(monteCarloPowerLevel(0.1, y) - q90) < 1e-12);
  assert.throws(() => monteCarloPowerLevel(0, y), RangeError);
  assert.throws(() => monteCarloPowerLevel(0.1, []), RangeError);
});

Deno.test("defaultPeriodRange() of monthly and gapped sampling", () => {
  const d = loadDataset("sunspot_month");
  // mid-month times: intervals 28/365 to 31/365 years, median 1/12-ish; span of the record
  const r = defaultPeriodRange(d.time);
  assert.ok(Math.abs(r.min - 2 * medianSamplingInterval(d.time)) === 0);
  assert.ok(Math.abs(r.min - 1 / 6) < 0.01, `${r.min}`);
  assert.equal(r.max, d.time[d.time.length - 1] - d.time[0]);
  assert.equal(medianSamplingInterval([0, 1, 3, 5, 10]), 2); // intervals 1, 2, 2, 5
  assert.throws(() => medianSamplingInterval([1]), RangeError);
});

Deno.test("periodBand() keeps the periods in range, both ends included, zero frequency skipped", () => {
  // an FFT grid k / (N Δt) with N = 12, Δt = 1: periods 12, 6, 4, 3, 2.4, 2
  const f = Array.from({ length: 7 }, (_, k) => k / 12);
  const p = f.map((_, k) => k);
  assert.deepEqual(periodBand(f, p, 2, 12).power, [1, 2, 3, 4, 5, 6]);
  assert.deepEqual(periodBand(f, p, 3, 6).power, [2, 3, 4]);
  assert.deepEqual(periodBand(f, p, 13, 20).frequency, []);
});
