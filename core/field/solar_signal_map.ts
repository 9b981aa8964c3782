/**
 * Solar-signal map: at every cell of a gridded field and every lag of a window, the
 * correlation of the cell's series with a solar predictor, the regression slope with its
 * standard error, the lag-1 autocorrelations of both series, the effective sample size and
 * the analytic test, with the same estimators as the single-series analysis
 * (core/climate/lagged_correlation.ts):
 *
 * - r: Pearson's r over the n_k overlapping pairs at lag k (pairs (x_t, y_{t+k})); with
 *   controls, the partial correlation of y and x given the controls (both residualised on
 *   [1, controls] over the overlap; by the Frisch–Waugh–Lovell theorem, Frisch & Waugh 1933,
 *   Econometrica 1, 387, the slope equals the predictor's coefficient of the multiple
 *   regression y = β₀ + βx + Σγ_j z_j + e).
 * - slope β = Σx̃ỹ/Σx̃² in field units per predictor unit (K per W m⁻² for a temperature field
 *   on TSI), SE = √(RSS/(n_k − 2 − q) / Σx̃²), the classical OLS standard error (as
 *   statsmodels' `OLS(...).fit().bse`), q the number of controls.
 * - r₁ of the residual predictor and cell series over the overlap (lag1_autocorrelation.ts),
 *   N_eff = n_k (1 − r₁r₂)/(1 + r₁r₂) (Bretherton et al. 1999, J. Climate 12, 1990, eq. 31;
 *   effective_sample_size.ts), t = r √(df/(1 − r²)) with df = N_eff − 2 − q and the two-sided p
 *   from Student's t (correlation_tests.ts). `slopeSeEffective` = SE·√((n_k − 2 − q)/df) is the
 *   standard error consistent with that test (β/SE_eff = t).
 *
 * The best lag of a cell is the one with the largest |r| (the earliest on ties); its p-value
 * ignores the search over lags, so `pBestBonferroni` = min(1, L·p) is also given. A map has
 * many cells: use field significance (false_discovery_rate.ts,
 * field_significance_monte_carlo.ts) before reading patterns into it; correlation is not
 * attribution.
 *
 * Cells left out (status ≠ 0) have NaN in every per-cell array.
 *
 * @module
 */
import { lag1Autocorrelation } from "../climate/lag1_autocorrelation.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";
import { brethertonEffectiveSampleSize } from "../climate/effective_sample_size.ts";
import { correlationTTest } from "../climate/correlation_tests.ts";
import { overlapRange } from "../climate/lagged_correlation.ts";
import {
  CELL_CONSTANT,
  type FieldAnalysisInputs,
  predictorResidual,
  segmentSums,
} from "./field_analysis_inputs.ts";

/** Per-cell statistics at one lag or at the best lag (NaN for cells left out). */
export interface CellStatistics {
  r: Float64Array;
  slope: Float64Array;
  slopeSe: Float64Array;
  slopeSeEffective: Float64Array;
  t: Float64Array;
  /** Two-sided analytic p with N_eff − 2 − q df; NaN where that is ≤ 0 (not testable). */
  p: Float64Array;
  nEff: Float64Array;
  /** Lag-1 autocorrelation of the (residual) cell series over the overlap. */
  r1Field: Float64Array;
}

/** Result of {@link solarSignalMap}. */
export interface SolarSignalMap {
  lags: number[];
  gridCells: number;
  /** Per grid cell: 0 analysed, 1 missing values, 2 constant over an overlap. */
  status: Uint8Array;
  /** Per lag: overlap size n_k and r₁ of the residual predictor. */
  n: Int32Array;
  r1Predictor: Float64Array;
  /** Number of controls q. */
  controls: number;
  /** Per lag, per grid cell (lag-major: index j · gridCells + c). */
  perLag: CellStatistics;
  /**
   * Per lag, per grid cell (lag-major): Σỹ², the cell's sum of squares over the overlap after
   * the intercept and controls, and Σy², before them (field units squared; NaN where left out).
   */
  residualSs: Float64Array;
  segmentSs: Float64Array;
  /** Per grid cell at its best lag. */
  best: CellStatistics & {
    lag: Float64Array;
    /** min(1, L · p): Bonferroni over the L lags searched. */
    pBestBonferroni: Float64Array;
  };
  warnings: string[];
}

