import assert from "node:assert/strict";
import { deviation, mean } from "d3-array";
import {
  backExtensionResiduals,
  calibrateProxyModel,
  countBeyondMappingRange,
  countFarOutsideRange,
  drawMappedProxy,
  evaluateProxyModel,
  evaluateSunspotMapping,
  fitLinearSunspotMapping,
  fitSaturatingSunspotMapping,
  reconstructFromProxies,
  reconstructionCoverage,
  withSecularBackground,
} from "../../../core/irradiance/mod.ts";
import { randomStream } from "../../../core/random/mod.ts";
import { residualLag1 } from "../../../core/stats/mod.ts";
import { InputError } from "../../../core/errors.ts";
import { demoDailyOverlap, demoManifest } from "./demo_data.ts";

Deno.test("the proxy model is evaluated once: calibration, reconstruction and back-extension agree", () => {
  // SYNTHETIC demo (fixtures/demo): TSI = S_Q + a(F − F_Q) − b·S_Q·PSI + AR(1) noise
  const d = demoDailyOverlap();
  const n = 2000;
  const f = d.facular.slice(0, n), psi = d.areaMsh.slice(0, n).map((a) => 0.32 * a * 1e-6);
  const fit = calibrateProxyModel(d.tsi.slice(0, n), [
    { name: "mg", role: "facular", values: f, quietLevel: demoManifest.truth.tsi.F_Q },
    { name: "psi", role: "sunspot_darkening", values: psi },
  ], { method: "ols", folds: 0 });
  const yhat = evaluateProxyModel(fit, [f, psi]);
  // calibration's fitted values are TSI − residual: the same ŷ to rounding
  for (let i = 0; i < n; i += 50) assert.ok(Math.abs(fit.fitted[i] - yhat[i]) < 1e-9);
  // the reconstruction's values for direct proxies are the same ŷ, bit for bit
  const rec = reconstructFromProxies(
    {
      coefficients: fit.coefficients,
      covariance: fit.covariance,
      terms: fit.terms,
      psiReference: fit.psiReference,
      residualSd: fit.residualSd,
      rho: fit.rho,
      stepDays: 1,
      backExtension: null,
    },
    { days: new Float64Array(n).fill(1), direct: [f, psi], mappings: [null, null], sunspot: null },
    1.96,
  );
  assert.deepEqual(Array.from(rec.value), Array.from(yhat));
  // and the back-extension residuals of exact "mapped" proxies are TSI − ŷ
  const be = backExtensionResiduals(d.tsi.slice(0, n), [f, psi], fit);
  assert.deepEqual(Array.from(be.residuals), Array.from(d.tsi.slice(0, n), (y, i) => y - yhat[i]));
});

Deno.test("backExtensionResiduals(): RMS and Cochrane–Orcutt ρ̂ of TSI − ŷ over the usable cells", () => {
  const model = {
    coefficients: [1360.8, 100],
    terms: [{ role: "facular" as const, quietLevel: 0.15 }],
    psiReference: 1360.8,
  };
  const mapped = [[0.15, 0.16, NaN, 0.17, 0.18, 0.19]];
  const tsi = [1360.9, 1361.7, 1361.0, NaN, 1363.5, 1364.9];
  // usable cells 0, 1, 4, 5: residuals 0.1, −0.1, −0.3, 0.1 (worked by hand)
  const r = backExtensionResiduals(tsi, mapped, model);
  assert.equal(r.n, 4);
  const want = [0.1, -0.1, -0.3, 0.1];
  r.residuals.forEach((v, i) => assert.ok(Math.abs(v - want[i]) < 1e-9));
  assert.ok(Math.abs(r.residualSd - Math.sqrt(0.12 / 4)) < 1e-9);
  assert.ok(Math.abs(r.rho - residualLag1(Float64Array.from(want))) < 1e-9);
  // ρ̂ is clamped inside (−1, 1) so the AR(1) variance factor stays defined
  const alternating = backExtensionResiduals([1360.9, 1360.7, 1360.9, 1360.7], [[
    0.15,
    0.15,
    0.15,
    0.15,
  ]], model);
  assert.ok(alternating.rho >= -0.999);
  assert.throws(
    () => backExtensionResiduals([1361, NaN, 1361], [[0.15, 0.15, 0.15]], model),
    (e) =>
      e instanceof InputError && e.field === "tsi" && e.reason === "too_few_points" &&
      e.value === 2,
  );
  assert.throws(
    () => backExtensionResiduals([1361], [[0.15, 0.15]], model),
    (e) => e instanceof InputError && e.field === "mapped" && e.index === 0,
  );
});

