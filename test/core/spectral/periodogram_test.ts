import assert from "node:assert/strict";
import {
  ar1Persistence,
  defaultGridCount,
  falseAlarmProbability,
  fftPeriodogram,
  findSpectralPeaks,
  hornBaliunasFrequencies,
  inverseRealDft,
  lombScargle,
  monteCarloFalseAlarm,
  monteCarloPeakMaxima,
  periodGrid,
  powerAtFalseAlarm,
  realDft,
} from "../../../core/spectral/mod.ts";
import { randomStream } from "../../../core/random/mod.ts";
import { loadDataset } from "../cycles/load_dataset.ts";

// Reference values from scipy 1.10.1 (Debian python3-scipy), produced by
// fixtures/reference/lomb_scargle_scipy.py, which records the versions and exact calls.
const REF = JSON.parse(
  Deno.readTextFileSync(
    new URL("../../../fixtures/reference/lomb_scargle_scipy.json", import.meta.url),
  ),
);

// At the Nyquist frequency of whole-year sampling (f = 0.5/yr, period 2 yr) every sin ω(t−τ)
// vanishes and the sine term is 0/0: sunlag defines it as 0 (only the cosine is fittable there),
// scipy returns rounding noise. That one frequency is left out of the comparisons.
const notNyquist = (f: number) => Math.abs(f - 0.5) > 1e-12;
const dropNyquist = (f: ArrayLike<number>, p: ArrayLike<number>) =>
  Array.from(p).filter((_, k) => notNyquist(f[k]));

function maxRelErr(a: ArrayLike<number>, b: ArrayLike<number>): number {
  assert.equal(a.length, b.length);
  let peak = 0;
  for (let i = 0; i < b.length; i++) peak = Math.max(peak, Math.abs(b[i]));
  let e = 0;
  for (let i = 0; i < a.length; i++) e = Math.max(e, Math.abs(a[i] - b[i]) / peak);
  return e;
}

Deno.test("lombScargle() matches scipy.signal.lombscargle on R's sunspot.year", async (t) => {
  const d = loadDataset("sunspot_year");
  const ref = REF.sunspot_year_even_grid;
  await t.step("even frequency grid (recurrence path): whole periodogram and peak", () => {
    const p = lombScargle(d.time, d.value, ref.frequency, { normalization: "psd" });
    assert.ok(
      maxRelErr(dropNyquist(ref.frequency, p), dropNyquist(ref.frequency, ref.power_psd)) < 1e-9,
    );
    const k = p.indexOf(Math.max(...p));
    assert.equal(k, ref.peak_index);
    assert.ok(Math.abs(1 / ref.frequency[k] - ref.peak_period) < 1e-9);
    assert.ok(Math.abs(p[k] - ref.peak_power_psd) / ref.peak_power_psd < 1e-9);
    // the dominant period of the yearly record is near 11 years (common practice)
    assert.ok(Math.abs(ref.peak_period - 11) < 0.5);
  });
  await t.step("Horne-Baliunas normalisation is psd / variance (ddof 1)", () => {
    const p = lombScargle(d.time, d.value, ref.frequency);
    const k = ref.peak_index;
    assert.ok(Math.abs(p[k] - ref.peak_power_psd / ref.variance_ddof1) / p[k] < 1e-9);
  });
  await t.step("gapped series on a grid even in period (direct path)", () => {
    const g = REF.sunspot_year_gapped_period_grid;
    const keep = new Set<number>(g.kept_times);
    const tt: number[] = [], yy: number[] = [];
    d.time.forEach((x, i) => {
      if (keep.has(x)) {
        tt.push(x);
        yy.push(d.value[i]);
      }
    });
    assert.equal(tt.length, g.n);
    const f = g.periods.map((p: number) => 1 / p);
    const psd = lombScargle(tt, yy, f, { normalization: "psd" });
    assert.ok(maxRelErr(dropNyquist(f, psd), dropNyquist(f, g.power_psd)) < 1e-9);
    const std = lombScargle(tt, yy, f, { normalization: "standard" });
    assert.ok(maxRelErr(dropNyquist(f, std), dropNyquist(f, g.power_standard)) < 1e-9);
    const [top] = findSpectralPeaks(f.slice().reverse(), [...lombScargle(tt, yy, f)].reverse());
    assert.ok(Math.abs(top.period - g.peak_period) < 1e-9);
  });
});