function cellStatistics(size: number): CellStatistics {
  const f = () => new Float64Array(size).fill(NaN);
  return {
    r: f(),
    slope: f(),
    slopeSe: f(),
    slopeSeEffective: f(),
    t: f(),
    p: f(),
    nEff: f(),
    r1Field: f(),
  };
}

/**
 * The predictor's side of every lag of a map: overlap sizes n_k, residuals x̃ over the
 * overlaps, Σx̃² and r₁ of x̃ (what every cell of the map shares).
 *
 * @param inputs from prepareFieldAnalysis
 * @returns per lag: `nn` (n_k), `r1x`, `sxx`, `xr`
 * @throws {RangeError} when the predictor is constant (given the controls) over an overlap
 * @example
 * ```ts
 * import { prepareFieldAnalysis } from "./field_analysis_inputs.ts";
 * import { mapPredictorPart } from "./solar_signal_map.ts";
 * import assert from "node:assert/strict";
 * const n = 40;
 * const x = Float64Array.from({ length: n }, (_, t) => Math.sin(t / 3));
 * const field = { values: new Float32Array(n).map((_, t) => t % 5), nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0) };
 * const p = mapPredictorPart(prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 2 }));
 * assert.deepEqual(Array.from(p.nn), [40, 39, 38]);
 * ```
 */
export function mapPredictorPart(inputs: FieldAnalysisInputs): {
  nn: Int32Array;
  r1x: Float64Array;
  sxx: Float64Array;
  xr: Float64Array[];
} {
  const { n, minLag, maxLag } = inputs;
  const L = maxLag - minLag + 1;
  const nn = new Int32Array(L), r1x = new Float64Array(L), sxx = new Float64Array(L);
  const xr: Float64Array[] = [];
  for (let j = 0; j < L; j++) {
    const [a, b] = overlapRange(n, minLag + j);
    nn[j] = b - a;
    const v = new Float64Array(b - a);
    sxx[j] = predictorResidual(inputs, j, inputs.x, v);
    if (!(sxx[j] > 0)) {
      throw new RangeError(
        `Cannot compute solar-signal map: the predictor is constant (given the controls) over the overlap at lag ${
          minLag + j
        }`,
      );
    }
    r1x[j] = lag1Autocorrelation(v);
    xr.push(v);
  }
  return { nn, r1x, sxx, xr };
}

/**
 * The statistics of the cells of a block (see {@link solarSignalMapCells}), before they are
 * placed on the grid by {@link assembleSolarSignalMap}.
 */
export interface SolarSignalMapCells {
  /** Grid index of each cell of the block. */
  cells: Int32Array;
  /** Per lag × block cell (lag-major: j · cells.length + i). */
  perLag: CellStatistics;
  residualSs: Float64Array;
  segmentSs: Float64Array;
  /** Per block cell: index of the best lag, or −2 when constant over an overlap. */
  bestLag: Int32Array;
  /** Cell-lags whose N_eff − 2 − q ≤ 0. */
  untestable: number;
}

/**
 * Per-cell statistics of every cell of `inputs` (all of them, or a block made by
 * sliceFieldAnalysisInputs for a worker), to be placed by {@link assembleSolarSignalMap}.
 *
 * @param inputs from prepareFieldAnalysis (or a block of it)
 * @param options `shouldStop`, polled every 16 cells
 * @returns the block's statistics
 * @throws {RangeError} when the predictor is constant over an overlap
 * @throws {StoppedError} when `options.shouldStop` answers true
 * @example
 * ```ts
 * import { prepareFieldAnalysis, sliceFieldAnalysisInputs } from "./field_analysis_inputs.ts";
 * import { assembleSolarSignalMap, solarSignalMap, solarSignalMapCells } from "./solar_signal_map.ts";
 * import assert from "node:assert/strict";
 * const n = 60;
 * const x = Float64Array.from({ length: n }, (_, t) => Math.sin(t / 3) + Math.cos(2.2 * t));
 * const values = Float32Array.from({ length: n * 4 }, (_, i) => Math.sin(i * 0.77));
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0, 90, 180, 270) };
 * const inputs = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 2 });
 * const blocks = [[0, 3], [3, 4]].map(([a, b]) => solarSignalMapCells(sliceFieldAnalysisInputs(inputs, a, b)));
 * assert.deepEqual(assembleSolarSignalMap(inputs, blocks), solarSignalMap(inputs));
 * ```
 */
