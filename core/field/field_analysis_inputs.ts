/**
 * The inputs of a solar-signal map, prepared once and shared by the map, its Monte Carlo
 * field-significance test and its chunk tasks: the preprocessed predictor and field, which
 * cells take part, and per lag the orthonormal basis of the nuisance regressors (intercept and
 * optional controls such as an ENSO index, volcanic aerosol or a linear trend).
 *
 * Preprocessing, per cell and of the predictor, is that of the single-series analyses
 * (core/climate/preprocess_series.ts: mean, linear or quadratic trend removal, or a Gaussian
 * high-pass), so a map cell and a single-series analysis of the same series agree. Optionally
 * the field is first deseasonalised: the mean of each phase of the seasonal cycle (e.g. each
 * calendar month, `seasonalPeriod: 12`) is removed from every cell (common practice; the
 * predictor is not deseasonalised, as a solar series has no annual cycle). Controls get the
 * same trend removal as the predictor.
 *
 * Lag convention (as core/climate/lagged_correlation.ts): at lag k the pairs are
 * (x_t, y_{t+k}), so k > 0 means the field follows the predictor by k steps. Controls are
 * taken at the field's time step, z(t+k).
 *
 * Missing data: a cell with any missing value in the analysed period is left out of the map
 * (status 1) and counted; cells that are constant over an overlap are left out by the map
 * (status 2). Area means (area_weighted_mean.ts) skip missing cells instead.
 *
 * @module
 */
import type { LagWindow } from "../climate/lagged_correlation.ts";
import { overlapRange } from "../climate/lagged_correlation.ts";
import { type PreprocessOptions, preprocessSeries } from "../climate/preprocess_series.ts";
import { leastSquaresQr } from "../stats/least_squares_qr.ts";
import { checkGriddedField, type GriddedField } from "./gridded_field.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";

/** A control regressor of the per-cell regression, on the field's time axis. */
export interface FieldControl {
  name: string;
  /** One finite value per time step of the field. */
  values: Float64Array;
}

/** Options of {@link prepareFieldAnalysis}. */
export interface FieldAnalysisOptions extends LagWindow, StopOptions {
  /** Trend removal applied to the predictor, the controls and every cell. @default { method: "mean" } */
  preprocess?: PreprocessOptions;
  /** Remove the mean of each phase t mod P from every cell first (P = 12 for monthly data). */
  seasonalPeriod?: number;
  /** Control regressors (multiple regression per cell). @default [] */
  controls?: FieldControl[];
  /** Add a linear trend in time as a control (not detrended). @default false */
  trendControl?: boolean;
}

/** Status of a grid cell in an analysis. */
export const CELL_ANALYSED = 0;
/** The cell has a missing value in the analysed period. */
export const CELL_MISSING = 1;
/** The cell's series (after preprocessing and controls) is constant over some overlap. */
export const CELL_CONSTANT = 2;

/** Prepared inputs (structured-clonable: numbers, strings and typed arrays). */
export interface FieldAnalysisInputs {
  /** Time steps N. */
  n: number;
  minLag: number;
  maxLag: number;
  /** Cells of the grid (nLat · nLon). */
  gridCells: number;
  /** Grid index of each cell taken in, ascending. */
  cells: Int32Array;
  /** Per grid cell: CELL_ANALYSED or CELL_MISSING. */
  status: Uint8Array;
  /** Preprocessed field of the cells taken in, time-major (N × cells.length), float32. */
  y: Float32Array;
  /** Preprocessed predictor (N values). */
  x: Float64Array;
  /** Series the phase surrogates take their amplitudes from (x, or x before a high-pass). */
  surrogateSource: Float64Array;
  preprocess: PreprocessOptions;
  seasonalPeriod: number;
  /** Names of the controls (the trend control is named "trend"). */
  controlNames: string[];
  /**
   * Per lag (minLag..maxLag): orthonormal basis of [1, controls] over the overlap, column-major
   * ((q + 1) columns of n_k values), so the residual of a segment s is s − Q Qᵀ s.
   */
  bases: Float64Array[];
  warnings: string[];
}

/**
 * Remove the mean of each seasonal phase (t mod period) from a series, in place.
 *
 * @param y series, finite, modified in place
 * @param period samples per seasonal cycle, integer ≥ 2, at most y.length
 * @example
 * ```ts
 * import { removeSeasonalMeans } from "./field_analysis_inputs.ts";
 * import assert from "node:assert/strict";
 * const y = Float64Array.of(1, 10, 3, 12);
 * removeSeasonalMeans(y, 2);
 * assert.deepEqual(Array.from(y), [-1, -1, 1, 1]);
 * ```
 */
