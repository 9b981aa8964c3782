import assert from "node:assert/strict";
import {
  backExtensionResiduals,
  calibrateProxyModel,
  drawReconstructionMembers,
  errorModelVariance,
  fitLinearSunspotMapping,
  forcingMembers,
  forcingSeries,
  reconstructFromProxies,
  type ReconstructionCells,
  reconstructionEnsemblePlan,
  type ReconstructionModel,
  SOURCE_BACK_EXTENDED,
  sunspotMappingValues,
} from "../../../core/irradiance/mod.ts";
import { ensembleSummary } from "../../../core/stats/mod.ts";
import { randomStream } from "../../../core/random/mod.ts";
import { periodSequence } from "../../../core/series/mod.ts";

const YEAR = 365.2425;

/**
 * An invented solar world for recovery tests (our own generating model, in the spirit of the
 * demo generator: fixtures/demo/generate.ts): annual cells 1700–2025, sunspot cycles of random
 * length and amplitude over a floor of 20, a facular index linear in the true sunspot number
 * with AR(1) noise, and TSI linear in the facular index with AR(1) noise. The sunspot series
 * is observed with independent errors σ = 0.25·R + 3 before 1850, 0.05·R + 1 from 1900, and a
 * linear blend between; the proxies and TSI are observed from 1978.
 */
function world(seed: number) {
  const s = randomStream(seed, 0);
  const seq = periodSequence(1700, 2025, "annual");
  const n = seq.middle.length, time = seq.middle;
  const rTrue = new Float64Array(n);
  let t0 = 1690 + 11 * s.uniform(), len = 9 + 4 * s.uniform(), amp = 60 + 160 * s.uniform();
  for (let i = 0; i < n; i++) {
    while (time[i] >= t0 + len) {
      t0 += len;
      len = 9 + 4 * s.uniform();
      amp = 60 + 160 * s.uniform();
    }
    rTrue[i] = 20 + amp * Math.sin((Math.PI * (time[i] - t0)) / len) ** 2;
  }
  const ar1 = (sd: number, rho: number) => {
    const e = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      e[i] = i === 0
        ? sd * s.normal()
        : rho * e[i - 1] + sd * Math.sqrt(1 - rho * rho) * s.normal();
    }
    return e;
  };
  const eF = ar1(2e-4, 0.3), eT = ar1(0.05, 0.4);
  const f = rTrue.map((r, i) => 0.15 + 6.5e-5 * r + eF[i]);
  const tsi = f.map((v, i) => 1360.8 + 135 * (v - 0.15) + eT[i]);
  const sigma = rTrue.map((r, i) => {
    const w = Math.min(1, Math.max(0, (time[i] - 1850) / 50));
    return (1 - w) * (0.25 * r + 3) + w * (0.05 * r + 1);
  });
  const rObs = rTrue.map((r, i) => r + sigma[i] * s.normal());
  return { n, time, days: seq.days, rTrue, f, tsi, sigma, rObs };
}

/** Calibrate on 1978–2025, map from sunspot number, and set up the reconstruction's cells. */
function calibrated(w: ReturnType<typeof world>) {
  const first = w.time.findIndex((t) => t >= 1978);
  const ov = (a: Float64Array) => a.slice(first);
  const fit = calibrateProxyModel(ov(w.tsi), [
    { name: "f", role: "facular", values: ov(w.f), quietLevel: 0.15 },
  ], { method: "prais_winsten", folds: 0 });
  const mapping = fitLinearSunspotMapping(ov(w.rObs), ov(w.f));
  const mappedF = sunspotMappingValues(
    "linear",
    mapping.coefficients,
    ov(w.rObs),
    new Float64Array(w.n - first),
  );
  const be = backExtensionResiduals(ov(w.tsi), [mappedF], fit);
  const model: ReconstructionModel = {
    coefficients: fit.coefficients,
    covariance: fit.covariance,
    terms: fit.terms,
    psiReference: fit.psiReference,
    residualSd: fit.residualSd,
    rho: fit.rho,
    stepDays: YEAR,
    backExtension: { residualSd: be.residualSd, rho: be.rho, stepDays: YEAR },
  };
  const cells: ReconstructionCells = {
    days: w.days,
    direct: [w.f.map((v, i) => (i >= first ? v : NaN))],
    mappings: [mapping],
    sunspot: w.rObs,
    sunspotUncertainty: {
      correlated: new Float64Array(w.n),
      independent: w.sigma,
      correlationYears: 20,
    },
  };
  return { model, cells };
}

Deno.test("drawReconstructionMembers() does not depend on how the members are chunked", () => {
  const { model, cells } = calibrated(world(3));
  const plan = reconstructionEnsemblePlan(model, cells);
  const whole = drawReconstructionMembers(plan, 42, 0, 10);
  const parts = [[0, 3], [3, 4], [7, 3]].map(([a, c]) => drawReconstructionMembers(plan, 42, a, c));
  const joined = new Float64Array(whole.length);
  let at = 0;
  for (const p of parts) (joined.set(p, at), (at += p.length));
  // bit-identical: member m always comes from randomStream(seed, m)
  assert.deepEqual(joined, whole);
  assert.notDeepEqual(drawReconstructionMembers(plan, 43, 0, 1), whole.subarray(0, plan.cells));
  // a plan survives structured cloning (what a worker receives) with the same draws
  assert.deepEqual(drawReconstructionMembers(structuredClone(plan), 42, 0, 10), whole);
});

