/**
 * Area-weighted mean series of a gridded field over a region, with missing cells skipped and
 * the weights renormalised per time step:
 *
 *   ȳ(t) = Σ_c w_c m_c y_c(t) / Σ_c w_c m_c,  sums over the cells present at t,
 *
 * w_c the cell's area weight (cos φ or the area from bounds, see area_weights.ts), m_c its
 * membership in the region (area_region.ts). The covered fraction of the region at t is
 * Σ_present w_c m_c / Σ_all w_c m_c; where it falls below the coverage rule the mean is not
 * defined (NaN, and `defined[t] = 0`), since a mean over a small, possibly unrepresentative
 * part of the region can mislead (common practice: report coverage beside any area mean).
 *
 * @module
 */
import { checkGriddedField, type GriddedField } from "./gridded_field.ts";
import { fieldAreaWeights } from "./area_weights.ts";
import { type AreaRegion, regionMembership } from "./area_region.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";

/** Options of {@link areaWeightedMean}. */
export interface AreaMeanOptions extends StopOptions {
  /** Region averaged over. @default { kind: "globe" } */
  region?: AreaRegion;
  /** One non-negative weight per cell. @default fieldAreaWeights(field) */
  weights?: ArrayLike<number>;
  /**
   * Smallest covered fraction of the region's area for which the mean is given, in [0, 1].
   * Our default, not a published standard: half the region's area. @default 0.5
   */
  minCoverage?: number;
}

/** Result of {@link areaWeightedMean}. */
export interface AreaMeanSeries {
  /** Mean per time step, in the field's units; NaN where `defined` is 0. */
  mean: Float64Array;
  /** Covered fraction of the region's area per time step, in [0, 1]. */
  coverage: Float64Array;
  /** 1 where the coverage rule is met and the mean is given, else 0. */
  defined: Uint8Array;
  /** The rule applied. */
  minCoverage: number;
  /** Number of time steps without a mean. */
  undefinedSteps: number;
  /** Cells with a positive weight in the region. */
  cells: number;
  /** Σ w_c m_c over the region (steradians with cell bounds, Σ cos φ without). */
  regionWeight: number;
}

/**
 * Area-weighted mean series of a field over a region (see the module documentation).
 *
 * Cost O(nTime · nCells).
 *
 * @param field the field; NaN (or ±Infinity) marks a missing value
 * @param options region, weights, coverage rule, and `shouldStop` (polled every 64 steps)
 * @returns mean, coverage and which steps meet the rule
 * @throws {RangeError} on a malformed field or region, weights of the wrong length or
 *   negative/non-finite, a region of zero weight, or minCoverage outside [0, 1]
 * @throws {StoppedError} when `options.shouldStop` answers true
 * @example
 * ```ts
 * import { areaWeightedMean } from "./area_weighted_mean.ts";
 * import assert from "node:assert/strict";
 * // one time step, two latitude rows (0° and 60°): cos weights 1 and 0.5
 * const field = {
 *   values: Float32Array.of(1, 1, 4, NaN), nTime: 1,
 *   lat: Float64Array.of(0, 60), lon: Float64Array.of(0, 180),
 * };
 * const m = areaWeightedMean(field);
 * // (1·1 + 1·1 + 0.5·4) / (1 + 1 + 0.5) = 1.6; covered 2.5 of 3
 * assert.ok(Math.abs(m.mean[0] - 1.6) < 1e-12);
 * assert.ok(Math.abs(m.coverage[0] - 2.5 / 3) < 1e-12);
 * ```
 */
export function areaWeightedMean(
  field: GriddedField,
  options: AreaMeanOptions = {},
): AreaMeanSeries {
  const fn = "compute area-weighted mean";
  const nCells = checkGriddedField(fn, field);
  const minCoverage = options.minCoverage ?? 0.5;
  if (!(minCoverage >= 0 && minCoverage <= 1)) {
    throw new RangeError(`Cannot ${fn}: minCoverage must be in [0, 1], got ${minCoverage}`);
  }
  const w = options.weights ?? fieldAreaWeights(field);
  if (w.length !== nCells) {
    throw new RangeError(`Cannot ${fn}: weights has ${w.length} values, the grid ${nCells} cells`);
  }
  const member = regionMembership(field, options.region ?? { kind: "globe" });
  const cellIdx: number[] = [], cellW: number[] = [];
  let total = 0;
  for (let c = 0; c < nCells; c++) {
    if (!(w[c] >= 0) || !Number.isFinite(w[c])) {
      throw new RangeError(`Cannot ${fn}: weights[${c}] must be finite and ≥ 0, got ${w[c]}`);
    }
    const v = w[c] * member[c];
    if (v > 0) {
      cellIdx.push(c);
      cellW.push(v);
      total += v;
    }
  }
  if (!(total > 0)) throw new RangeError(`Cannot ${fn}: the region has zero total weight`);
  const T = field.nTime, vals = field.values;
  const mean = new Float64Array(T), coverage = new Float64Array(T), defined = new Uint8Array(T);
  let undefinedSteps = 0;
  for (let t = 0; t < T; t++) {
    if (t % 64 === 0) throwIfStopped(options, fn);
    const row = t * nCells;
    let s = 0, ws = 0;
    for (let q = 0; q < cellIdx.length; q++) {
      const y = vals[row + cellIdx[q]];
      if (Number.isFinite(y)) {
        s += cellW[q] * y;
        ws += cellW[q];
      }
    }
    coverage[t] = ws / total;
    if (ws > 0 && coverage[t] >= minCoverage) {
      mean[t] = s / ws;
      defined[t] = 1;
    } else {
      mean[t] = NaN;
      undefinedSteps++;
    }
  }
  return {
    mean,
    coverage,
    defined,
    minCoverage,
    undefinedSteps,
    cells: cellIdx.length,
    regionWeight: total,
  };
}
