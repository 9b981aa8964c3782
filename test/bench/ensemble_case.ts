/**
 * The ensemble benchmark case: a daily reconstruction 1700-01-01 to 2025-12-31 (119,069 days)
 * with two proxy terms (facular index and PSI), observed from 1978-01-01 (day 101,537) and
 * mapped from a daily sunspot number before, linear mappings, the sunspot number's error by
 * the documented model (correlated scale error with τ = 20 years, Poisson-like independent
 * error), and AR(1) residual processes of the direct (σ 0.15, ρ 0.7) and back-extended (σ 0.3,
 * ρ 0.9) models at daily steps. All inputs are invented (a sine cycle with noise); the same
 * parameters are written out in ensemble_numpy.py.
 *
 * @module
 */
import {
  fitLinearSunspotMapping,
  modelledSunspotUncertainty,
  type ReconstructionCells,
  type ReconstructionModel,
} from "../../core/irradiance/mod.ts";
import { randomStream } from "../../core/random/mod.ts";

/** Days 1700-01-01 .. 2025-12-31, and the first day with observed proxies (1978-01-01). */
export const DAYS = 119_069, FIRST_DIRECT = 101_537;

/** The model and cells of the case. */
export function ensembleCase(): { model: ReconstructionModel; cells: ReconstructionCells } {
  const s = randomStream(2025, 0);
  const n = DAYS;
  const time = Float64Array.from({ length: n }, (_, i) => 1700 + (i + 0.5) / 365.2425);
  const r = Float64Array.from(
    time,
    (t) => Math.max(0, 100 * (1 + Math.sin((2 * Math.PI * (t - 1700)) / 11)) + 20 * s.normal()),
  );
  const f = Float64Array.from(r, (x) => 0.15 + 6.5e-5 * x + 2e-4 * s.normal());
  const psi = Float64Array.from(r, (x) => Math.max(0, 2.5e-6 * x * (1 + 0.5 * s.normal())));
  const cal = { r: r.slice(FIRST_DIRECT), f: f.slice(FIRST_DIRECT), psi: psi.slice(FIRST_DIRECT) };
  const u = modelledSunspotUncertainty(time, r, 1);
  return {
    model: {
      coefficients: [1360.8, 135, 0.96],
      covariance: [[1e-4, 1e-4, 0], [1e-4, 4, 1e-3], [0, 1e-3, 4e-4]],
      terms: [{ role: "facular", quietLevel: 0.15 }, { role: "sunspot_darkening", quietLevel: 0 }],
      psiReference: 1360.8,
      residualSd: 0.15,
      rho: 0.7,
      stepDays: 1,
      backExtension: { residualSd: 0.3, rho: 0.9, stepDays: 1 },
    },
    cells: {
      days: new Float64Array(n).fill(1),
      direct: [
        f.map((v, i) => (i < FIRST_DIRECT ? NaN : v)),
        psi.map((v, i) => (i < FIRST_DIRECT ? NaN : v)),
      ],
      mappings: [
        fitLinearSunspotMapping(cal.r, cal.f),
        fitLinearSunspotMapping(cal.r, cal.psi),
      ],
      sunspot: r,
      sunspotUncertainty: {
        correlated: u.correlated,
        independent: u.independent,
        correlationYears: 20,
      },
    },
  };
}
