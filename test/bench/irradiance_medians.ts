/**
 * Side-by-side medians for the irradiance benchmarks: the same two tasks as
 * irradiance_bench.ts, timed with performance.now() over repeated runs, printed in the
 * format of irradiance_numpy.py so the two can be run back to back and compared (the minimum
 * is printed too: on a loaded machine it is the steadier figure):
 *
 *   deno run -A test/bench/irradiance_medians.ts
 *   (unset OPENBLAS_CORETYPE OPENBLAS_L2_SIZE; /usr/bin/python3 test/bench/irradiance_numpy.py)
 */
import {
  calibrateProxyModel,
  evaluateSunspotMapping,
  fitSunspotMapping,
  reconstructFromProxies,
} from "../../core/irradiance/mod.ts";
import { randomStream } from "../../core/random/mod.ts";

function synthetic(n: number, seed: number) {
  const s = randomStream(seed);
  const r = new Float64Array(n), f = new Float64Array(n), psi = new Float64Array(n);
  const y = new Float64Array(n);
  let e = 0, u = 0;
  for (let t = 0; t < n; t++) {
    r[t] = Math.max(0, 100 * (1 + Math.sin((2 * Math.PI * t) / 4018)) + 20 * s.normal());
    u = 0.5 * u + 0.0002 * s.normal();
    f[t] = 0.15 + 6.5e-5 * r[t] + u;
    psi[t] = Math.max(0, 2.5e-6 * r[t] * (1 + 0.5 * s.normal()));
    e = 0.7 * e + 0.107 * s.normal();
    y[t] = 1360.8 + 135 * (f[t] - 0.15) - 0.96 * 1360.8 * psi[t] + e;
  }
  return { r, f, psi, y };
}

const mins: number[] = [];

function medianMs(fn: () => void, repeat: number): number {
  for (let i = 0; i < 3; i++) fn(); // warm-up (JIT)
  const t: number[] = [];
  for (let i = 0; i < repeat; i++) {
    const t0 = performance.now();
    fn();
    t.push(performance.now() - t0);
  }
  t.sort((a, b) => a - b);
  mins.push(t[0]);
  return t.length % 2 ? t[(t.length - 1) / 2] : (t[t.length / 2 - 1] + t[t.length / 2]) / 2;
}

const cal = synthetic(17_000, 1);
const terms = [
  { name: "f", role: "facular" as const, values: cal.f, quietLevel: 0.15 },
  { name: "psi", role: "sunspot_darkening" as const, values: cal.psi },
];
const calMs = medianMs(() => {
  calibrateProxyModel(cal.y, terms, { method: "prais_winsten", folds: 5 });
}, 30);

const fit = calibrateProxyModel(cal.y, terms, { folds: 0 });
const mapF = fitSunspotMapping(cal.r, cal.f, "linear").chosen;
const mapP = fitSunspotMapping(cal.r, cal.psi, "linear").chosen;
const N = 153_000, half = 76_500;
const rec = synthetic(N, 2);
const directF = rec.f.map((v, i) => (i < half ? NaN : v));
const directP = rec.psi.map((v, i) => (i < half ? NaN : v));
const days = new Float64Array(N).fill(1);
const model = {
  coefficients: fit.coefficients,
  covariance: fit.covariance,
  terms: fit.terms,
  psiReference: 1360.8,
  residualSd: fit.residualSd,
  rho: fit.rho,
  stepDays: 1,
  backExtension: { residualSd: 0.3, rho: 0.9, stepDays: 1 },
};
const recMs = medianMs(() => {
  const vf = new Float64Array(N), pf = new Float64Array(N);
  const vp = new Float64Array(N), pp = new Float64Array(N);
  evaluateSunspotMapping(mapF, rec.r, vf, pf);
  evaluateSunspotMapping(mapP, rec.r, vp, pp);
  reconstructFromProxies(model, {
    days,
    direct: [directF, directP],
    mapped: [{ value: vf, paramVariance: pf }, { value: vp, paramVariance: pp }],
  }, 1.96);
}, 50);
console.log(`deno ${Deno.version.deno}`);
console.log(
  `calibrate 17,000 days (Prais-Winsten + 5-fold blocked CV): median ${calMs.toFixed(2)} ms, min ${
    mins[0].toFixed(2)
  } ms`,
);
console.log(
  `reconstruct 153,000 days with 95 % prediction intervals: median ${recMs.toFixed(2)} ms, min ${
    mins[1].toFixed(2)
  } ms`,
);
