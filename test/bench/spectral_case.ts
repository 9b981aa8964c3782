/**
 * The spectral benchmark workload, shared by spectral_bench.ts (deno bench) and
 * spectral_medians.ts (interleaved side by side with spectral_numpy.py): calibrate 100 band
 * models on 17,000 daily cells (ordinary least squares with one factorisation for all bands,
 * or Prais–Winsten per band; 5-fold blocked cross-validation; the cross-band residual
 * correlation), then reconstruct 119,000 days (1700–2025) for every band with 95 % prediction
 * intervals, the first half back-extended through linear sunspot mappings, plus the integral
 * over all bands with the correlation of their errors (values, SDs and intervals only, as the
 * spectral reconstruction keeps them: no per-band error model); and the ensemble: 100 realisations of
 * the 119,000-day reconstruction of every band (core/irradiance/spectral_band_ensemble.ts:
 * coefficients and residual processes correlated across bands, the mappings' parameters and
 * the sunspot number's error, σ = 0.1·R + 2 on the back-extended half, shared by all bands),
 * streamed member by member into per-day, per-band sums and sums of squares (and the integral's),
 * as a NetCDF writer or a reduction would consume them: one member is 11.9 million values
 * (95 MB), the whole ensemble 9.5 GB. Synthetic inputs (invented, seeded).
 */
import {
  type BandModels,
  calibrateBandModels,
  drawSpectralBandMembers,
  fitSunspotMapping,
  integrateBandMembers,
  integrateBandModels,
  type ProxyTerm,
  reconstructFromProxiesMany,
  type ReconstructionModel,
  type SpectralBandEnsemblePlan,
  spectralBandEnsemblePlan,
} from "../../core/irradiance/mod.ts";
import { randomStream } from "../../core/random/mod.ts";

export const BANDS = 100, CAL_DAYS = 17_000, REC_DAYS = 119_000, REALIZATIONS = 100;

/** Running per-point sums of members (of every band and the integral). */
export class MemberSums {
  readonly sum: Float64Array;
  readonly sq: Float64Array;
  readonly isum = new Float64Array(REC_DAYS);
  readonly isq = new Float64Array(REC_DAYS);
  count = 0;
  constructor(readonly weights: Float64Array) {
    this.sum = new Float64Array(REC_DAYS * BANDS);
    this.sq = new Float64Array(REC_DAYS * BANDS);
  }
  /** Add a chunk of members (count × days × bands). */
  add(chunk: Float64Array): void {
    const per = REC_DAYS * BANDS, { sum, sq, isum, isq } = this;
    for (let m = 0; m < chunk.length / per; m++) {
      const x = chunk.subarray(m * per, (m + 1) * per);
      for (let j = 0; j < per; j++) {
        const v = x[j];
        sum[j] += v;
        sq[j] += v * v;
      }
      const s = integrateBandMembers(x, BANDS, this.weights);
      for (let i = 0; i < REC_DAYS; i++) {
        isum[i] += s[i];
        isq[i] += s[i] * s[i];
      }
      this.count++;
    }
  }
  /** SD of band b (or of the integral, b = -1) on day i. */
  sd(i: number, b: number): number {
    const [s, q] = b < 0
      ? [this.isum[i], this.isq[i]]
      : [this.sum[i * BANDS + b], this.sq[i * BANDS + b]];
    const n = this.count, mean = s / n;
    return Math.sqrt((q - n * mean * mean) / (n - 1));
  }
}

/** Sunspot number, facular index and PSI on n days (cycle, noise, AR(1) facular noise). */
function proxies(n: number, seed: number) {
  const s = randomStream(seed);
  const r = new Float64Array(n), f = new Float64Array(n), psi = new Float64Array(n);
  let u = 0;
  for (let t = 0; t < n; t++) {
    r[t] = Math.max(0, 100 * (1 + Math.sin((2 * Math.PI * t) / 4018)) + 20 * s.normal());
    u = 0.5 * u + 0.0002 * s.normal();
    f[t] = 0.15 + 6.5e-5 * r[t] + u;
    psi[t] = Math.max(0, 2.5e-6 * r[t] * (1 + 0.5 * s.normal()));
  }
  return { r, f, psi };
}

