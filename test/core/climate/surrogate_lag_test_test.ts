import assert from "node:assert/strict";
import { randomStream } from "../../../core/random/random_stream.ts";
import { laggedCorrelation } from "../../../core/climate/lagged_correlation.ts";
import {
  type PreprocessOptions,
  preprocessSeries,
} from "../../../core/climate/preprocess_series.ts";
import {
  ar1Surrogate,
  dftAmplitudes,
  ebisuzakiSurrogate,
  phaseRandomisedSpectrum,
} from "../../../core/climate/surrogates.ts";
import {
  combineSurrogateChunks,
  planSurrogateLagTest,
  surrogateLagChunk,
} from "../../../core/climate/surrogate_lag_test.ts";
import { lag1Autocorrelation } from "../../../core/climate/lag1_autocorrelation.ts";
import { complexDftPlan } from "../../../core/spectral/complex_dft_plan.ts";
import { inverseRealDft, realDft } from "../../../core/spectral/fft.ts";

function ar1(n: number, phi: number, seed: number, index: number): Float64Array {
  return ar1Surrogate(n, phi, 1, randomStream(seed, index));
}

Deno.test("ebisuzakiSurrogate() keeps the amplitude spectrum (odd N) and zero mean", () => {
  for (const n of [9, 31, 64, 100]) {
    const x = ar1(n, 0.6, 5, n);
    const s = ebisuzakiSurrogate(x, randomStream(11, 3));
    const ax = dftAmplitudes(x), as = dftAmplitudes(s);
    const top = n % 2 === 0 ? ax.length - 1 : ax.length;
    for (let f = 1; f < top; f++) assert.ok(Math.abs(ax[f] - as[f]) < 1e-9 * (1 + ax[f]));
    assert.ok(Math.abs(as[0]) < 1e-9, "zero mean");
    if (n % 2 === 0) {
      // Nyquist term real and at most √2 times the original
      assert.ok(as[ax.length - 1] <= Math.SQRT2 * ax[ax.length - 1] + 1e-9);
    }
  }
});

/** Brute force: surrogate in the time domain, preprocess, correlate lag by lag. */
function bruteForce(
  source: Float64Array,
  y: Float64Array,
  pre: PreprocessOptions,
  method: "phase" | "ar1",
  seed: number,
  index: number,
  minLag: number,
  maxLag: number,
  full: boolean,
): Float64Array {
  let s: Float64Array;
  if (method === "phase") s = ebisuzakiSurrogate(source, randomStream(seed, index));
  else {
    const m = source.reduce((a, b) => a + b) / source.length;
    const sd = Math.sqrt(source.reduce((a, b) => a + (b - m) ** 2, 0) / source.length);
    s = ar1Surrogate(source.length, lag1Autocorrelation(source), sd, randomStream(seed, index));
  }
  const ps = preprocessSeries(s, pre);
  const c = laggedCorrelation(ps, y, { minLag, maxLag });
  return full ? c.rFull : c.r;
}

Deno.test("surrogateLagChunk() equals the brute-force surrogate correlation at every lag", async (t) => {
  const cases: { n: number; pre: PreprocessOptions; method: "phase" | "ar1"; full: boolean }[] = [
    { n: 256, pre: { method: "mean" }, method: "phase", full: false },
    { n: 256, pre: { method: "linear" }, method: "phase", full: false },
    { n: 256, pre: { method: "quadratic" }, method: "phase", full: true },
    { n: 255, pre: { method: "linear" }, method: "phase", full: false },
    { n: 200, pre: { method: "mean" }, method: "phase", full: true },
    { n: 256, pre: { method: "high_pass", cutoffSamples: 40 }, method: "phase", full: false },
    { n: 300, pre: { method: "high_pass", cutoffSamples: 100 }, method: "ar1", full: true },
    { n: 150, pre: { method: "linear" }, method: "ar1", full: false },
  ];
  for (const cs of cases) {
    await t.step(`${cs.method} n=${cs.n} ${cs.pre.method} ${cs.full ? "full" : "overlap"}`, () => {
      const rawX = ar1(cs.n, 0.8, 1, 0);
      const x = preprocessSeries(rawX, cs.pre);
      // the high-pass is not idempotent: surrogates from the detrended series, filtered once
      const source = cs.pre.method === "high_pass"
        ? preprocessSeries(rawX, { method: "linear" })
        : x;
      const y = preprocessSeries(ar1(cs.n, 0.5, 2, 0), cs.pre);
      const plan = planSurrogateLagTest(x, y, {
        minLag: -12,
        maxLag: 15,
        seed: 99,
        method: cs.method,
        preprocess: cs.pre,
        normalisation: cs.full ? "full" : "overlap",
        surrogateSource: source,
      });
      for (const idx of [0, 1, 17]) {
        const one = surrogateLagChunk({ plan, start: idx, end: idx + 1 });
        const ref = bruteForce(source, y, cs.pre, cs.method, 99, idx, -12, 15, cs.full);
        let mx = 0;
        for (let j = 0; j < ref.length; j++) {
          assert.ok(
            Math.abs(one.sum[j] - ref[j]) < 1e-10,
            `lag ${j - 12}: ${one.sum[j]} vs ${ref[j]}`,
          );
          mx = Math.max(mx, Math.abs(ref[j]));
        }
        assert.ok(Math.abs(one.maxAbs[0] - mx) < 1e-10);
      }
    });
  }
});

