import assert from "node:assert/strict";
import { InputError } from "../../../core/errors.ts";
import {
  ar1MeanVarianceFactor,
  calibrateProxyModel,
  CollinearProxiesError,
  psiFromTotalArea,
  reconstructFromProxies,
  tsiCycleAmplitude,
} from "../../../core/irradiance/mod.ts";
import { randomStream } from "../../../core/random/mod.ts";
import { tQuantile } from "../../../core/stats/mod.ts";
import { demoDailyOverlap, demoManifest } from "./demo_data.ts";

Deno.test("calibrateProxyModel() recovers the demo generator's parameters within 95 % intervals", () => {
  // fixtures/demo/manifest.json truth.tsi: TSI = S_Q + a (F − F_Q) − b S_Q PSI + AR(1) noise,
  // PSI = 0.32 · area · 1e-6 (disc-average factor 1)
  const truth = demoManifest.truth.tsi;
  const d = demoDailyOverlap();
  const psi = d.areaMsh.map((a) => psiFromTotalArea(a));
  const m = calibrateProxyModel(d.tsi, [
    { name: "facular", role: "facular", values: d.facular, quietLevel: truth.F_Q },
    { name: "psi", role: "sunspot_darkening", values: psi },
  ], { method: "prais_winsten", psiReference: truth.S_Q });
  assert.ok(m.converged);
  const want = [truth.S_Q, truth.a, truth.b];
  want.forEach((w, j) => {
    assert.ok(
      m.lower[j] <= w && w <= m.upper[j],
      `${m.names[j]}: ${w} ∉ [${m.lower[j]}, ${m.upper[j]}]`,
    );
  });
  assert.ok(Math.abs(m.rho - truth.noise.ar1) < 0.05, `rho ${m.rho}`);
  assert.ok(Math.abs(m.residualSd - truth.noise.sd) < 0.02, `sd ${m.residualSd}`);
  // blocked CV RMSE close to the noise SD (no overfitting with 3 coefficients)
  assert.ok(m.crossValidation!.rmse < 1.2 * truth.noise.sd);
  // Dewitte et al. 2022 (C): daily proxy models reach RMSE ≈ 0.17 W m-2; the demo noise is 0.15
  assert.ok(m.residualRms < 0.17);
});

Deno.test("calibrateProxyModel() OLS intervals are too narrow for AR(1) errors; Prais–Winsten's are not", () => {
  // calibration check over 200 seeds of synthetic data from the demo's model (invented data
  // for a recovery test); nominal 95 %: accept 90–98 % for Prais–Winsten
  const seeds = 200, n = 1200, rho = 0.7, sd = 0.15;
  const truth = [1360.8, 135, 0.96];
  let pwHits = [0, 0, 0], olsHits = 0, dayHits = 0, dayTotal = 0, monthHits = 0, monthTotal = 0;
  for (let seed = 0; seed < seeds; seed++) {
    const s = randomStream(20261201, seed);
    const gen = (len: number) => {
      const f = new Float64Array(len), psi = new Float64Array(len), y = new Float64Array(len);
      let e = sd * s.normal(), u = 0;
      const phase = 2 * Math.PI * s.uniform();
      for (let t = 0; t < len; t++) {
        u = 0.5 * u + 0.0002 * s.normal();
        f[t] = 0.15 + 0.004 * (1 + Math.sin(phase + (2 * Math.PI * t) / 4000)) + u;
        psi[t] = Math.max(0, 2e-4 * (1 + Math.sin((2 * Math.PI * t) / 27)) + 1e-4 * s.normal());
        e = rho * e + sd * Math.sqrt(1 - rho * rho) * s.normal();
        y[t] = truth[0] + truth[1] * (f[t] - 0.15) - truth[2] * 1360.8 * psi[t] + e;
      }
      return { f, psi, y };
    };
    const cal = gen(n);
    const terms = [
      { name: "f", role: "facular" as const, values: cal.f, quietLevel: 0.15 },
      { name: "psi", role: "sunspot_darkening" as const, values: cal.psi },
    ];
    const pw = calibrateProxyModel(cal.y, terms, { folds: 0 });
    const ols = calibrateProxyModel(cal.y, terms, { method: "ols", folds: 0 });
    truth.forEach((w, j) => {
      if (pw.lower[j] <= w && w <= pw.upper[j]) pwHits[j]++;
    });
    if (ols.lower[1] <= truth[1] && truth[1] <= ols.upper[1]) olsHits++;
    // prediction intervals on new days and on 30-day means of new days
    const test = gen(300);
    const model = {
      coefficients: pw.coefficients,
      covariance: pw.covariance,
      terms: pw.terms,
      psiReference: 1360.8,
      residualSd: pw.residualSd,
      rho: pw.rho,
      stepDays: 1,
      backExtension: null,
    };
    const z = tQuantile(0.975, pw.dfResidual);
    const daily = reconstructFromProxies(model, {
      days: new Float64Array(300).fill(1),
      direct: [test.f, test.psi],
      mappings: [null, null],
      sunspot: null,
    }, z);
    for (let t = 0; t < 300; t += 10) {
      dayTotal++;
      if (daily.lower[t] <= test.y[t] && test.y[t] <= daily.upper[t]) dayHits++;
    }
    for (let b = 0; b + 30 <= 300; b += 30) {
      let mf = 0, mp = 0, my = 0;
      for (let t = b; t < b + 30; t++) {
        (mf += test.f[t] / 30), (mp += test.psi[t] / 30), (my += test.y[t] / 30);
      }
      const r = reconstructFromProxies(model, {
        days: Float64Array.of(30),
        direct: [Float64Array.of(mf), Float64Array.of(mp)],
        mappings: [null, null],
        sunspot: null,
      }, z);
      monthTotal++;
      if (r.lower[0] <= my && my <= r.upper[0]) monthHits++;
    }
  }
  pwHits = pwHits.map((h) => h / seeds);
  for (const c of pwHits) assert.ok(c >= 0.9 && c <= 0.98, `PW coverage ${pwHits}`);
  // OLS ignores ρ = 0.7: its nominal 95 % intervals cover clearly less (common practice)
  assert.ok(olsHits / seeds < 0.85, `OLS coverage ${olsHits / seeds}`);
  const dayCov = dayHits / dayTotal, monthCov = monthHits / monthTotal;
  assert.ok(dayCov >= 0.92 && dayCov <= 0.98, `daily PI coverage ${dayCov}`);
  // monthly means: the AR(1) factor keeps the interval honest (√(1/30) alone would undercover)
  assert.ok(monthCov >= 0.9 && monthCov <= 0.985, `monthly PI coverage ${monthCov}`);
  assert.ok(ar1MeanVarianceFactor(30, 0.7) > 4);
});

