import assert from "node:assert/strict";
import { brethertonEffectiveSampleSize } from "../../../core/climate/effective_sample_size.ts";
import { correlationTTest, fisherZInterval } from "../../../core/climate/correlation_tests.ts";
import { lag1Autocorrelation } from "../../../core/climate/lag1_autocorrelation.ts";
import {
  laggedCorrelation,
  laggedCorrelationTable,
} from "../../../core/climate/lagged_correlation.ts";
import {
  gaussianHighPass,
  gaussianSigmaForCutoff,
  preprocessSeries,
} from "../../../core/climate/preprocess_series.ts";

const close = (a: number, b: number, tol: number, what = "") =>
  assert.ok(Math.abs(a - b) <= tol, `${what}: ${a} vs ${b} (tol ${tol})`);

Deno.test("brethertonEffectiveSampleSize() reproduces the worked value and caps at N", () => {
  // Bretherton et al. 1999, J. Climate 12, 1990, eq. 31, derived:
  // N = 100, r1 = 0.5, r2 = 0.8 → 100 · 0.6 / 1.4 = 42.857
  close(brethertonEffectiveSampleSize(100, 0.5, 0.8), 42.857142857142854, 1e-12, "N_eff");
  assert.equal(brethertonEffectiveSampleSize(100, 0.5, -0.5), 100);
  assert.equal(brethertonEffectiveSampleSize(100, 0, 0.9), 100);
  assert.throws(() => brethertonEffectiveSampleSize(100, 1, 0.2), RangeError);
  assert.throws(() => brethertonEffectiveSampleSize(0, 0.1, 0.2), RangeError);
  assert.throws(() => brethertonEffectiveSampleSize(100, NaN, 0.2), RangeError);
});

Deno.test("correlationTTest() gives the worked t values with N and N_eff", () => {
  // t = r √((N − 2)/(1 − r²)), derived: r = 0.3 → t = 3.113 at N = 100, 2.010 at N_eff = 42.857
  close(correlationTTest(0.3, 100).t, 0.3 * Math.sqrt(98 / 0.91), 1e-12, "t formula");
  close(correlationTTest(0.3, 100).t, 3.113, 5e-4, "t N=100");
  close(correlationTTest(0.3, 300 / 7).t, 2.010, 5e-4, "t N_eff");
  // R 4.2.2: t <- 0.3 * sqrt(98 / 0.91); 2 * pt(-t, 98) = 0.00242573346258303
  close(correlationTTest(0.3, 100).p, 0.00242573346258303, 1e-12, "p");
  assert.equal(correlationTTest(0, 50).p, 1);
  assert.throws(() => correlationTTest(1.2, 50), RangeError);
  assert.throws(() => correlationTTest(0.2, 2), RangeError);
});

Deno.test("fisherZInterval() gives the worked 95 % intervals", () => {
  // Fisher z, SE 1/√(N − 3) (Fisher 1921), derived
  const [a, b] = fisherZInterval(0.5, 50);
  close(a, 0.2575, 5e-5, "lower N=50");
  close(b, 0.6833, 5e-5, "upper N=50");
  const [c, d] = fisherZInterval(0.5, 300 / 7);
  close(c, 0.2344, 5e-5, "lower N_eff");
  close(d, 0.6961, 5e-5, "upper N_eff");
  assert.throws(() => fisherZInterval(1, 50), RangeError);
  assert.throws(() => fisherZInterval(0.5, 3), RangeError);
});

Deno.test("lag1Autocorrelation() handles edge cases", async (t) => {
  await t.step("R acf value", () => {
    // R 4.2.2: acf(c(2, 4, 3, 5, 4, 6), plot = FALSE)$acf[2] = -0.1
    close(lag1Autocorrelation([2, 4, 3, 5, 4, 6]), -0.1, 1e-15, "r1");
  });
  await t.step("constant and short series throw", () => {
    assert.throws(() => lag1Autocorrelation([1, 1, 1, 1]), RangeError);
    assert.throws(() => lag1Autocorrelation([1, 2]), RangeError);
  });
});

