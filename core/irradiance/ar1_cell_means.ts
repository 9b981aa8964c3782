/**
 * An AR(1) process averaged over consecutive calendar cells: the standard deviation of each
 * cell mean and its correlation with the previous cell's mean.
 *
 * @module
 */
import { InputError } from "../errors.ts";
import { ar1MeanVarianceFactor, ar1Power } from "./ar1_mean_variance.ts";

/** Cell means of an AR(1) process (result of {@link ar1CellMeans}). */
export interface Ar1CellMeans {
  /** SD of each cell's mean, in the process' units. */
  sd: Float64Array;
  /** Correlation of each cell's mean with the previous cell's (0 for the first cell). */
  lag1: Float64Array;
}

/**
 * The means over consecutive cells of a stationary AR(1) process x_t = ρx_{t−1} + e_t with
 * marginal SD σ at steps of `stepDays`. A cell of d days holds m = max(1, d/step) steps; its
 * mean has variance σ²·f(m, ρ)/m ({@link ar1MeanVarianceFactor}). Adjacent cells of m₁ and m₂
 * steps have covariance σ²/(m₁m₂)·S(m₁)·ρ·S(m₂) with S(m) = (1 − ρ^m)/(1 − ρ) (the double sum
 * of ρ^{|s−t|} over the two blocks: Box, Jenkins & Reinsel 2008, Time Series Analysis, §3.1.3
 * for the AR(1) autocovariance; the sum is geometric). Where both cells are shorter than one
 * step (daily cells of a monthly process) the process is read as its continuous-time form
 * (Ornstein–Uhlenbeck) at the cell middles: correlation ρ^{Δ/step} for Δ days between the
 * middles, 0 for ρ ≤ 0.
 *
 * Drawing u_i = r_i·u_{i−1} + √(1 − r_i²)·z_i with r_i = `lag1[i]` and scaling by `sd[i]`
 * reproduces each cell's variance and each adjacent pair's correlation exactly; correlations
 * over longer lags are the products of the lag-1 ones (close to, and for one-step cells equal
 * to, those of the averaged process).
 *
 * @param days length of each cell in days (> 0)
 * @param sd σ, the marginal SD of the process (≥ 0)
 * @param rho ρ in (−1, 1)
 * @param stepDays the process' step in days (> 0)
 * @returns {@link Ar1CellMeans}
 * @throws {InputError} (field `days`, `sd`, `rho` or `stepDays`) when out of range
 * @example
 * ```ts
 * import { ar1CellMeans } from "./ar1_cell_means.ts";
 * import assert from "node:assert/strict";
 * // daily process, daily cells: the process itself
 * const d = ar1CellMeans([1, 1, 1], 0.15, 0.7, 1);
 * assert.ok(Math.abs(d.sd[1] - 0.15) < 1e-15 && Math.abs(d.lag1[1] - 0.7) < 1e-15);
 * // two-day cells: var = σ²(1 + ρ)/2, adjacent covariance σ²(1 + ρ)ρ(1 + ρ)/4
 * const w = ar1CellMeans([2, 2], 1, 0.5, 1);
 * assert.ok(Math.abs(w.sd[0] ** 2 - 0.75) < 1e-12);
 * assert.ok(Math.abs(w.lag1[1] - (1.5 * 0.5 * 1.5 / 4) / 0.75) < 1e-12);
 * ```
 */