Deno.test("combineSurrogateChunks() gives the same answer for any split", () => {
  const x = preprocessSeries(ar1(128, 0.8, 3, 0), { method: "mean" });
  const y = preprocessSeries(ar1(128, 0.8, 4, 0), { method: "mean" });
  const plan = planSurrogateLagTest(x, y, { minLag: -10, maxLag: 10, seed: 5 });
  const whole = combineSurrogateChunks(plan, [surrogateLagChunk({ plan, start: 0, end: 300 })]);
  const parts = [[200, 300], [0, 37], [37, 200]].map(([start, end]) =>
    surrogateLagChunk({ plan, start, end })
  );
  const split = combineSurrogateChunks(plan, parts);
  assert.deepEqual(split.pPerLag, whole.pPerLag);
  assert.equal(split.pFamilyWise, whole.pFamilyWise);
  assert.equal(split.maxAbs95, whole.maxAbs95);
  assert.deepEqual(split.threshold95PerLag, whole.threshold95PerLag);
  // the pointwise threshold agrees with the sorted surrogate |r| at each lag to the bin width
  for (const j of [0, 10, 20]) {
    const vals: number[] = [];
    for (let i = 0; i < 300; i++) {
      vals.push(Math.abs(surrogateLagChunk({ plan, start: i, end: i + 1 }).sum[j]));
    }
    vals.sort((a, b) => a - b);
    const q = vals[Math.ceil(0.95 * 300) - 1];
    const th = whole.threshold95PerLag[j];
    assert.ok(q <= th && th - q <= 0.001 + 1e-12, `lag ${j - 10}: ${q} vs ${th}`);
  }
  // the family-wise threshold is higher than every pointwise one (it pays for the search)
  assert.ok(whole.maxAbs95 >= Math.max(...whole.threshold95PerLag) - 0.001);
  assert.ok(whole.pFamilyWise >= Math.min(...whole.pPerLag), "family-wise pays for the search");
  assert.throws(() => combineSurrogateChunks(plan, []), RangeError);
});

Deno.test("complexDftPlan().inverse equals the inverse real DFT of core/spectral for any length", () => {
  for (const n of [1, 2, 3, 7, 64, 100, 1752]) {
    const x = ar1(n, 0.5, 9, n);
    const { re, im } = realDft(x);
    const z = new Float64Array(2 * n), out = new Float64Array(2 * n);
    for (let f = 0; f < re.length; f++) {
      z[2 * f] = re[f];
      z[2 * f + 1] = im[f];
      if (f > 0) {
        z[2 * (n - f)] = re[f];
        z[2 * (n - f) + 1] = -im[f];
      }
    }
    complexDftPlan(n).inverse(z, out);
    const back = inverseRealDft({ re, im }, n);
    for (let t = 0; t < n; t++) {
      const v = out[2 * t] / n;
      assert.ok(Math.abs(v - x[t]) < 1e-11 && Math.abs(v - back[t]) < 1e-11);
      assert.ok(Math.abs(out[2 * t + 1] / n) < 1e-11, "real series back");
    }
  }
  assert.throws(() => complexDftPlan(0), RangeError);
});

Deno.test("surrogate functions reject bad input", async (t) => {
  const st = randomStream(1, 0);
  await t.step("AR(1) parameters", () => {
    assert.throws(() => ar1Surrogate(10, 1, 1, st), { name: "InputError", field: "phi" });
    assert.throws(() => ar1Surrogate(10, 0.5, 0, st), { field: "sigma" });
    assert.throws(() => ar1Surrogate(0, 0.5, 1, st), { field: "n" });
  });
  await t.step("phase randomisation", () => {
    assert.throws(() => ebisuzakiSurrogate([1], st), { field: "x", reason: "too_few_points" });
    assert.throws(() => phaseRandomisedSpectrum(new Float64Array(3), 6, st), {
      field: "amplitudes",
    });
    assert.throws(() => ebisuzakiSurrogate([1, NaN, 3], st), RangeError);
  });
  await t.step("plan", () => {
    const x = ar1(64, 0.5, 1, 0), y = ar1(64, 0.5, 2, 0);
    assert.throws(() => planSurrogateLagTest(x, y, { minLag: 0, maxLag: 3, seed: -1 }), {
      field: "seed",
    });
    assert.throws(
      () => planSurrogateLagTest(x, y, { minLag: 0, maxLag: 62, seed: 1 }),
      { field: "window", reason: "too_few_points" },
    );
    assert.throws(
      () =>
        planSurrogateLagTest(x, new Float64Array(64).fill(1), { minLag: 0, maxLag: 3, seed: 1 }),
      { field: "y", reason: "constant" },
    );
  });
});