export function solarSignalMapCells(
  inputs: FieldAnalysisInputs,
  options: StopOptions = {},
): SolarSignalMapCells {
  const { n, minLag, maxLag, cells } = inputs;
  const L = maxLag - minLag + 1;
  const q = inputs.controlNames.length;
  const nc = cells.length;
  const { nn, r1x, sxx, xr } = mapPredictorPart(inputs);
  const perLag = cellStatistics(L * nc);
  const residualSs = new Float64Array(L * nc).fill(NaN);
  const segmentSs = new Float64Array(L * nc).fill(NaN);
  const bestLag = new Int32Array(nc);
  const col = new Float64Array(n), res = new Float64Array(n);
  let untestable = 0;
  const row = { r: 0, slope: 0, se: 0, seEff: 0, t: 0, p: 0, nEff: 0, r1: 0 };
  for (let i = 0; i < nc; i++) {
    if (i % 16 === 0) throwIfStopped(options, "compute solar-signal map");
    for (let t = 0; t < n; t++) col[t] = inputs.y[t * nc + i];
    let bestJ = -1, bestAbs = -1;
    for (let j = 0; j < L; j++) {
      const s = segmentSums(inputs, j, col, xr[j], res);
      const m = nn[j];
      if (!(s.syy > 1e-24 * s.segSs) || !(s.syy > 0)) {
        bestJ = -2;
        break;
      }
      const r = Math.max(-1, Math.min(1, s.sxy / Math.sqrt(sxx[j] * s.syy)));
      const slope = s.sxy / sxx[j];
      const dfOls = m - 2 - q;
      const rss = Math.max(0, s.syy - slope * s.sxy);
      const se = Math.sqrt(rss / dfOls / sxx[j]);
      const r1y = lag1Autocorrelation(res, 0, m);
      const nEff = brethertonEffectiveSampleSize(m, r1x[j], r1y);
      const df = nEff - 2 - q;
      row.r = r;
      row.slope = slope;
      row.se = se;
      row.nEff = nEff;
      row.r1 = r1y;
      if (df > 0) {
        const tt = correlationTTest(r, nEff - q);
        row.t = tt.t;
        row.p = tt.p;
        row.seEff = se * Math.sqrt(dfOls / df);
      } else {
        row.t = row.p = row.seEff = NaN;
        untestable++;
      }
      const o = j * nc + i;
      perLag.r[o] = row.r;
      perLag.slope[o] = row.slope;
      perLag.slopeSe[o] = row.se;
      perLag.slopeSeEffective[o] = row.seEff;
      perLag.t[o] = row.t;
      perLag.p[o] = row.p;
      perLag.nEff[o] = row.nEff;
      perLag.r1Field[o] = row.r1;
      residualSs[o] = s.syy;
      segmentSs[o] = s.segSs;
      if (Math.abs(r) > bestAbs) {
        bestAbs = Math.abs(r);
        bestJ = j;
      }
    }
    bestLag[i] = bestJ;
  }
  return { cells: Int32Array.from(cells), perLag, residualSs, segmentSs, bestLag, untestable };
}

const KEYS = ["r", "slope", "slopeSe", "slopeSeEffective", "t", "p", "nEff", "r1Field"] as const;

/**
 * The map of `inputs` from the statistics of its cells, computed in one block or several
 * ({@link solarSignalMapCells}); the same numbers however the cells were split.
 *
 * @param inputs the inputs the blocks were cut from
 * @param blocks blocks covering the cells of `inputs` (in any order)
 * @returns the map
 * @throws {RangeError} when the predictor is constant over an overlap
 * @example
 * ```ts
 * import { prepareFieldAnalysis } from "./field_analysis_inputs.ts";
 * import { assembleSolarSignalMap, solarSignalMapCells } from "./solar_signal_map.ts";
 * import assert from "node:assert/strict";
 * const n = 60;
 * const x = Float64Array.from({ length: n }, (_, t) => Math.sin(t / 3) + Math.cos(2.2 * t));
 * const values = Float32Array.from({ length: n * 2 }, (_, i) => Math.sin(i * 0.77));
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0, 180) };
 * const inputs = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 2 });
 * const map = assembleSolarSignalMap(inputs, [solarSignalMapCells(inputs)]);
 * assert.equal(map.best.r.length, 2);
 * ```
 */