export function ar1CellMeans(
  days: ArrayLike<number>,
  sd: number,
  rho: number,
  stepDays: number,
): Ar1CellMeans {
  checkAr1(sd, rho, stepDays);
  const n = days.length;
  const out = { sd: new Float64Array(n), lag1: new Float64Array(n) };
  const sdOut = out.sd, lagOut = out.lag1;
  const varOf = new Map<number, number>();
  const steps = (d: number) => Math.max(1, d / stepDays);
  let lastD0 = NaN, lastD = NaN, lastLag = 0;
  let lastDays = NaN, lastVar = NaN, lastSd = NaN;
  const geometric = (m: number) => (rho === 0 ? 1 : (1 - ar1Power(rho, m)) / (1 - rho));
  let d0 = NaN;
  for (let i = 0; i < n; i++) {
    const d = days[i];
    // runs of equal cell lengths (days, months) reuse the previous cell's variance and SD
    let v: number, s: number;
    if (d === lastDays) v = lastVar, s = lastSd;
    else {
      if (!(d > 0) || !Number.isFinite(d)) {
        throw badCell(i, d);
      }
      let cached = varOf.get(d);
      if (cached === undefined) {
        cached = cellMeanVariance(d, sd, rho, stepDays);
        varOf.set(d, cached);
      }
      v = lastVar = cached;
      s = lastSd = Math.sqrt(v);
      lastDays = d;
    }
    sdOut[i] = s;
    const prev = d0;
    d0 = d;
    if (i === 0 || v === 0) continue;
    // ... and the same pair of lengths gives the same lag-1 correlation
    if (prev === lastD0 && d === lastD) {
      lagOut[i] = lastLag;
      continue;
    }
    let r: number;
    if (prev < stepDays && d < stepDays) {
      r = rho > 0 ? Math.pow(rho, (prev + d) / 2 / stepDays) : 0;
    } else {
      const m0 = steps(prev), m1 = steps(d);
      const cov = (sd * sd * geometric(m0) * rho * geometric(m1)) / (m0 * m1);
      r = cov / (sdOut[i - 1] * s);
    }
    lagOut[i] = lastLag = Math.max(-1, Math.min(1, r));
    lastD0 = prev;
    lastD = d;
  }
  return out;
}

/**
 * The SDs alone of {@link ar1CellMeans} (each cell's, which depends on its length only), the
 * same numbers bit for bit, without the lag-1 correlations: for a variance computed a block of
 * cells at a time (core/irradiance/proxy_reconstruction_errors.ts).
 *
 * @param days length of each cell in days (> 0)
 * @param sd σ, the marginal SD of the process (≥ 0)
 * @param rho ρ in (−1, 1)
 * @param stepDays the process' step in days (> 0)
 * @param into where to write the SDs (default: a new array of `days.length`)
 * @returns `into`, the SD of each cell's mean
 * @throws {InputError} as {@link ar1CellMeans} (the index of a bad cell is its index in `days`)
 * @example
 * ```ts
 * import { ar1CellMeans, ar1CellMeanSd } from "./ar1_cell_means.ts";
 * import assert from "node:assert/strict";
 * const days = Float64Array.of(31, 28, 31, 1);
 * assert.deepEqual(ar1CellMeanSd(days, 0.2, 0.6, 1), ar1CellMeans(days, 0.2, 0.6, 1).sd);
 * ```
 */
export function ar1CellMeanSd(
  days: ArrayLike<number>,
  sd: number,
  rho: number,
  stepDays: number,
  into: Float64Array = new Float64Array(days.length),
): Float64Array {
  checkAr1(sd, rho, stepDays);
  let lastDays = NaN, lastSd = NaN;
  for (let i = 0; i < days.length; i++) {
    const d = days[i];
    if (d !== lastDays) {
      if (!(d > 0) || !Number.isFinite(d)) throw badCell(i, d);
      lastSd = Math.sqrt(cellMeanVariance(d, sd, rho, stepDays));
      lastDays = d;
    }
    into[i] = lastSd;
  }
  return into;
}

/** σ²·f(m, ρ)/m for a cell of d days, m = max(1, d/step) steps. */
function cellMeanVariance(d: number, sd: number, rho: number, stepDays: number): number {
  const m = Math.max(1, d / stepDays);
  return (sd * sd * ar1MeanVarianceFactor(m, rho)) / m;
}

function badCell(i: number, d: number): InputError {
  return new InputError(`Cannot average an AR(1) process: cell ${i} has ${d} days`, {
    field: "days",
    reason: "out_of_range",
    index: i,
    value: d,
  });
}

function checkAr1(sd: number, rho: number, stepDays: number): void {
  if (!(sd >= 0) || !Number.isFinite(sd)) {
    throw new InputError(`Cannot average an AR(1) process: sd must be ≥ 0, got ${sd}`, {
      field: "sd",
      reason: "out_of_range",
      value: sd,
    });
  }
  if (!(rho > -1 && rho < 1)) {
    throw new InputError(`Cannot average an AR(1) process: rho must be in (-1, 1), got ${rho}`, {
      field: "rho",
      reason: "out_of_range",
      value: rho,
    });
  }
  if (!(stepDays > 0) || !Number.isFinite(stepDays)) {
    throw new InputError(
      `Cannot average an AR(1) process: stepDays must be > 0, got ${stepDays}`,
      { field: "stepDays", reason: "out_of_range", value: stepDays },
    );
  }
}