Deno.test("the ensemble's spread matches the analytic error model, source by source", () => {
  const { model, cells } = calibrated(world(5));
  const rec = reconstructFromProxies(model, cells, 1.96);
  const M = 3000;
  const members = drawReconstructionMembers(reconstructionEnsemblePlan(model, cells), 9, 0, M);
  const s = ensembleSummary(members, M);
  const v = errorModelVariance(rec.errorModel);
  // a linear model: the ensemble variance equals the analytic one up to sampling error
  // (relative SE of a variance √(2/(M − 1)) = 2.6 %; 4 SE) and the mean equals ŷ (4 SE)
  const tol = 4 * Math.sqrt(2 / (M - 1));
  for (const i of [0, 50, 150, 250, 300, 320]) {
    const ratio = s.sd[i] ** 2 / v.total[i];
    assert.ok(Math.abs(ratio - 1) < tol, `cell ${i}: ensemble/analytic variance ${ratio}`);
    assert.ok(Math.abs(s.mean[i] - rec.value[i]) < 4 * s.sd[i] / Math.sqrt(M));
  }
  // back in time the sunspot number's own error dominates; in the satellite era it is absent
  assert.ok(rec.components.input[20] > rec.components.residual[20]);
  assert.equal(rec.components.input[310], 0);
  assert.equal(rec.source[20], SOURCE_BACK_EXTENDED);
  assert.ok(rec.sd[20] > 2 * rec.sd[310], "the band grows back in time");
});

Deno.test("forcing σ: members against their own reference mean equal the analytic Var(x − m̄)", () => {
  // direct numerical check of Var(x_t − m̄) = Var(x_t) + Var(m̄) − 2Cov(x_t, m̄)
  const { model, cells } = calibrated(world(8));
  const rec = reconstructFromProxies(model, cells, 1.96);
  const time = Array.from({ length: cells.days.length }, (_, i) => 1700.5 + i);
  const M = 3000;
  const members = drawReconstructionMembers(reconstructionEnsemblePlan(model, cells), 2, 0, M);
  for (const ref of [{ start: 1986, end: 1997 }, { start: 1745, end: 1756 }]) {
    const analytic = forcingSeries(
      time,
      rec.value,
      { kind: "error_model", model: rec.errorModel },
      ref,
    );
    const numeric = ensembleSummary(forcingMembers(time, members, M, ref), M);
    const tol = 4 * Math.sqrt(2 / (M - 1));
    for (const i of [5, 60, 200, 290, 310]) {
      const ratio = numeric.sd[i] ** 2 / analytic.sd![i] ** 2;
      assert.ok(Math.abs(ratio - 1) < tol, `ref ${ref.start} cell ${i}: ratio ${ratio}`);
    }
    // the quiet-Sun level's error is shared with the reference and cancels: the forcing σ in
    // the reference era is below the TSI σ
    const i = time.findIndex((t) => t > ref.start + 5);
    assert.ok(analytic.sd![i] / 0.1775 < rec.sd[i]);
  }
});

Deno.test("recovery: 95 % bands cover 90–98 % of a known truth over 200 worlds, back in time too", () => {
  // synthetic recovery (our own invented worlds): the truth is the generator's TSI, noise
  // included, as the band is a prediction interval for a measured annual TSI
  const eras = { early: [0, 0], late: [0, 0], direct: [0, 0] };
  const ens = { early: [0, 0], direct: [0, 0] };
  const withoutInput = [0, 0];
  for (let seed = 0; seed < 200; seed++) {
    const w = world(1000 + seed);
    const { model, cells } = calibrated(w);
    const rec = reconstructFromProxies(model, cells, 1.96);
    const count = (era: number[], i: number, lo: number, hi: number) => {
      era[1]++;
      if (lo <= w.tsi[i] && w.tsi[i] <= hi) era[0]++;
    };
    for (let i = 0; i < w.n; i++) {
      const era = w.time[i] < 1850 ? eras.early : w.time[i] < 1978 ? eras.late : eras.direct;
      count(era, i, rec.lower[i], rec.upper[i]);
    }
    // the band without the sunspot number's own error (as before it was propagated)
    const old = reconstructFromProxies(model, { ...cells, sunspotUncertainty: null }, 1.96);
    for (let i = 0; i < w.n && w.time[i] < 1850; i++) {
      count(withoutInput, i, old.lower[i], old.upper[i]);
    }
    if (seed % 4 === 0) {
      // the ensemble's own band (quantiles of 200 members) on a quarter of the worlds
      const M = 200;
      const s = ensembleSummary(
        drawReconstructionMembers(reconstructionEnsemblePlan(model, cells), seed, 0, M),
        M,
      );
      for (let i = 0; i < w.n; i++) {
        if (w.time[i] < 1850) count(ens.early, i, s.lower[i], s.upper[i]);
        else if (w.time[i] >= 1978) count(ens.direct, i, s.lower[i], s.upper[i]);
      }
    }
  }
  for (
    const [name, [hit, total]] of Object.entries({
      ...eras,
      ...{ ens_early: ens.early, ens_direct: ens.direct },
    })
  ) {
    const c = hit / total;
    assert.ok(c >= 0.9 && c <= 0.98, `${name}: coverage ${c.toFixed(4)} (${hit}/${total})`);
  }
  // leaving the input's error out makes the early band far too narrow (56 % when written)
  assert.ok(
    withoutInput[0] / withoutInput[1] < 0.8,
    `without input ${withoutInput[0] / withoutInput[1]}`,
  );
});