Deno.test("drawMappedProxy(): seeded draws reproduce, and their spread matches the delta-method variance", () => {
  // invented linear relation with noise: F = 0.15 + 1e-4 R
  const st = randomStream(7, 0);
  const r = Array.from({ length: 60 }, (_, i) => 5 * i);
  const f = r.map((x) => 0.15 + 1e-4 * x + 0.002 * st.normal());
  const m = fitLinearSunspotMapping(r, f);
  const at = [0, 120, 400];
  const v = new Float64Array(3), pv = new Float64Array(3);
  evaluateSunspotMapping(m, at, v, pv);
  assert.deepEqual(
    drawMappedProxy(m, at, randomStream(3, 1)),
    drawMappedProxy(m, at, randomStream(3, 1)),
  );
  const members = Array.from(
    { length: 4000 },
    (_, k) => drawMappedProxy(m, at, randomStream(3, k)),
  );
  for (let j = 0; j < 3; j++) {
    const x = members.map((d) => d[j]);
    const sd = Math.sqrt(pv[j]);
    // Monte Carlo tolerance: 4 standard errors of the mean and of the SD (4000 draws)
    assert.ok(Math.abs(mean(x)! - v[j]) < 4 * sd / Math.sqrt(4000), `mean at ${at[j]}`);
    assert.ok(Math.abs(deviation(x)! / sd - 1) < 4 / Math.sqrt(2 * 4000), `sd at ${at[j]}`);
  }
  // one draw shares its parameters across cells: the members' values at 0 and 400 correlate
  // as the delta method says (linear: Cov = s00 + 400·s01)
  const x0 = members.map((d) => d[0]), x2 = members.map((d) => d[2]);
  const m0 = mean(x0)!, m2 = mean(x2)!;
  const cov = mean(x0.map((a, i) => (a - m0) * (x2[i] - m2)))!;
  const want = m.covariance[0][0] + 400 * m.covariance[0][1];
  assert.ok(Math.abs(cov - want) < 0.1 * Math.sqrt(pv[0] * pv[2]));
});

Deno.test("drawMappedProxy() refuses a mapping whose R0 is not identified", () => {
  // exactly linear data: the saturating fit cannot identify R0 (infinite variance)
  const r = [0, 20, 40, 60, 80, 100, 140, 180];
  const s = fitSaturatingSunspotMapping(r, r.map((x) => 0.15 + 1e-4 * x));
  if (s.covariance.every((row) => row.every(Number.isFinite))) return; // identified after all
  assert.throws(
    () => drawMappedProxy(s, [10], randomStream(1, 0)),
    (e) => e instanceof InputError && e.field === "mapping" && e.reason === "invalid",
  );
});

Deno.test("reconstructionCoverage() and withSecularBackground(): sources, runs and a missing background", () => {
  const rec = {
    value: Float64Array.of(1, 2, 3, 4, NaN),
    sd: Float64Array.of(0.1, 0.1, 0.1, 0.1, NaN),
    lower: Float64Array.of(0.8, 1.8, 2.8, 3.8, NaN),
    upper: Float64Array.of(1.2, 2.2, 3.2, 4.2, NaN),
    source: Uint8Array.of(2, 2, 1, 1, 0),
  };
  const time = [1.5, 2.5, 3.5, 4.5, 5.5];
  const c = reconstructionCoverage(rec, time);
  assert.deepEqual(c.backExtended, { cells: 2, start: 1.5, end: 2.5 });
  assert.deepEqual(c.direct, { cells: 2, start: 3.5, end: 4.5 });
  assert.equal(c.missing, 1);
  assert.deepEqual(c.segments.map((s) => [s.source, s.cells]), [
    ["back_extended", 2],
    ["direct", 2],
    ["none", 1],
  ]);
  const b = withSecularBackground(rec, [0.5, NaN, 0.5, 0.5, 0.5]);
  assert.equal(b.value[0], 1.5);
  assert.equal(b.upper[0] - b.lower[0], rec.upper[0] - rec.lower[0]);
  assert.ok(Number.isNaN(b.value[1]) && Number.isNaN(b.sd[1]));
  assert.equal(reconstructionCoverage(b, time).missing, 2);
  assert.equal(rec.value[1], 2, "the input is not changed");
});

Deno.test("extrapolation checks count cells far outside the calibration and mapping ranges", () => {
  // range [0.15, 0.17], a quarter of it is 0.005: 0.144 and 0.176 are far outside
  assert.equal(countFarOutsideRange([0.144, 0.146, 0.17, 0.174, 0.176, NaN], 0.15, 0.17), 2);
  assert.equal(countBeyondMappingRange([100, 260, 260, NaN], [1, 1, 0, 1], 200), 1);
  assert.throws(
    () => countFarOutsideRange([1], 2, 1),
    (e) => e instanceof InputError && e.field === "max",
  );
});