Deno.test("lombScargle() recurrence and direct evaluation agree on long grids", () => {
  const rng = randomStream(3);
  const t = Array.from({ length: 500 }, (_, i) => i / 12 + 0.02 * rng.uniform());
  const y = t.map((x) => Math.sin(2 * Math.PI * x / 11) + rng.normal());
  const f = periodGrid({ minPeriod: 0.2, maxPeriod: 40, count: 3000 });
  const fast = lombScargle(t, y, f); // evenly spaced: rotation recurrence
  const slow = new Float64Array(f.length);
  for (let k = 0; k < f.length; k++) slow[k] = lombScargle(t, y, [f[k]])[0];
  assert.ok(maxRelErr(fast, slow) < 1e-10);
});

Deno.test("lombScargle() edge cases", async (t) => {
  await t.step("Nyquist frequency of even sampling gives a finite power", () => {
    const tt = Array.from({ length: 16 }, (_, i) => i);
    const y = tt.map((i) => (i % 2 ? 1 : -1));
    const p = lombScargle(tt, y, [0.5], { normalization: "standard" });
    assert.ok(Number.isFinite(p[0]));
    assert.ok(Math.abs(p[0] - 1) < 1e-9); // all variance at Nyquist
  });
  await t.step("rejects constant, short, non-finite input and bad frequencies", () => {
    assert.throws(() => lombScargle([1, 2, 3], [5, 5, 5], [0.1]), /constant/);
    assert.throws(() => lombScargle([1, 2], [1, 2], [0.1]), /at least 3/);
    assert.throws(() => lombScargle([1, 2, 3], [1, NaN, 3], [0.1]), /not finite/);
    assert.throws(() => lombScargle([1, 2, 3], [1, 2, 4], [0]), /frequency/);
    assert.throws(() => lombScargle([1, 2, 3], [1, 2], [0.1]), RangeError);
  });
  await t.step("an empty grid gives an empty periodogram", () => {
    assert.equal(lombScargle([1, 2, 3], [1, 2, 4], []).length, 0);
  });
});

Deno.test("false-alarm probability: Horne & Baliunas worked values", () => {
  // SCIENCE.md §7: FAP(z) = 1 − (1 − e^−z)^M (C); M = −6.362 + 1.193 N + 0.00098 N² (Horne &
  // Baliunas 1986, M: from memory); D: N = 100 → M = 122.74, z(0.01) = 9.410, z(0.05) = 7.780
  const m = hornBaliunasFrequencies(100);
  assert.ok(Math.abs(m - 122.74) < 0.005);
  assert.ok(Math.abs(powerAtFalseAlarm(0.01, m) - 9.410) < 5e-4);
  assert.ok(Math.abs(powerAtFalseAlarm(0.05, m) - 7.780) < 5e-4);
  assert.ok(Math.abs(falseAlarmProbability(powerAtFalseAlarm(0.01, m), m) - 0.01) < 1e-12);
  // a tiny probability keeps its precision: M e^−z for large z
  assert.ok(Math.abs(falseAlarmProbability(40, m) / (m * Math.exp(-40)) - 1) < 1e-9);
  assert.equal(falseAlarmProbability(0, m), 1);
  assert.throws(() => hornBaliunasFrequencies(3), RangeError);
  assert.throws(() => powerAtFalseAlarm(0, m), RangeError);
  assert.throws(() => falseAlarmProbability(-1, m), RangeError);
});

Deno.test("Horne-Baliunas FAP is calibrated for white noise on an even full-band grid", () => {
  // Calibration (common practice): for Gaussian white noise the analytic FAP at z(0.1) should
  // be exceeded by about 10 % of series. 300 series of N = 100, seed fixed.
  const n = 100, reps = 300;
  const t = Array.from({ length: n }, (_, i) => i);
  const f = periodGrid({ minPeriod: 2, maxPeriod: n, count: defaultGridCount(n, 2, n) });
  const z = powerAtFalseAlarm(0.1, hornBaliunasFrequencies(n));
  let hits = 0;
  for (let r = 0; r < reps; r++) {
    const rng = randomStream(2024, r);
    const y = t.map(() => rng.normal());
    if (Math.max(...lombScargle(t, y, f)) >= z) hits++;
  }
  const rate = hits / reps;
  // binomial sd at p = 0.1: sqrt(0.09/300) = 0.017; allow about 3 sd
  assert.ok(rate > 0.05 && rate < 0.16, `rate ${rate}`);
});