/** 100 bands: levels and sensitivities varying with the band, AR(1) errors with a shared part. */
function bands(f: Float64Array, psi: Float64Array, seed: number): Float64Array[] {
  const s = randomStream(seed, 1);
  const n = f.length;
  const out = Array.from({ length: BANDS }, () => new Float64Array(n));
  const e = new Float64Array(BANDS);
  for (let t = 0; t < n; t++) {
    const common = s.normal();
    for (let b = 0; b < BANDS; b++) {
      const level = 0.1 + 2 * Math.exp(-(((b - 30) / 25) ** 2));
      const z = 0.7 * common + 0.714 * s.normal();
      e[b] = 0.7 * e[b] + 1e-4 * level * z;
      out[b][t] = level + level * 3 / (1 + b) * (f[t] - 0.15) -
        level * 0.5 * 1360.8 * psi[t] / level * 1e-3 * (1 + b / 50) + e[b];
    }
  }
  return out;
}

/** The timed tasks, inputs prepared once. */
export function spectralCase() {
  const cal = proxies(CAL_DAYS, 1);
  const terms: ProxyTerm[] = [
    { name: "f", role: "facular", values: cal.f, quietLevel: 0.15 },
    { name: "psi", role: "sunspot_darkening", values: cal.psi },
  ];
  const ys = bands(cal.f, cal.psi, 2);
  const calibrate = (method: "ols" | "prais_winsten") =>
    calibrateBandModels(ys, terms, { method, folds: 5, maxConditionNumber: Infinity });
  const fitted = calibrate("prais_winsten");
  const models: ReconstructionModel[] = fitted.fits.map((f) => ({
    coefficients: f.coefficients,
    covariance: f.covariance,
    terms: f.terms,
    psiReference: 1360.8,
    residualSd: f.residualSd,
    rho: f.rho,
    stepDays: 1,
    backExtension: { residualSd: 3 * f.residualSd, rho: 0.9, stepDays: 1 },
  }));
  const mapF = fitSunspotMapping(cal.r, cal.f, "linear").chosen;
  const mapP = fitSunspotMapping(cal.r, cal.psi, "linear").chosen;
  const rec = proxies(REC_DAYS, 3);
  const half = REC_DAYS / 2;
  const directF = rec.f.map((v, i) => (i < half ? NaN : v));
  const directP = rec.psi.map((v, i) => (i < half ? NaN : v));
  const days = new Float64Array(REC_DAYS).fill(1);
  const corr = fitted.correlation!;
  const weights = Float64Array.from({ length: BANDS }, (_, b) => 5 + b);
  const ensembleCells = {
    days,
    direct: [directF, directP],
    mappings: [mapF, mapP],
    sunspot: rec.r,
    sunspotUncertainty: {
      correlated: new Float64Array(REC_DAYS),
      independent: rec.r.map((r) => 0.1 * r + 2),
      correlationYears: 20,
    },
  };
  const plan = (): SpectralBandEnsemblePlan =>
    spectralBandEnsemblePlan(models, ensembleCells, { residual: corr, backExtension: corr });
  return {
    weights,
    plan,
    /** 100 members in this thread, one at a time into one reused buffer, into running sums. */
    ensemble(): MemberSums {
      const p = plan(), sums = new MemberSums(weights);
      const into = new Float64Array(p.cells * p.bands);
      for (let m = 0; m < REALIZATIONS; m++) {
        sums.add(drawSpectralBandMembers(p, 1, m, 1, { into }));
      }
      return sums;
    },
    calibrateOls: (): BandModels => calibrate("ols"),
    calibratePraisWinsten: (): BandModels => calibrate("prais_winsten"),
    reconstruct() {
      const cells = { days, direct: [directF, directP], mappings: [mapF, mapP], sunspot: rec.r };
      const integral = integrateBandModels(models, weights, {
        residual: corr,
        backExtension: corr,
      });
      return reconstructFromProxiesMany(
        [...models, integral],
        cells,
        models.map(() => 1.96).concat(1.96),
        { errorModel: false },
      );
    },
  };
}
