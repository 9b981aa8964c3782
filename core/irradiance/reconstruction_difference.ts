/**
 * The difference between two proxy reconstructions of the same quantity from the same proxies
 * (e.g. the integral over spectral bands and a TSI model), with the uncertainty of the
 * difference and a summary of where it exceeds that uncertainty.
 *
 * @module
 */
import { InputError } from "../errors.ts";
import type { ReconstructionModel } from "./proxy_reconstruction.ts";

/**
 * The model of ŷ_A − ŷ_B for two calibrated models on the same terms: coefficients
 * β_A − β_B and covariance Σ_A + Σ_B (the two calibrations treated as independent: different
 * records), with no residual process, so {@link reconstructFromProxies} gives the difference
 * of the two expected values and its standard deviation from the coefficients (and the
 * mapped-proxy variance, which enters through (β_A,k − β_B,k)) only. Measurement noise of
 * either record is not part of it: the question is whether the two models predict the same.
 *
 * @param a the first model
 * @param b the second model (same roles, quiet levels and S_ref)
 * @returns the difference's {@link ReconstructionModel}
 * @throws {InputError} (field `b`, reason `invalid`) when the terms differ
 * @example
 * ```ts
 * import { differenceModel } from "./reconstruction_difference.ts";
 * import assert from "node:assert/strict";
 * const m = (c: number[], v: number) => ({
 *   coefficients: c, covariance: [[v, 0], [0, v]], terms: [{ role: "facular" as const, quietLevel: 0.15 }],
 *   psiReference: 1360.8, residualSd: 0.1, rho: 0.5, stepDays: 1, backExtension: null,
 * });
 * const d = differenceModel(m([1360.8, 135], 0.01), m([1360.5, 130], 0.02));
 * assert.ok(Math.abs(d.coefficients[1] - 5) < 1e-12);
 * assert.ok(Math.abs(d.covariance[0][0] - 0.03) < 1e-15);
 * assert.equal(d.residualSd, 0);
 * ```
 */
export function differenceModel(
  a: ReconstructionModel,
  b: ReconstructionModel,
): ReconstructionModel {
  const same = a.coefficients.length === b.coefficients.length &&
    a.terms.length === b.terms.length && a.psiReference === b.psiReference &&
    a.terms.every((t, k) =>
      t.role === b.terms[k].role && Math.abs(t.quietLevel - b.terms[k].quietLevel) <= 1e-12 *
          Math.max(1, Math.abs(t.quietLevel))
    );
  if (!same) {
    throw new InputError(
      "Cannot difference two models: their terms, quiet levels or S_ref differ",
      { field: "b", reason: "invalid" },
    );
  }
  return {
    coefficients: a.coefficients.map((v, i) => v - b.coefficients[i]),
    covariance: a.covariance.map((row, i) => row.map((v, j) => v + b.covariance[i][j])),
    terms: a.terms.map((t) => ({ ...t })),
    psiReference: a.psiReference,
    residualSd: 0,
    rho: 0,
    stepDays: a.stepDays,
    backExtension: a.backExtension && b.backExtension
      ? { residualSd: 0, rho: 0, stepDays: a.backExtension.stepDays }
      : null,
  };
}

/** Where a difference exceeds its uncertainty (result of {@link summariseDifference}). */
export interface DifferenceSummary {
  /** Cells with a difference and a positive SD. */
  cells: number;
  /** Cells with |d| ≤ z·sd, and their fraction. */
  within: number;
  fractionWithin: number | null;
  /** Mean and RMS of d, and the largest |d| / sd. */
  meanDifference: number | null;
  rmsDifference: number | null;
  maxAbsZ: number | null;
  /** Runs of consecutive compared cells with |d| > z·sd (cell middles), in time order. */
  outside: { start: number; end: number; cells: number; maxAbsDifference: number }[];
}

/**
 * Summarise a difference series d ± sd: how many cells lie within ±z·sd, the mean and RMS
 * difference, the largest |d|/sd, and the runs of cells outside.
 *
 * @param diff the difference and its SD per cell (NaN where there is none)
 * @param time cell middles, decimal years (same length)
 * @param z the interval multiplier (e.g. 1.96)
 * @returns {@link DifferenceSummary}
 * @throws {InputError} (field `time`) when the lengths differ
 * @example
 * ```ts
 * import { summariseDifference } from "./reconstruction_difference.ts";
 * import assert from "node:assert/strict";
 * const s = summariseDifference(
 *   { value: [0.1, 0.5, 0.6, 0.1], sd: [0.1, 0.1, 0.1, 0.1] },
 *   [2001.5, 2002.5, 2003.5, 2004.5], 1.96,
 * );
 * assert.equal(s.within, 2);
 * assert.deepEqual(s.outside.map((o) => [o.start, o.end, o.cells]), [[2002.5, 2003.5, 2]]);
 * ```
 */
export function summariseDifference(
  diff: { value: ArrayLike<number>; sd: ArrayLike<number> },
  time: ArrayLike<number>,
  z: number,
): DifferenceSummary {
  const n = time.length;
  if (diff.value.length !== n || diff.sd.length !== n) {
    throw new InputError(`Cannot summarise a difference: ${diff.value.length} values, ${n} times`, {
      field: "time",
      reason: "length_mismatch",
      value: n,
    });
  }
  let cells = 0, within = 0, sum = 0, sum2 = 0, maxZ = 0;
  const outside: DifferenceSummary["outside"] = [];
  let run: DifferenceSummary["outside"][number] | null = null;
  for (let i = 0; i < n; i++) {
    const d = diff.value[i], s = diff.sd[i];
    if (!Number.isFinite(d) || !(s > 0)) continue;
    cells++;
    sum += d;
    sum2 += d * d;
    const zi = Math.abs(d) / s;
    if (zi > maxZ) maxZ = zi;
    if (zi <= z) {
      within++;
      run = null;
      continue;
    }
    if (!run) {
      run = { start: time[i], end: time[i], cells: 0, maxAbsDifference: 0 };
      outside.push(run);
    }
    run.end = time[i];
    run.cells++;
    run.maxAbsDifference = Math.max(run.maxAbsDifference, Math.abs(d));
  }
  return {
    cells,
    within,
    fractionWithin: cells ? within / cells : null,
    meanDifference: cells ? sum / cells : null,
    rmsDifference: cells ? Math.sqrt(sum2 / cells) : null,
    maxAbsZ: cells ? maxZ : null,
    outside,
  };
}
