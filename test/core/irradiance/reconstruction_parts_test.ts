import assert from "node:assert/strict";
import {
  ar1MeanVarianceFactor,
  blockedCrossValidation,
  fitLinearSunspotMapping,
  reconstructFromProxies,
  secularBackground,
  tsiCycleAmplitude,
} from "../../../core/irradiance/mod.ts";
import { ordinaryLeastSquares } from "../../../core/stats/mod.ts";
import { InputError } from "../../../core/errors.ts";

Deno.test("ar1MeanVarianceFactor() equals the explicit sum 1 + 2Σ(1 − k/m)ρ^k", () => {
  // definition of the variance of a mean of a stationary AR(1) series (common practice)
  for (const m of [2, 7, 30, 365]) {
    for (const rho of [-0.4, 0.3, 0.7, 0.95]) {
      let s = 1;
      for (let k = 1; k < m; k++) s += 2 * (1 - k / m) * rho ** k;
      assert.ok(Math.abs(ar1MeanVarianceFactor(m, rho) - s) < 1e-9 * s, `m ${m} rho ${rho}`);
    }
  }
  assert.equal(ar1MeanVarianceFactor(0.5, 0.7), 1);
  assert.throws(
    () => ar1MeanVarianceFactor(10, 1),
    (e) => e instanceof InputError && e.field === "rho",
  );
  assert.throws(
    () => ar1MeanVarianceFactor(NaN, 0.5),
    (e) => e instanceof InputError && e.field === "m",
  );
});

Deno.test("blockedCrossValidation() uses contiguous blocks and catches a regime change", () => {
  const n = 100, x = new Float64Array(n), y = new Float64Array(n);
  for (let i = 0; i < n; i++) (x[i] = i), (y[i] = i < 80 ? 2 * i : 2 * i + 50);
  const cv = blockedCrossValidation([x], y, 5, ordinaryLeastSquares);
  assert.deepEqual(cv.blocks, [[0, 19], [20, 39], [40, 59], [60, 79], [80, 99]]);
  // the last block lies after the change, so its held-out error is the largest
  assert.equal(cv.foldRmse.indexOf(Math.max(...cv.foldRmse)), 4);
  const isFolds = (e: unknown) => e instanceof InputError && e.field === "k";
  assert.throws(() => blockedCrossValidation([x], y, 1, ordinaryLeastSquares), isFolds);
  assert.throws(() => blockedCrossValidation([x], y, 51, ordinaryLeastSquares), isFolds);
});

Deno.test("reconstructFromProxies() back-extends with wider bands and leaves gaps empty", () => {
  const model = {
    coefficients: [1360.8, 135],
    covariance: [[1e-4, 0], [0, 4]],
    terms: [{ role: "facular" as const, quietLevel: 0.15 }],
    psiReference: 1360.8,
    residualSd: 0.15,
    rho: 0.7,
    stepDays: 1,
    backExtension: { residualSd: 0.3, rho: 0.9, stepDays: 30.436875 },
  };
  // F = 0.15 + 1e-4·R exactly at R = 100 → 0.16, with parameter covariance diag(1e-8, 1e-12)
  const mapping = {
    ...fitLinearSunspotMapping([0, 50, 100, 150], [0.15, 0.155, 0.16, 0.165]),
    covariance: [[1e-8, 0], [0, 1e-12]],
  };
  const r = reconstructFromProxies(model, {
    days: Float64Array.of(30, 30, 30),
    direct: [Float64Array.of(0.16, NaN, NaN)],
    mappings: [mapping],
    sunspot: Float64Array.of(100, 100, NaN),
  }, 1.96);
  assert.deepEqual([...r.source], [1, 2, 0]);
  assert.ok(Math.abs(r.value[0] - r.value[1]) < 1e-9);
  assert.ok(r.sd[1] > r.sd[0]);
  assert.ok(Number.isNaN(r.value[2]));
  // hand check of the direct monthly variance: xᵀΣx + σ²f(30, ρ)/30
  const q = 1e-4 + 0.01 ** 2 * 4;
  const v = q + 0.15 ** 2 * ar1MeanVarianceFactor(30, 0.7) / 30;
  assert.ok(Math.abs(r.sd[0] - Math.sqrt(v)) < 1e-12);
  // and of the mapped cell: xᵀΣx + β²·gᵀΣ_c g + σ_B²f(m, ρ_B)/m, g = (1, R), m = 30/30.44 → 1
  const vb = q + 135 ** 2 * (1e-8 + 100 ** 2 * 1e-12) + 0.3 ** 2;
  assert.ok(Math.abs(r.sd[1] - Math.sqrt(vb)) < 1e-12, `${r.sd[1]} vs ${Math.sqrt(vb)}`);
  assert.ok(Math.abs(r.components.mapping[1] - 135 ** 2 * 2e-8) < 1e-15);
  assert.ok(Math.abs(r.components.residual[1] - 0.09) < 1e-15);
  assert.equal(r.components.input[1], 0);
  assert.throws(
    () =>
      reconstructFromProxies(
        model,
        { days: new Float64Array(1), direct: [], mappings: [], sunspot: null },
        1.96,
      ),
    (e) => e instanceof InputError && e.field === "cells" && e.reason === "length_mismatch",
  );
});