Deno.test("laggedCorrelation() sign convention: positive lag = climate follows solar", () => {
  const n = 200;
  const x = Float64Array.from({ length: n }, (_, i) => Math.sin(i / 5) + 0.2 * Math.cos(i * 1.3));
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) y[i] = i >= 7 ? x[i - 7] : 0;
  const c = laggedCorrelation(x, y, { minLag: -10, maxLag: 10 });
  const best = c.lags[c.r.reduce((bi, v, i, a) => (v > a[bi] ? i : bi), 0)];
  assert.equal(best, 7);
  assert.equal(c.n[0], n - 10);
  // full normalisation shrinks toward 0 roughly by n_k/N
  assert.ok(Math.abs(c.rFull[17]) < Math.abs(c.r[17]));
});

Deno.test("laggedCorrelation() rejects bad input", async (t) => {
  const x = new Float64Array(20).map((_, i) => i % 3);
  await t.step("constant series", () => {
    assert.throws(
      () => laggedCorrelation(x, new Float64Array(20).fill(2), { minLag: 0, maxLag: 1 }),
      { name: "InputError", field: "y", reason: "constant" },
    );
  });
  await t.step("NaN", () => {
    const y = Float64Array.from(x);
    y[3] = NaN;
    assert.throws(() => laggedCorrelation(x, y, { minLag: 0, maxLag: 1 }), {
      field: "y",
      reason: "not_finite",
      index: 3,
    });
  });
  await t.step("lengths and window", () => {
    assert.throws(() => laggedCorrelation(x, x.subarray(1), { minLag: 0, maxLag: 1 }), {
      field: "y",
      reason: "length_mismatch",
    });
    assert.throws(() => laggedCorrelation(x, x, { minLag: 2, maxLag: 1 }), { field: "window" });
    assert.throws(() => laggedCorrelation(x, x, { minLag: 0, maxLag: 18 }), {
      field: "window",
      reason: "too_few_points",
    });
  });
});

Deno.test("laggedCorrelationTable() combines N_eff, t, p and Fisher interval per lag", () => {
  const n = 120;
  const x = Float64Array.from({ length: n }, (_, i) => Math.sin(i / 6) + 0.5 * Math.sin(i * 2.1));
  const y = Float64Array.from({ length: n }, (_, i) => Math.sin((i - 1) / 6) + Math.cos(i * 1.7));
  const rows = laggedCorrelationTable(x, y, { minLag: -3, maxLag: 3 });
  for (const row of rows) {
    const neff = brethertonEffectiveSampleSize(row.n, row.r1_solar, row.r1_climate);
    close(row.n_eff, neff, 1e-12, "n_eff");
    close(row.t!, row.r * Math.sqrt((neff - 2) / (1 - row.r ** 2)), 1e-9, "t");
    assert.ok(row.p_analytic! >= row.p_naive!, "N_eff test is more conservative");
    assert.ok(row.ci_lower! < row.r && row.r < row.ci_upper!);
  }
});

Deno.test("preprocessSeries() removes polynomials and slow variations", async (t) => {
  await t.step("quadratic", () => {
    const x = Float64Array.from({ length: 50 }, (_, i) => 3 - 0.2 * i + 0.01 * i * i);
    for (const v of preprocessSeries(x, { method: "quadratic" })) close(v, 0, 1e-12, "q");
    const lin = preprocessSeries(x, { method: "linear" });
    assert.ok(lin.some((v) => Math.abs(v) > 1e-3));
  });
  await t.step("high-pass keeps fast, removes slow", () => {
    const n = 600;
    const fast = Float64Array.from({ length: n }, (_, i) => Math.sin((2 * Math.PI * i) / 10));
    const slow = Float64Array.from({ length: n }, (_, i) => Math.sin((2 * Math.PI * i) / 300));
    const hf = preprocessSeries(fast, { method: "high_pass", cutoffSamples: 60 });
    const hs = preprocessSeries(slow, { method: "high_pass", cutoffSamples: 60 });
    const rms = (v: Float64Array) =>
      Math.sqrt(v.slice(100, 500).reduce((a, b) => a + b * b, 0) / 400);
    assert.ok(rms(hf) > 0.69, `fast rms ${rms(hf)}`);
    assert.ok(rms(hs) < 0.05, `slow rms ${rms(hs)}`);
  });
  await t.step("half power at the cutoff", () => {
    // the high-pass response 1 − exp(−2π²σ²f²) is 1/√2 at f = 1/P (derived in the module)
    const n = 4000, P = 50;
    const x = Float64Array.from({ length: n }, (_, i) => Math.sin((2 * Math.PI * i) / P));
    const h = preprocessSeries(x, { method: "high_pass", cutoffSamples: P });
    let a = 0, b = 0;
    for (let i = 1000; i < 3000; i++) {
      a += h[i] * x[i];
      b += x[i] * x[i];
    }
    close(a / b, Math.SQRT1_2, 2e-3, "gain at cutoff");
  });
  await t.step("errors", () => {
    assert.throws(() => preprocessSeries(new Float64Array([1, NaN, 2])), {
      field: "x",
      reason: "not_finite",
      index: 1,
    });
    assert.throws(
      () => preprocessSeries(new Float64Array([1, 2]), { method: "quadratic" }),
      { field: "n", reason: "too_few_points" },
    );
    assert.throws(() => preprocessSeries(new Float64Array(10), { method: "high_pass" }), {
      field: "cutoffSamples",
    });
    assert.throws(
      () => preprocessSeries(new Float64Array(10), { method: "high_pass", cutoffSamples: 1 }),
      { field: "cutoffSamples", reason: "out_of_range", value: 1 },
    );
  });
});

