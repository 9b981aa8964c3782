/**
 * The irradiance benchmark workload, shared by irradiance_bench.ts (deno bench) and the
 * side-by-side benchmarks (test/bench/peers): calibrate a two-proxy model on 17,000 daily
 * points (Prais–Winsten + 5-fold blocked CV) and reconstruct 153,000 daily points with 95 %
 * prediction intervals, the first half back-extended through sunspot mappings. The same work in
 * numpy: `irradiance_job` in test/bench/peers/peer_side.py. Synthetic inputs (invented, seeded).
 */
import {
  calibrateProxyModel,
  fitSunspotMapping,
  type ProxyModelFit,
  reconstructFromProxies,
  type Reconstruction,
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

/** The two timed tasks, inputs prepared once, and the raw inputs (for the numpy peer). */
export function irradianceCase(): {
  calibrate(): ProxyModelFit;
  reconstruct(): Reconstruction;
  inputs: Record<string, Float64Array>;
} {
  const cal = synthetic(17_000, 1);
  const terms = [
    { name: "f", role: "facular" as const, values: cal.f, quietLevel: 0.15 },
    { name: "psi", role: "sunspot_darkening" as const, values: cal.psi },
  ];
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
  return {
    inputs: {
      cal_r: cal.r,
      cal_f: cal.f,
      cal_psi: cal.psi,
      cal_y: cal.y,
      rec_r: rec.r,
      rec_f: directF,
      rec_psi: directP,
    },
    calibrate() {
      return calibrateProxyModel(cal.y, terms, { method: "prais_winsten", folds: 5 });
    },
    reconstruct() {
      return reconstructFromProxies(model, {
        days,
        direct: [directF, directP],
        mappings: [mapF, mapP],
        sunspot: rec.r,
      }, 1.96);
    },
  };
}