Deno.test("reconstructFromProxies() two-term path equals the formula cell by cell", () => {
  // first order (delta method): Var = xᵀΣx + Σ_k β_k²·s_k²·gᵀΣ_c g + σ²·f(m, ρ)/m, with the same
  // rules for gaps, for two terms and days of varying length; mapped values c0 + c1·R
  const n = 400;
  const days = Float64Array.from({ length: n }, (_, i) => [1, 1, 30, 31, 365][i % 5]);
  const f = Float64Array.from({ length: n }, (_, i) => (i % 7 === 3 ? NaN : 0.15 + 1e-3 * i));
  const psi = Float64Array.from({ length: n }, (_, i) => (i < 100 ? NaN : 1e-5 * (i % 13)));
  const r = Float64Array.from({ length: n }, (_, i) => (i % 11 === 0 ? NaN : 20 + (i % 150)));
  const linear = (c: number[], cov: number[][]) => ({
    ...fitLinearSunspotMapping([0, 50, 100, 150], [1, 2, 3, 4]),
    coefficients: c,
    covariance: cov,
  });
  const mapF = linear([0.151, 6.5e-5], [[1e-9, -2e-12], [-2e-12, 1e-13]]);
  const mapP = linear([0, 2.5e-6], [[4e-12, 0], [0, 1e-16]]);
  const model = {
    coefficients: [1360.8, 135, 0.96],
    covariance: [[1e-4, 2e-5, -1e-5], [2e-5, 4, 0.1], [-1e-5, 0.1, 0.02]],
    terms: [
      { role: "facular" as const, quietLevel: 0.15 },
      { role: "sunspot_darkening" as const, quietLevel: 0 },
    ],
    psiReference: 1360.8,
    residualSd: 0.15,
    rho: 0.7,
    stepDays: 1,
    backExtension: { residualSd: 0.3, rho: 0.9, stepDays: 1 },
  };
  const cells = { days, direct: [f, psi], mappings: [mapF, mapP], sunspot: r };
  const rec = reconstructFromProxies(model, cells, 2);
  const scale = [1, -1360.8], off = [0.15, 0];
  const S = model.covariance, b = model.coefficients;
  for (let i = 0; i < n; i++) {
    const x = [1], vars = [];
    let mapped = false, ok = true;
    for (const [k, [d, m]] of [[f, mapF], [psi, mapP]].entries()) {
      let v = (d as Float64Array)[i];
      if (Number.isNaN(v)) {
        const mm = m as typeof mapF, R = r[i];
        if (Number.isNaN(R)) ok = false;
        v = mm.coefficients[0] + mm.coefficients[1] * R;
        mapped = true;
        const C = mm.covariance;
        vars.push(b[k + 1] ** 2 * scale[k] ** 2 * (C[0][0] + 2 * R * C[0][1] + R * R * C[1][1]));
      }
      x.push(scale[k] * (v - off[k]));
    }
    if (!ok) {
      assert.equal(rec.source[i], 0);
      assert.ok(Number.isNaN(rec.value[i]) && Number.isNaN(rec.sd[i]));
      continue;
    }
    let q = 0;
    for (let a = 0; a < 3; a++) for (let c = 0; c < 3; c++) q += x[a] * S[a][c] * x[c];
    const [sdr, rho] = mapped ? [0.3, 0.9] : [0.15, 0.7];
    const rv = sdr ** 2 * ar1MeanVarianceFactor(days[i], rho) / days[i];
    const sd = Math.sqrt(q + vars.reduce((s, v) => s + v, 0) + rv);
    const y = b[0] + b[1] * x[1] + b[2] * x[2];
    assert.equal(rec.source[i], mapped ? 2 : 1);
    assert.ok(Math.abs(rec.value[i] - y) < 1e-10, `value ${i}`);
    assert.ok(Math.abs(rec.sd[i] - sd) < 1e-12 * sd, `sd ${i}: ${rec.sd[i]} vs ${sd}`);
    assert.ok(Math.abs(rec.upper[i] - (y + 2 * sd)) < 1e-10);
  }
  // without a back-extension model, mapped cells stay empty
  const direct = reconstructFromProxies({ ...model, backExtension: null }, cells, 2);
  assert.equal(direct.source[0], 0);
  assert.equal(direct.source[101], 0); // facular value mapped (101 mod 7 = 3)
  assert.equal(direct.source[102], 1);
});

Deno.test("secularBackground() refuses periods without data and equal means", () => {
  const t = Array.from({ length: 100 }, (_, i) => 1900 + i + 0.5);
  const r = t.map(() => 50);
  const sc = {
    windowYears: 11,
    referenceMinimum: { start: 1900, end: 1910 },
    laterPeriod: { start: 1950, end: 1960 },
    deltaTsi: 1,
    calibrationPeriod: { start: 1980, end: 2000 },
  };
  const refused = (field: string, reason: string) => (e: unknown) =>
    e instanceof InputError && e.field === field && e.reason === reason;
  assert.throws(() => secularBackground(t, r, sc), refused("laterPeriod", "constant"));
  assert.throws(
    () => secularBackground(t, r, { ...sc, referenceMinimum: { start: 1700, end: 1710 } }),
    refused("referenceMinimum", "no_overlap"),
  );
  assert.throws(
    () => secularBackground(t, r, { ...sc, windowYears: 0 }),
    refused("windowYears", "out_of_range"),
  );
});

Deno.test("tsiCycleAmplitude() finds no cycle in a short or flat series", () => {
  assert.equal(tsiCycleAmplitude([2000.5, 2001.5], [1361, 1362]).median, null);
  const t = Array.from({ length: 30 }, (_, i) => 1990 + i + 0.5);
  assert.equal(tsiCycleAmplitude(t, t.map(() => 1361)).median, null);
});