Deno.test("laggedCorrelation() matches R's ccf and cor on R's sunspot.year and nhtemp", async () => {
  // R 4.2.2 stats::ccf (full normalisation) and cor() over the overlap (Pearson), on R's
  // datasets package data; script and exact commands: fixtures/reference/ccf_r.R
  const ref = JSON.parse(
    await Deno.readTextFile(new URL("../../../fixtures/reference/ccf_r.json", import.meta.url)),
  );
  assert.match(ref.r_version, /^R version 4\./);
  for (const cs of ref.cases) {
    const x = Float64Array.from(cs.x as number[]), y = Float64Array.from(cs.y as number[]);
    const lags = cs.sunlag_lag as number[];
    const minLag = Math.min(...lags), maxLag = Math.max(...lags);
    const c = laggedCorrelation(x, y, { minLag, maxLag });
    lags.forEach((k, i) => {
      const j = k - minLag;
      close(c.rFull[j], cs.full[i], 1e-12, `${cs.name} full lag ${k}`);
      close(c.r[j], cs.overlap[i], 1e-12, `${cs.name} overlap lag ${k}`);
      assert.equal(c.n[j], x.length - Math.abs(k));
    });
  }
});

Deno.test("gaussianHighPass() FFT form equals the direct sum for wide kernels", () => {
  // the FFT path (half-width > 48 samples) against a direct evaluation of the same definition
  const n = 700, P = 120;
  const x = Float64Array.from(
    { length: n },
    (_, i) => Math.sin(i / 9) + 0.01 * i + ((i * 7919) % 13) / 13,
  );
  const fast = gaussianHighPass(x, P);
  const sigma = gaussianSigmaForCutoff(P), h = Math.ceil(4 * sigma);
  for (const i of [0, 1, 50, 349, 650, 699]) {
    let s = 0, ws = 0;
    for (let j = -h; j <= h; j++) {
      if (i + j < 0 || i + j >= n) continue;
      const wj = Math.exp(-0.5 * (j / sigma) ** 2);
      s += wj * x[i + j];
      ws += wj;
    }
    close(fast[i], x[i] - s / ws, 1e-12, `sample ${i}`);
  }
});

Deno.test("laggedCorrelationTable() handles a perfectly correlated pair without NaN", () => {
  const x = Float64Array.from({ length: 50 }, (_, i) => Math.sin(i / 3) + 0.01 * i);
  for (const norm of ["overlap", "full"] as const) {
    const rows = laggedCorrelationTable(x, x, { minLag: -2, maxLag: 2 }, norm);
    const r0 = rows[2];
    assert.ok(Math.abs(r0.r - 1) < 1e-12 && r0.r <= 1 && r0.r_full <= 1);
    assert.equal(r0.p_analytic, 0);
    assert.equal(r0.ci_lower, null);
    assert.ok(JSON.stringify(rows).indexOf("NaN") < 0);
  }
});