Deno.test("calibrateProxyModel() refuses collinear proxies with the condition number", () => {
  const n = 100, f = new Float64Array(n), g = new Float64Array(n), y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    f[i] = 0.15 + 0.01 * Math.sin(i / 7);
    g[i] = 2 * f[i] + 1e-9 * Math.cos(i);
    y[i] = 1361 + 100 * (f[i] - 0.15);
  }
  try {
    calibrateProxyModel(y, [
      { name: "f", role: "facular", values: f },
      { name: "g", role: "other", values: g },
    ]);
    assert.fail("expected CollinearProxiesError");
  } catch (e) {
    assert.ok(e instanceof CollinearProxiesError);
    assert.ok(e.conditionNumber > 1000);
    assert.ok(e instanceof InputError && e.field === "terms" && e.reason === "collinear");
    assert.equal(e.value, e.conditionNumber);
  }
});

Deno.test("calibrateProxyModel() needs coefficients + 2 points", () => {
  const f = Float64Array.of(0.15, 0.16, 0.17);
  assert.throws(
    () =>
      calibrateProxyModel(Float64Array.of(1361, 1362, 1363), [{
        name: "f",
        role: "facular",
        values: f,
      }]),
    (e) =>
      e instanceof InputError && e.field === "tsi" && e.reason === "too_few_points" &&
      e.value === 3,
  );
});

Deno.test("tsiCycleAmplitude() of the demo's daily model values is within the published range", () => {
  // Kopp 2016 / IPCC AR6 (C): ~1 W m-2 peak to trough; SCIENCE.md §1 range 0.9–1.6 W m-2
  const d = demoDailyOverlap();
  const truth = demoManifest.truth.tsi;
  const psi = d.areaMsh.map((a) => psiFromTotalArea(a));
  const m = calibrateProxyModel(d.tsi, [
    { name: "facular", role: "facular", values: d.facular, quietLevel: truth.F_Q },
    { name: "psi", role: "sunspot_darkening", values: psi },
  ], { folds: 0 });
  const r = reconstructFromProxies({
    coefficients: m.coefficients,
    covariance: m.covariance,
    terms: m.terms,
    psiReference: m.psiReference,
    residualSd: m.residualSd,
    rho: m.rho,
    stepDays: 1,
    backExtension: null,
  }, {
    days: new Float64Array(d.tsi.length).fill(1),
    direct: [d.facular, psi],
    mappings: [null, null],
    sunspot: null,
  }, 1.96);
  const amp = tsiCycleAmplitude(d.time, r.value);
  assert.ok(amp.median !== null && amp.median >= 0.9 && amp.median <= 1.6, `amp ${amp.median}`);
  // and close to the generator's own amplitudes (manifest truth.tsi.cycle_amplitudes, median)
  const trueAmps = truth.cycle_amplitudes.map((c: { amplitude_w_m2: number }) => c.amplitude_w_m2)
    .sort((a: number, b: number) => a - b);
  assert.ok(Math.abs(amp.median! - trueAmps[1]) < 0.15, `${amp.median} vs ${trueAmps[1]}`);
});