export function removeSeasonalMeans(y: Float64Array, period: number): void {
  if (!Number.isInteger(period) || period < 2 || period > y.length) {
    throw new RangeError(
      `Cannot remove seasonal means: period must be an integer in [2, ${y.length}], got ${period}`,
    );
  }
  const sum = new Float64Array(period), count = new Float64Array(period);
  for (let t = 0; t < y.length; t++) {
    sum[t % period] += y[t];
    count[t % period]++;
  }
  for (let t = 0; t < y.length; t++) y[t] -= sum[t % period] / count[t % period];
}

/**
 * Orthonormal basis (column-major) of the given columns by Householder QR (Q = Z R⁻¹).
 * @throws {RangeError} when the columns are collinear over the overlap
 */
function orthonormalBasis(columns: Float64Array[], m: number, lag: number): Float64Array {
  const p = columns.length;
  let r: number[][];
  try {
    r = leastSquaresQr(columns, new Float64Array(m)).r;
  } catch (e) {
    throw new RangeError(
      `Cannot prepare field analysis: the controls are collinear over the overlap at lag ${lag} (${
        (e as Error).message
      })`,
    );
  }
  const q = new Float64Array(p * m);
  for (let j = 0; j < p; j++) {
    const col = q.subarray(j * m, (j + 1) * m);
    col.set(columns[j]);
    for (let i = 0; i < j; i++) {
      const qi = q.subarray(i * m, (i + 1) * m), rij = r[i][j];
      for (let t = 0; t < m; t++) col[t] -= rij * qi[t];
    }
    const d = r[j][j];
    for (let t = 0; t < m; t++) col[t] /= d;
  }
  return q;
}

/**
 * Prepare the inputs of a solar-signal map (see the module documentation).
 *
 * @param field the field (NaN = missing)
 * @param predictor the solar series on the field's time axis, one finite value per step
 * @param options lag window, preprocessing, deseasonalising, controls, and `shouldStop` (polled
 *   every 64 cells of the preprocessing)
 * @returns the prepared inputs
 * @throws {RangeError} on a malformed field, a predictor or control of the wrong length or with
 *   non-finite values, a bad lag window (fewer than q + 4 overlapping pairs at the largest lag),
 *   collinear controls, a bad seasonal period, or no cell without missing values
 * @throws {StoppedError} when `options.shouldStop` answers true
 * @example
 * ```ts
 * import { prepareFieldAnalysis } from "./field_analysis_inputs.ts";
 * import assert from "node:assert/strict";
 * const n = 48;
 * const values = new Float32Array(n * 2);
 * for (let t = 0; t < n; t++) { values[2 * t] = Math.sin(t / 3); values[2 * t + 1] = NaN; }
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0, 180) };
 * const x = Float64Array.from({ length: n }, (_, t) => Math.cos(t / 3));
 * const inp = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 2 });
 * assert.deepEqual(Array.from(inp.cells), [0]); // the gappy cell is left out
 * assert.equal(inp.bases.length, 3);
 * ```
 */