Deno.test("monteCarloPeakMaxima() is reproducible, chunkable, and flags a real periodicity", () => {
  const rng = randomStream(11);
  const t = Array.from({ length: 120 }, (_, i) => i + 0.1 * rng.uniform());
  const y = t.map((x) => 2 * Math.sin(2 * Math.PI * x / 11) + rng.normal());
  const f = periodGrid({ minPeriod: 2.5, maxPeriod: 60, count: 300 });
  const all = monteCarloPeakMaxima(t, y, f, { seed: 5, replicates: 60 });
  const parts = [
    ...monteCarloPeakMaxima(t, y, f, { seed: 5, replicates: 25 }),
    ...monteCarloPeakMaxima(t, y, f, { seed: 5, replicates: 35, firstReplicate: 25 }),
  ];
  assert.deepEqual([...all], parts);
  const obs = Math.max(...lombScargle(t, y, f));
  assert.equal(monteCarloFalseAlarm(obs, all), 1 / 61);
  // pure noise: the observed maximum is typical of its own permutations
  const noise = t.map(() => rng.normal());
  const mn = monteCarloPeakMaxima(t, noise, f, { seed: 6, replicates: 60 });
  assert.ok(monteCarloFalseAlarm(Math.max(...lombScargle(t, noise, f)), mn) > 0.02);
});

Deno.test("fftPeriodogram() matches scipy.signal.periodogram on R's sunspot.month", async (t) => {
  const d = loadDataset("sunspot_month");
  const ref = REF.sunspot_month_fft_periodogram;
  assert.equal(d.value.length, ref.n); // 3177: exercises the arbitrary-length transform
  for (
    const [name, options] of [
      ["hann", { taper: "hann" }],
      ["none", { taper: "none" }],
      ["tukey", { taper: "tukey", tukeyFraction: 0.1 }],
      ["hann_linear", { taper: "hann", detrend: "linear" }],
    ] as const
  ) {
    await t.step(name, () => {
      const p = fftPeriodogram(d.value, 1 / 12, options);
      const k = ref.stored_bins;
      assert.ok(maxRelErr(p.frequency.slice(0, k), ref[name].frequency) < 1e-12);
      assert.ok(maxRelErr(p.power.slice(0, k), ref[name].power) < 1e-9, name);
    });
  }
});

Deno.test("fftPeriodogram() integrates to the variance (Parseval) and rejects gaps", () => {
  const rng = randomStream(8);
  for (const n of [64, 101]) {
    const x = Array.from({ length: n }, () => rng.normal());
    const { frequency, power } = fftPeriodogram(x, 0.5, { taper: "none" });
    const df = frequency[1] - frequency[0];
    const m = x.reduce((a, b) => a + b, 0) / n;
    const v = x.reduce((a, b) => a + (b - m) ** 2, 0) / n;
    assert.ok(Math.abs(power.reduce((a, b) => a + b, 0) * df - v) < 1e-12 * n);
  }
  assert.throws(() => fftPeriodogram([1, 2, NaN, 4, 5], 1), /gap-free/);
  assert.throws(() => fftPeriodogram([1, 2, 3], 1), RangeError);
  assert.throws(() => fftPeriodogram([1, 2, 3, 4], 0), RangeError);
});

Deno.test("realDft() equals the defining sum for many lengths and inverts exactly", () => {
  const rng = randomStream(4);
  for (const n of [1, 2, 3, 5, 8, 12, 17, 64, 100, 127]) {
    const x = Array.from({ length: n }, () => rng.normal());
    const { re, im } = realDft(x);
    for (let k = 0; k < re.length; k++) {
      let sr = 0, si = 0;
      for (let j = 0; j < n; j++) {
        sr += x[j] * Math.cos((2 * Math.PI * k * j) / n);
        si -= x[j] * Math.sin((2 * Math.PI * k * j) / n);
      }
      assert.ok(Math.abs(re[k] - sr) < 1e-10 && Math.abs(im[k] - si) < 1e-10, `n ${n} k ${k}`);
    }
    const y = inverseRealDft({ re, im }, n);
    for (let j = 0; j < n; j++) assert.ok(Math.abs(y[j] - x[j]) < 1e-12);
  }
  assert.throws(() => realDft([]), RangeError);
  assert.throws(() => realDft([1, Infinity]), RangeError);
  assert.throws(() => inverseRealDft({ re: new Float64Array(2), im: new Float64Array(2) }, 5));
});