export function assembleSolarSignalMap(
  inputs: FieldAnalysisInputs,
  blocks: SolarSignalMapCells[],
): SolarSignalMap {
  const { minLag, maxLag, gridCells } = inputs;
  const L = maxLag - minLag + 1;
  const { nn, r1x } = mapPredictorPart(inputs);
  const status = Uint8Array.from(inputs.status);
  const perLag = cellStatistics(L * gridCells);
  const residualSs = new Float64Array(L * gridCells).fill(NaN);
  const segmentSs = new Float64Array(L * gridCells).fill(NaN);
  const best = {
    ...cellStatistics(gridCells),
    lag: new Float64Array(gridCells).fill(NaN),
    pBestBonferroni: new Float64Array(gridCells).fill(NaN),
  };
  let untestable = 0, constant = 0;
  for (const block of blocks) {
    untestable += block.untestable;
    const nb = block.cells.length;
    for (let i = 0; i < nb; i++) {
      const c = block.cells[i], bestJ = block.bestLag[i];
      if (bestJ === -2) {
        status[c] = CELL_CONSTANT;
        constant++;
        continue;
      }
      for (let j = 0; j < L; j++) {
        const from = j * nb + i, to = j * gridCells + c;
        for (const k of KEYS) perLag[k][to] = block.perLag[k][from];
        residualSs[to] = block.residualSs[from];
        segmentSs[to] = block.segmentSs[from];
      }
      for (const k of KEYS) best[k][c] = perLag[k][bestJ * gridCells + c];
      best.lag[c] = minLag + bestJ;
      best.pBestBonferroni[c] = Math.min(1, L * best.p[c]);
    }
  }
  const warnings = [...inputs.warnings];
  if (constant > 0) {
    warnings.push(
      `${constant} cells are constant over an overlap (after preprocessing and controls) and are left out of the map.`,
    );
  }
  if (untestable > 0) {
    warnings.push(
      `${untestable} cell-lags have an effective sample size too small for the t test (N_eff − 2 − q ≤ 0): their p is not defined.`,
    );
  }
  return {
    lags: Array.from({ length: L }, (_, j) => minLag + j),
    gridCells,
    status,
    n: nn,
    r1Predictor: r1x,
    controls: inputs.controlNames.length,
    perLag,
    residualSs,
    segmentSs,
    best,
    warnings,
  };
}

/**
 * Compute the solar-signal map of prepared inputs (see the module documentation).
 *
 * Cost O(cells · lags · N · (q + 4)) plus one t distribution evaluation per cell and lag.
 *
 * @param inputs from prepareFieldAnalysis
 * @param options `shouldStop`, polled every 16 cells
 * @returns per-lag and best-lag statistics per cell
 * @throws {RangeError} when the predictor is constant over an overlap
 * @throws {StoppedError} when `options.shouldStop` answers true
 * @example
 * ```ts
 * import { prepareFieldAnalysis } from "./field_analysis_inputs.ts";
 * import { solarSignalMap } from "./solar_signal_map.ts";
 * import assert from "node:assert/strict";
 * const n = 120;
 * const x = Float64Array.from({ length: n }, (_, t) => Math.sin((2 * Math.PI * t) / 40) + Math.cos(2.7 * t));
 * // two cells: one follows x two steps later with slope 0.5, one is unrelated
 * const values = new Float32Array(2 * n);
 * for (let t = 0; t < n; t++) {
 *   values[2 * t] = t >= 2 ? 0.5 * x[t - 2] + 0.05 * Math.cos(t * 2.1) : 0;
 *   values[2 * t + 1] = Math.cos(t * 1.3);
 * }
 * const field = { values, nTime: n, lat: Float64Array.of(10), lon: Float64Array.of(0, 180) };
 * const map = solarSignalMap(prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 4 }));
 * assert.equal(map.best.lag[0], 2);
 * assert.ok(Math.abs(map.best.slope[0] - 0.5) < 0.02);
 * assert.ok(map.best.p[0] < 1e-6 && map.best.p[1] > 0.01);
 * ```
 */
export function solarSignalMap(
  inputs: FieldAnalysisInputs,
  options: StopOptions = {},
): SolarSignalMap {
  return assembleSolarSignalMap(inputs, [solarSignalMapCells(inputs, options)]);
}