export function prepareFieldAnalysis(
  field: GriddedField,
  predictor: Float64Array,
  options: FieldAnalysisOptions,
): FieldAnalysisInputs {
  const fn = "prepare field analysis";
  const gridCells = checkGriddedField(fn, field);
  const n = field.nTime;
  const { minLag, maxLag } = options;
  const preprocess: PreprocessOptions = options.preprocess ?? { method: "mean" };
  const seasonalPeriod = options.seasonalPeriod ?? 0;
  const warnings: string[] = [];
  if (predictor.length !== n) {
    throw new RangeError(
      `Cannot ${fn}: the predictor has ${predictor.length} values, the field ${n} time steps`,
    );
  }
  for (let t = 0; t < n; t++) {
    if (!Number.isFinite(predictor[t])) {
      throw new RangeError(`Cannot ${fn}: predictor[${t}] is not finite (${predictor[t]})`);
    }
  }
  if (!Number.isInteger(minLag) || !Number.isInteger(maxLag) || minLag > maxLag) {
    throw new RangeError(
      `Cannot ${fn}: lags must be integers with minLag ≤ maxLag, got ${minLag}..${maxLag}`,
    );
  }
  const controls = options.controls ?? [];
  const controlNames = controls.map((c) => c.name);
  if (options.trendControl) controlNames.push("trend");
  if (new Set(controlNames).size !== controlNames.length) {
    throw new RangeError(
      `Cannot ${fn}: control names must be distinct, got ${controlNames.join(", ")}`,
    );
  }
  const q = controlNames.length;
  const big = Math.max(Math.abs(minLag), Math.abs(maxLag));
  if (n - big < q + 4) {
    throw new RangeError(
      `Cannot ${fn}: lag ${big} leaves ${n - big} overlapping pairs, needs at least ${
        q + 4
      } with ${q} controls`,
    );
  }
  if (
    seasonalPeriod !== 0 &&
    (!Number.isInteger(seasonalPeriod) || seasonalPeriod < 2 || seasonalPeriod > n)
  ) {
    throw new RangeError(
      `Cannot ${fn}: seasonalPeriod must be an integer in [2, ${n}], got ${seasonalPeriod}`,
    );
  }
  const method = preprocess.method ?? "mean";
  if (options.trendControl && (method === "linear" || method === "quadratic")) {
    warnings.push(
      `A trend control beside ${method} trend removal is nearly redundant: the trend was already removed from every series.`,
    );
  }
  const x = preprocessSeries(predictor, preprocess);
  // for the high-pass (not idempotent) the surrogates are drawn from the series before it
  // and filtered once, as the observations were (as core/climate/surrogate_lag_test.ts)
  const surrogateSource = method === "high_pass" ? preprocessSeries(predictor) : x;
  const controlSeries = controls.map((c, i) => {
    if (c.values.length !== n) {
      throw new RangeError(
        `Cannot ${fn}: control ${c.name} has ${c.values.length} values, the field ${n}`,
      );
    }
    for (let t = 0; t < n; t++) {
      if (!Number.isFinite(c.values[t])) {
        throw new RangeError(`Cannot ${fn}: control ${controlNames[i]}[${t}] is not finite`);
      }
    }
    return preprocessSeries(c.values, preprocess);
  });
  if (options.trendControl) {
    controlSeries.push(Float64Array.from({ length: n }, (_, t) => t));
  }
  const bases: Float64Array[] = [];
  for (let k = minLag; k <= maxLag; k++) {
    const [a, b] = overlapRange(n, k);
    const m = b - a;
    const cols = [new Float64Array(m).fill(1), ...controlSeries.map((z) => z.slice(a + k, b + k))];
    bases.push(orthonormalBasis(cols, m, k));
  }
  const prepared = preprocessFieldCells(field, preprocess, seasonalPeriod, options);
  warnings.push(...prepared.warnings);
  return {
    n,
    minLag,
    maxLag,
    gridCells,
    cells: prepared.cells,
    status: prepared.status,
    y: prepared.y,
    x,
    surrogateSource,
    preprocess,
    seasonalPeriod,
    controlNames,
    bases,
    warnings,
  };
}

/** Result of {@link preprocessFieldCells}. */
export interface PreprocessedCells {
  /** Grid index of each cell without missing values, ascending. */
  cells: Int32Array;
  /** Per grid cell: CELL_ANALYSED or CELL_MISSING. */
  status: Uint8Array;
  /** The preprocessed cells, time-major (N × cells.length), float32. */
  y: Float32Array;
  warnings: string[];
}

/**
 * Deseasonalise (optionally) and preprocess every cell without missing values (the
 * single-series preprocessing, preprocess_series.ts, per cell); cells with a missing value
 * are left out and counted.
 *
 * @param field the field
 * @param preprocess trend removal per cell
 * @param seasonalPeriod samples per seasonal cycle, or 0 for none
 * @param control `shouldStop`, polled every 64 cells
 * @returns the cells taken in and their preprocessed values
 * @throws {RangeError} when every cell has a missing value, or as preprocessSeries
 * @throws {StoppedError} when `control.shouldStop` answers true
 * @example
 * ```ts
 * import { preprocessFieldCells } from "./field_analysis_inputs.ts";
 * import assert from "node:assert/strict";
 * const field = {
 *   values: Float32Array.of(1, NaN, 3, 5), nTime: 2, lat: Float64Array.of(0), lon: Float64Array.of(0, 180),
 * };
 * const p = preprocessFieldCells(field, { method: "mean" }, 0);
 * assert.deepEqual(Array.from(p.y), [-1, 1]);
 * assert.deepEqual(Array.from(p.status), [0, 1]);
 * ```
 */