Deno.test("findSpectralPeaks() widths, ordering and unresolved edges", () => {
  const f = Array.from({ length: 200 }, (_, k) => 0.01 + k * 0.001);
  const p = f.map((x) =>
    3 * Math.exp(-((x - 0.09) ** 2) / (2 * 0.003 ** 2)) + Math.exp(-((x - 0.15) ** 2) / 2e-5)
  );
  const peaks = findSpectralPeaks(f, p, { maxPeaks: 3 });
  assert.equal(peaks.length, 2);
  assert.ok(Math.abs(peaks[0].frequency - 0.09) < 1e-12);
  // Gaussian HWHM = σ √(2 ln 2) (common practice)
  assert.ok(Math.abs(peaks[0].halfWidth! - 0.003 * Math.sqrt(2 * Math.LN2)) < 5e-5);
  assert.ok(
    Math.abs(peaks[0].periodUncertainty! - peaks[0].halfWidth! / 0.09 ** 2) < 1e-12,
  );
  const [lo, hi] = peaks[0].periodInterval;
  assert.ok(lo! < 1 / 0.09 && hi! > 1 / 0.09);
  // a rising edge: the peak at the grid end has no upper half-power point
  const edge = findSpectralPeaks([1, 2, 3], [1, 2, 3]);
  assert.equal(edge[0].halfPowerFrequencies[1], null);
  // one frequency: one unresolved peak (a periodogram asked at a single period)
  const one = findSpectralPeaks([0.1], [2]);
  assert.deepEqual([one.length, one[0].period, one[0].halfWidth], [1, 10, null]);
  assert.deepEqual(findSpectralPeaks([0.1], [0]), []);
  assert.throws(() => findSpectralPeaks([], []), RangeError);
  assert.throws(() => findSpectralPeaks([1, 2], [1]), RangeError);
});

Deno.test("periodGrid() rejects empty ranges", () => {
  assert.throws(() => periodGrid({ minPeriod: 10, maxPeriod: 10, count: 5 }), /minPeriod/);
  assert.throws(() => periodGrid({ minPeriod: 1, maxPeriod: 10, count: 0 }), /count/);
  const g = periodGrid({ minPeriod: 2, maxPeriod: 10, count: 5, spacing: "period" });
  assert.deepEqual([...g].map((x) => 1 / x).map((x) => Math.round(x * 1e9) / 1e9), [
    10,
    8,
    6,
    4,
    2,
  ]);
});

Deno.test("ar1Persistence() recovers the persistence time of an AR(1) series", () => {
  // x_t = 0.7 x_{t−1} + e_t: τ = −1/ln 0.7 = 2.804 (D)
  const rng = randomStream(21);
  const t = Array.from({ length: 20_000 }, (_, i) => i);
  let x = 0;
  const y = t.map(() => (x = 0.7 * x + rng.normal()));
  const tau = ar1Persistence(t, y);
  assert.ok(Math.abs(tau / (-1 / Math.log(0.7)) - 1) < 0.05, `tau ${tau}`);
});

Deno.test("monteCarloPeakMaxima() red-noise null is calibrated for AR(1) series, white is not", () => {
  // Calibration (common practice): for red noise the share of series whose largest peak has
  // a Monte Carlo FAP ≤ 0.1 should be about 0.1 under the AR(1) null, and far larger under the
  // permutation (white-noise) null. 60 AR(1) series (ρ = 0.8), 60 replicates each.
  const n = 120, series = 60, reps = 60;
  const t = Array.from({ length: n }, (_, i) => i);
  const f = periodGrid({ minPeriod: 2, maxPeriod: 60, count: 150 });
  let redHits = 0, whiteHits = 0;
  for (let s = 0; s < series; s++) {
    const rng = randomStream(3030, s);
    let x = 0;
    const y = t.map(() => (x = 0.8 * x + rng.normal()));
    const obs = Math.max(...lombScargle(t, y, f));
    const red = monteCarloPeakMaxima(t, y, f, { seed: s, replicates: reps, null: "ar1" });
    const white = monteCarloPeakMaxima(t, y, f, { seed: s, replicates: reps });
    if (monteCarloFalseAlarm(obs, red) <= 0.1) redHits++;
    if (monteCarloFalseAlarm(obs, white) <= 0.1) whiteHits++;
  }
  // binomial sd at p = 0.1 over 60 series: 0.039; allow about 2.5 sd above, and note that the
  // estimated persistence makes the test slightly conservative
  assert.ok(redHits / series < 0.2, `red ${redHits}`);
  assert.ok(whiteHits / series > 0.4, `white ${whiteHits}`);
});

Deno.test("spectral edge cases: flat power, one-point grids, infinities", () => {
  assert.deepEqual(findSpectralPeaks([1, 2, 3], [0, 0, 0]), []);
  assert.deepEqual(findSpectralPeaks([1, 2, 3], [2, 2, 2]).length, 1); // plateau: first point
  const g = periodGrid({ minPeriod: 4, maxPeriod: 12, count: 1 });
  assert.equal(g.length, 1);
  assert.equal(g[0], 2 / 16);
  assert.throws(() => fftPeriodogram([1, 2, Infinity, 4, 5], 1), /not finite/);
  assert.throws(() => lombScargle([1, 2, Infinity], [1, 2, 3], [0.1]), /not finite/);
  assert.throws(() => monteCarloFalseAlarm(1, []), RangeError);
  assert.throws(
    () => monteCarloPeakMaxima([1, 2, 3], [1, 2, 4], [0.1], { seed: 1, replicates: 0 }),
    /replicates/,
  );
});
