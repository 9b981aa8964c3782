import assert from "node:assert/strict";
import {
  bandBackExtension,
  type BandCorrelations,
  bandMembers,
  calibrateBandModels,
  drawSpectralBandMembers,
  fitLinearSunspotMapping,
  integrateBandMembers,
  integrateBandModels,
  reconstructFromProxies,
  type ReconstructionCells,
  type ReconstructionModel,
  spectralBandEnsemblePlan,
  sunspotMappingValues,
} from "../../../core/irradiance/mod.ts";
import { ensembleSummary } from "../../../core/stats/mod.ts";
import { randomStream } from "../../../core/random/mod.ts";
import { InputError } from "../../../core/errors.ts";
import { periodSequence } from "../../../core/series/mod.ts";

const YEAR = 365.2425;
const B = 4;

/**
 * An invented spectral world for recovery tests (our own generating model, as the TSI one in
 * reconstruction_ensemble_test.ts): annual cells 1700–2025, sunspot cycles of random length and
 * amplitude, a facular index linear in the true sunspot number with AR(1) noise, and 4 bands
 * linear in the facular index (sensitivity falling with the band) with AR(1) errors of
 * different autocorrelation that share a common part (lag-0 correlation about 0.5–0.7). The
 * sunspot series is observed with independent errors σ = 0.25·R + 3 before 1850, 0.05·R + 1
 * from 1900; the proxies and the bands are observed from 1978.
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
  const eF = new Float64Array(n);
  for (let i = 0; i < n; i++) eF[i] = (i ? 0.3 * eF[i - 1] : 0) + 2e-4 * s.normal();
  const f = rTrue.map((r, i) => 0.15 + 6.5e-5 * r + eF[i]);
  const rho = [0.2, 0.4, 0.5, 0.3], sd = [0.004, 0.002, 0.003, 0.001];
  const level = [0.5, 1.2, 1.6, 1.0], sens = [40, 8, 2, 0.5];
  const u = new Float64Array(B);
  const bands = Array.from({ length: B }, () => new Float64Array(n));
  for (let i = 0; i < n; i++) {
    const common = s.normal();
    for (let b = 0; b < B; b++) {
      const z = 0.8 * common + 0.6 * s.normal();
      u[b] = i ? rho[b] * u[b] + Math.sqrt(1 - rho[b] ** 2) * z : z;
      bands[b][i] = level[b] + sens[b] * (f[i] - 0.15) + sd[b] * u[b];
    }
  }
  const sigma = rTrue.map((r, i) => {
    const w = Math.min(1, Math.max(0, (time[i] - 1850) / 50));
    return (1 - w) * (0.25 * r + 3) + w * (0.05 * r + 1);
  });
  const rObs = rTrue.map((r, i) => r + sigma[i] * s.normal());
  return { n, time, days: seq.days, f, bands, sigma, rObs };
}

/** Calibrate the bands on 1978–2025, map from sunspot number, and set up the cells. */
function calibrated(w: ReturnType<typeof world>) {
  const first = w.time.findIndex((t) => t >= 1978);
  const ov = (a: Float64Array) => a.slice(first);
  const fitted = calibrateBandModels(
    w.bands.map(ov),
    [{ name: "f", role: "facular", values: ov(w.f), quietLevel: 0.15 }],
    { method: "prais_winsten", folds: 0 },
  );
  const mapping = fitLinearSunspotMapping(ov(w.rObs), ov(w.f));
  const mappedF = sunspotMappingValues(
    "linear",
    mapping.coefficients,
    ov(w.rObs),
    new Float64Array(w.n - first),
  );
  const be = bandBackExtension(w.bands.map(ov), [mappedF], fitted.fits);
  const models: ReconstructionModel[] = fitted.fits.map((fit, b) => ({
    coefficients: fit.coefficients,
    covariance: fit.covariance,
    terms: fit.terms,
    psiReference: fit.psiReference,
    residualSd: fit.residualSd,
    rho: fit.rho,
    stepDays: YEAR,
    backExtension: { residualSd: be.perBand[b].residualSd, rho: be.perBand[b].rho, stepDays: YEAR },
  }));
  const correlations: BandCorrelations = {
    residual: { lag0: fitted.correlation!.lag0, lag1: fitted.correlation!.lag1 },
    backExtension: { lag0: be.correlation!.lag0, lag1: be.correlation!.lag1 },
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
  return { models, correlations, cells };
}

const WEIGHTS = [2, 3, 1, 5];

Deno.test("drawSpectralBandMembers() does not depend on how the members are chunked", () => {
  const { models, correlations, cells } = calibrated(world(3));
  const plan = spectralBandEnsemblePlan(models, cells, correlations);
  const whole = drawSpectralBandMembers(plan, 42, 0, 9);
  const parts = [[0, 2], [2, 5], [7, 2]].map(([a, c]) => drawSpectralBandMembers(plan, 42, a, c));
  const joined = new Float64Array(whole.length);
  let at = 0;
  for (const p of parts) (joined.set(p, at), (at += p.length));
  // bit-identical: member m always comes from randomStream(seed, m)
  assert.deepEqual(joined, whole);
  assert.notDeepEqual(drawSpectralBandMembers(plan, 43, 0, 1), whole.subarray(0, plan.cells * B));
  // a plan survives structured cloning (what a worker receives) with the same draws
  assert.deepEqual(drawSpectralBandMembers(structuredClone(plan), 42, 0, 9), whole);
  assert.deepEqual(plan.adjusted, []);
});

Deno.test("drawSpectralBandMembers() writes into a reused buffer the same numbers", () => {
  const { models, correlations, cells } = calibrated(world(3));
  const plan = spectralBandEnsemblePlan(models, cells, correlations);
  const into = new Float64Array(plan.cells * B).fill(123); // stale values are overwritten
  for (const m of [0, 4]) {
    const got = drawSpectralBandMembers(plan, 42, m, 1, { into });
    assert.equal(got, into);
    assert.deepEqual(got, drawSpectralBandMembers(plan, 42, m, 1));
  }
  assert.throws(
    () => drawSpectralBandMembers(plan, 42, 0, 2, { into }),
    (e) => e instanceof InputError && e.field === "into",
  );
});

Deno.test("spectral members: mean and SD equal the analytic band, per band and for an integral", () => {
  const { models, correlations, cells } = calibrated(world(5));
  const M = 3000;
  const members = drawSpectralBandMembers(
    spectralBandEnsemblePlan(models, cells, correlations),
    9,
    0,
    M,
  );
  // a linear model with cells of one residual step: the ensemble variance equals the analytic
  // one up to sampling error (relative SE of a variance √(2/(M − 1)) = 2.6 %; 4 SE)
  const tol = 4 * Math.sqrt(2 / (M - 1));
  const check = (rec: ReturnType<typeof reconstructFromProxies>, m: Float64Array, what: string) => {
    const s = ensembleSummary(m, M);
    for (const i of [0, 50, 150, 250, 280, 300, 320]) {
      const ratio = s.sd[i] ** 2 / rec.sd[i] ** 2;
      assert.ok(
        Math.abs(ratio - 1) < tol,
        `${what} cell ${i}: ensemble/analytic variance ${ratio}`,
      );
      assert.ok(Math.abs(s.mean[i] - rec.value[i]) < (4 * s.sd[i]) / Math.sqrt(M), what);
    }
  };
  models.forEach((m, b) => {
    check(reconstructFromProxies(m, cells, 1.96), bandMembers(members, B, b), `band ${b}`);
  });
  const integral = integrateBandModels(models, WEIGHTS, correlations);
  check(
    reconstructFromProxies(integral, cells, 1.96),
    integrateBandMembers(members, B, WEIGHTS),
    "integral",
  );
});

Deno.test("spectral members: the cross-band correlation of member errors is the model's", () => {
  const { models, correlations, cells } = calibrated(world(7));
  const M = 4000;
  const members = drawSpectralBandMembers(
    spectralBandEnsemblePlan(models, cells, correlations),
    11,
    0,
    M,
  );
  const variance = (m: ReconstructionModel, i: number) =>
    reconstructFromProxies(m, cells, 1.96).sd[i] ** 2;
  for (const i of [30, 200, 310]) { // back-extended early and late, and direct
    for (const [a, b] of [[0, 1], [1, 2], [0, 3]]) {
      // the model's covariance from Var(S_a + S_b) = Var(S_a) + Var(S_b) + 2 Cov(S_a, S_b),
      // the sum's variance from integrateBandModels (the analytic integral)
      const w = [0, 0, 0, 0];
      w[a] = w[b] = 1;
      const va = variance(models[a], i), vb = variance(models[b], i);
      const cov = (variance(integrateBandModels(models, w, correlations), i) - va - vb) / 2;
      const expected = cov / Math.sqrt(va * vb);
      const xa = bandMembers(members, B, a), xb = bandMembers(members, B, b);
      const n = cells.days.length;
      let ma = 0, mb = 0;
      for (let m = 0; m < M; m++) (ma += xa[m * n + i] / M, mb += xb[m * n + i] / M);
      let sab = 0, saa = 0, sbb = 0;
      for (let m = 0; m < M; m++) {
        const da = xa[m * n + i] - ma, db = xb[m * n + i] - mb;
        sab += da * db;
        saa += da * da;
        sbb += db * db;
      }
      const r = sab / Math.sqrt(saa * sbb);
      // SE of a sample correlation ≈ (1 − ρ²)/√M (Fisher 1915); 4 SE
      const se = (1 - expected ** 2) / Math.sqrt(M);
      assert.ok(
        Math.abs(r - expected) < 4 * se + 1e-3,
        `cell ${i} bands ${a},${b}: ensemble r ${r.toFixed(4)}, model ${expected.toFixed(4)}`,
      );
    }
  }
});

Deno.test("spectral recovery: 95 % member bands cover 90–98 % of a known truth, per band and integral", () => {
  // synthetic recovery (our own invented worlds): the truth is the generator's band values,
  // noise included, as the band is a prediction interval for a measured annual value
  const hits = { band: [0, 0], integral: [0, 0], early: [0, 0] };
  const M = 200;
  for (let seed = 0; seed < 60; seed++) {
    const w = world(2000 + seed);
    const { models, correlations, cells } = calibrated(w);
    const members = drawSpectralBandMembers(
      spectralBandEnsemblePlan(models, cells, correlations),
      seed,
      0,
      M,
    );
    const count = (k: number[], truth: number, lo: number, hi: number) => {
      k[1]++;
      if (lo <= truth && truth <= hi) k[0]++;
    };
    for (let b = 0; b < B; b++) {
      const s = ensembleSummary(bandMembers(members, B, b), M);
      for (let i = 0; i < w.n; i++) {
        count(hits.band, w.bands[b][i], s.lower[i], s.upper[i]);
        if (w.time[i] < 1850) count(hits.early, w.bands[b][i], s.lower[i], s.upper[i]);
      }
    }
    const s = ensembleSummary(integrateBandMembers(members, B, WEIGHTS), M);
    for (let i = 0; i < w.n; i++) {
      const truth = WEIGHTS.reduce((a, wb, b) => a + wb * w.bands[b][i], 0);
      count(hits.integral, truth, s.lower[i], s.upper[i]);
    }
  }
  for (const [name, [hit, total]] of Object.entries(hits)) {
    const c = hit / total;
    console.log(`coverage ${name}: ${(100 * c).toFixed(2)} % (${hit}/${total})`);
    assert.ok(c >= 0.9 && c <= 0.98, `${name}: coverage ${c.toFixed(4)} (${hit}/${total})`);
  }
});

Deno.test("spectralBandEnsemblePlan() refuses bands that do not share terms, and says what it adjusts", () => {
  const band = (rho: number, be: boolean): ReconstructionModel => ({
    coefficients: [1, 2],
    covariance: [[1e-6, 0], [0, 1e-2]],
    terms: [{ role: "facular", quietLevel: 0.15 }],
    psiReference: 1360.8,
    residualSd: 0.01,
    rho,
    stepDays: 1,
    backExtension: be ? { residualSd: 0.02, rho: 0.5, stepDays: 1 } : null,
  });
  const cells: ReconstructionCells = {
    days: new Float64Array(5).fill(1),
    direct: [Float64Array.of(0.15, 0.16, 0.17, 0.16, 0.15)],
    mappings: [null],
    sunspot: null,
  };
  assert.throws(
    () => spectralBandEnsemblePlan([band(0.5, true), band(0.5, false)], cells, null),
    (e: Error & { field?: string; index?: number }) => e.field === "models" && e.index === 1,
  );
  assert.throws(
    () =>
      spectralBandEnsemblePlan([band(0.5, false), band(0.5, false)], cells, {
        residual: { lag0: [[1]], lag1: [[1]] },
        backExtension: null,
      }),
    (e: Error & { field?: string }) => e.field === "correlations",
  );
  // no correlation: independent bands, said so
  assert.match(
    spectralBandEnsemblePlan([band(0.5, false)], cells, null).adjusted[0],
    /independent/,
  );
  // bands of very different autocorrelation cannot be perfectly correlated: C is repaired
  const one = [[1, 1], [1, 1]];
  const plan = spectralBandEnsemblePlan([band(0, false), band(0.9, false)], cells, {
    residual: { lag0: one, lag1: one },
    backExtension: null,
  });
  assert.ok(plan.adjusted.some((a) => /not positive definite/.test(a)));
  assert.ok(drawSpectralBandMembers(plan, 1, 0, 3).every(Number.isFinite));
});