export function preprocessFieldCells(
  field: GriddedField,
  preprocess: PreprocessOptions,
  seasonalPeriod: number,
  control: StopOptions = {},
): PreprocessedCells {
  const gridCells = checkGriddedField("preprocess field", field);
  const n = field.nTime;
  const warnings: string[] = [];
  // cells without missing values
  const status = new Uint8Array(gridCells);
  const vals = field.values;
  const keep: number[] = [];
  for (let c = 0; c < gridCells; c++) {
    let ok = true;
    for (let t = 0; t < n; t++) {
      if (!Number.isFinite(vals[t * gridCells + c])) {
        ok = false;
        break;
      }
    }
    if (ok) keep.push(c);
    else status[c] = CELL_MISSING;
  }
  if (keep.length === 0) {
    throw new RangeError(
      `Cannot preprocess field: every cell has a missing value in the analysed period`,
    );
  }
  const missing = gridCells - keep.length;
  if (missing > 0) {
    warnings.push(
      `${missing} of ${gridCells} cells have missing values in the analysed period and are left out of the map.`,
    );
  }
  const nc = keep.length;
  const y = new Float32Array(n * nc);
  const col = new Float64Array(n);
  for (let i = 0; i < nc; i++) {
    if (i % 64 === 0) throwIfStopped(control, "preprocess field");
    const c = keep[i];
    for (let t = 0; t < n; t++) col[t] = vals[t * gridCells + c];
    if (seasonalPeriod) removeSeasonalMeans(col, seasonalPeriod);
    const pre = preprocessSeries(col, preprocess);
    for (let t = 0; t < n; t++) y[t * nc + i] = pre[t];
  }
  return { cells: Int32Array.from(keep), status, y, warnings };
}

/**
 * Remove from `out[0..m)` its projection on an orthonormal basis stored column-major (modified
 * Gram–Schmidt order, as preprocess_series.ts's removeProjection on a flat basis) and return
 * the residual sum of squares. `g0`, when given, is Σ basis₀·out summed by the caller in the
 * same order (the callers fuse it into their copy loop; the last subtraction is fused with the
 * sum of squares: fewer passes, the same operations in the same order).
 */
function removeBasis(out: Float64Array, basis: Float64Array, m: number, g0?: number): number {
  const p = basis.length / m;
  let s = 0;
  if (p === 0) {
    for (let t = 0; t < m; t++) s += out[t] * out[t];
    return s;
  }
  for (let i = 0; i < p; i++) {
    let g = 0;
    const o = i * m;
    if (i === 0 && g0 !== undefined) g = g0;
    else for (let t = 0; t < m; t++) g += basis[o + t] * out[t];
    if (i < p - 1) {
      for (let t = 0; t < m; t++) out[t] -= g * basis[o + t];
    } else {
      for (let t = 0; t < m; t++) {
        const v = out[t] - g * basis[o + t];
        out[t] = v;
        s += v * v;
      }
    }
  }
  return s;
}

/**
 * Residual of one lag's overlap segment of a cell on the lag's basis, and its sums: the
 * building block shared by the map and the significance plan.
 *
 * @param inputs prepared inputs
 * @param j lag index (lag = minLag + j)
 * @param column the cell's preprocessed series (N values, float64)
 * @param xr the predictor's residual over the overlap (n_k values)
 * @param out scratch of at least n_k values; receives the residual ỹ
 * @returns Σ x̃ỹ, Σ ỹ², Σ y² over the segment (before the residual)
 * @example
 * ```ts
 * import { prepareFieldAnalysis, segmentSums } from "./field_analysis_inputs.ts";
 * import assert from "node:assert/strict";
 * const n = 20;
 * const values = Float32Array.from({ length: n }, (_, t) => t % 3);
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0) };
 * const x = Float64Array.from({ length: n }, (_, t) => t % 3);
 * const inp = prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 0 });
 * const col = Float64Array.from(inp.y);
 * const s = segmentSums(inp, 0, col, inp.x, new Float64Array(n));
 * assert.ok(Math.abs(s.sxy - s.syy) < 1e-6 * s.syy); // y equals x (to float32): Σx̃ỹ = Σỹ²
 * ```
 */
export function segmentSums(
  inputs: FieldAnalysisInputs,
  j: number,
  column: Float64Array,
  xr: Float64Array,
  out: Float64Array,
): { sxy: number; syy: number; segSs: number } {
  const k = inputs.minLag + j;
  const [a, b] = overlapRange(inputs.n, k);
  const m = b - a, off = a + k;
  const basis = inputs.bases[j];
  let segSs = 0, sxy = 0, g0 = 0;
  if (basis.length > 0) {
    for (let t = 0; t < m; t++) {
      const v = column[off + t];
      out[t] = v;
      segSs += v * v;
      sxy += xr[t] * v;
      g0 += basis[t] * v;
    }
    return { sxy, syy: removeBasis(out, basis, m, g0), segSs };
  }
  for (let t = 0; t < m; t++) {
    const v = column[off + t];
    out[t] = v;
    segSs += v * v;
    sxy += xr[t] * v;
  }
  return { sxy, syy: removeBasis(out, basis, m), segSs };
}

/**
 * Residual of the predictor (or a surrogate of it) over lag j's overlap on the lag's basis.
 *
 * @param inputs prepared inputs (only n, minLag and bases are read)
 * @param j lag index
 * @param x the preprocessed series (N values)
 * @param out receives the n_k residual values
 * @returns Σ x̃²
 * @example
 * ```ts
 * import { predictorResidual, prepareFieldAnalysis } from "./field_analysis_inputs.ts";
 * import assert from "node:assert/strict";
 * const n = 12;
 * const field = { values: new Float32Array(n).map((_, t) => t), nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0) };
 * const inp = prepareFieldAnalysis(field, Float64Array.from({ length: n }, (_, t) => t * t), { minLag: 1, maxLag: 1 });
 * const r = new Float64Array(n - 1);
 * predictorResidual(inp, 0, inp.x, r);
 * assert.ok(Math.abs(r.reduce((s, v) => s + v, 0)) < 1e-9); // zero mean over the overlap
 * ```
 */
export function predictorResidual(
  inputs: Pick<FieldAnalysisInputs, "n" | "minLag" | "bases">,
  j: number,
  x: Float64Array,
  out: Float64Array,
): number {
  const k = inputs.minLag + j;
  const [a, b] = overlapRange(inputs.n, k);
  const m = b - a, basis = inputs.bases[j];
  if (basis.length === 0) {
    for (let t = 0; t < m; t++) out[t] = x[a + t];
    return removeBasis(out, basis, m);
  }
  let g0 = 0;
  for (let t = 0; t < m; t++) {
    const v = x[a + t];
    out[t] = v;
    g0 += basis[t] * v;
  }
  return removeBasis(out, basis, m, g0);
}

/**
 * The inputs restricted to the cells [start, end) of `inputs.cells` (a block of the map for a
 * worker: the block's field columns only; everything else is shared).
 *
 * @param inputs prepared inputs
 * @param start first cell (index into inputs.cells)
 * @param end one past the last
 * @returns the block's inputs
 * @throws {RangeError} when [start, end) is not a non-empty range of the cells
 * @example
 * ```ts
 * import { prepareFieldAnalysis, sliceFieldAnalysisInputs } from "./field_analysis_inputs.ts";
 * import assert from "node:assert/strict";
 * const n = 12;
 * const values = Float32Array.from({ length: n * 3 }, (_, i) => Math.sin(i));
 * const field = { values, nTime: n, lat: Float64Array.of(0), lon: Float64Array.of(0, 120, 240) };
 * const x = Float64Array.from({ length: n }, (_, t) => Math.cos(t));
 * const part = sliceFieldAnalysisInputs(prepareFieldAnalysis(field, x, { minLag: 0, maxLag: 1 }), 1, 3);
 * assert.deepEqual(Array.from(part.cells), [1, 2]);
 * assert.equal(part.y.length, 2 * n);
 * ```
 */
export function sliceFieldAnalysisInputs(
  inputs: FieldAnalysisInputs,
  start: number,
  end: number,
): FieldAnalysisInputs {
  const nc = inputs.cells.length, n = inputs.n;
  if (
    !(Number.isInteger(start) && Number.isInteger(end) && 0 <= start && start < end && end <= nc)
  ) {
    throw new RangeError(`Cannot slice field inputs: cells ${start}..${end} outside 0..${nc}`);
  }
  const cb = end - start, y = new Float32Array(n * cb);
  for (let t = 0; t < n; t++) y.set(inputs.y.subarray(t * nc + start, t * nc + end), t * cb);
  return { ...inputs, cells: inputs.cells.slice(start, end), y };
}
