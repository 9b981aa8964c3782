/**
 * Linear least squares by Householder QR on column-major typed arrays.
 *
 * Written by hand rather than taken from ml-matrix because the regression hot paths run on
 * tall designs (17,000+ rows, 2–6 columns): ml-matrix's `QrDecomposition` works on a `Matrix`
 * through per-element accessor calls and copies the design, while this loop stays on
 * `Float64Array` columns with no per-row allocation. The numerics are the textbook
 * Householder algorithm (Golub & Van Loan 2013, Matrix Computations, 4th ed., Alg. 5.2.1),
 * the same factorisation R's `lm` uses (LINPACK dqrdc2), so ill-conditioned designs such as
 * Longley's keep their accuracy (normal equations would square the condition number).
 *
 * @module
 */
import { InputError } from "../errors.ts";

/** Result of {@link leastSquaresQr}. */
export interface LeastSquaresQr {
  /** Coefficients, one per column. */
  coefficients: number[];
  /** Upper-triangular R (p×p, rows), with X = QR. Its singular values are those of X. */
  r: number[][];
  /** (XᵀX)⁻¹ = R⁻¹R⁻ᵀ (p×p, rows). */
  xtxInverse: number[][];
}

/** Result of {@link leastSquaresQrMany}: one coefficient vector per response. */
export interface LeastSquaresQrMany {
  /** Coefficients per response, each one per column. */
  coefficients: number[][];
  /** Upper-triangular R (p×p, rows), with X = QR. Its singular values are those of X. */
  r: number[][];
  /** (XᵀX)⁻¹ = R⁻¹R⁻ᵀ (p×p, rows). */
  xtxInverse: number[][];
}

/**
 * Solve min ‖y − Xβ‖₂ by Householder QR.
 *
 * @param columns the design X as columns, each of length n (n ≥ p)
 * @param y response, length n
 * @param overwrite factorise `columns` and `y` in place (scratch arrays; saves the copies)
 *   @default false
 * @returns coefficients, R and (XᵀX)⁻¹
 * @throws {InputError} when lengths differ, n < p, or X is numerically rank deficient
 *   (a diagonal element of R below 1e-10 of the largest: collinear columns)
 * @example
 * ```ts
 * import { leastSquaresQr } from "./least_squares_qr.ts";
 * import assert from "node:assert/strict";
 * const one = new Float64Array([1, 1, 1, 1]);
 * const x = new Float64Array([0, 1, 2, 3]);
 * const fit = leastSquaresQr([one, x], new Float64Array([1, 3, 5, 7]));
 * assert.ok(Math.abs(fit.coefficients[0] - 1) < 1e-12);
 * assert.ok(Math.abs(fit.coefficients[1] - 2) < 1e-12);
 * ```
 */
export function leastSquaresQr(
  columns: readonly Float64Array[],
  y: Float64Array,
  overwrite = false,
): LeastSquaresQr {
  const m = leastSquaresQrMany(columns, [y], overwrite);
  return { coefficients: m.coefficients[0], r: m.r, xtxInverse: m.xtxInverse };
}

/**
 * Solve min ‖y_k − Xβ_k‖₂ for several responses y_k with one design X: X is factorised once
 * by Householder QR and every reflector is applied to each response (the multiple
 * right-hand-side least squares of Golub & Van Loan 2013, Matrix Computations, 4th ed.,
 * §5.3), so m responses cost one factorisation plus m cheap applications. Each β_k equals
 * what {@link leastSquaresQr} gives for y_k alone, bit for bit.
 *
 * @param columns the design X as columns, each of length n (n ≥ p)
 * @param ys responses, each of length n (may be empty: then only R and (XᵀX)⁻¹)
 * @param overwrite factorise `columns` and `ys` in place @default false
 * @returns coefficients per response, R and (XᵀX)⁻¹
 * @throws {InputError} as {@link leastSquaresQr} (field `ys` with the index of a response of
 *   the wrong length)
 * @example
 * ```ts
 * import { leastSquaresQrMany } from "./least_squares_qr.ts";
 * import assert from "node:assert/strict";
 * const one = Float64Array.of(1, 1, 1, 1), x = Float64Array.of(0, 1, 2, 3);
 * const fit = leastSquaresQrMany([one, x], [Float64Array.of(1, 3, 5, 7), Float64Array.of(0, 0, 0, 3)]);
 * assert.ok(Math.abs(fit.coefficients[0][1] - 2) < 1e-12);
 * assert.ok(Math.abs(fit.coefficients[1][1] - 0.9) < 1e-12); // R: coef(lm(c(0,0,0,3) ~ 0:3))
 * ```
 */
export function leastSquaresQrMany(
  columns: readonly Float64Array[],
  ys: readonly Float64Array[],
  overwrite = false,
): LeastSquaresQrMany {
  const p = columns.length;
  if (p === 0) {
    throw new InputError("Cannot solve least squares: the design has no columns", {
      field: "columns",
      reason: "empty",
    });
  }
  // the row count: the response's when there is one (as the one-response form always said)
  const n = ys.length > 0 ? ys[0].length : columns[0].length;
  for (let j = 0; j < p; j++) {
    if (columns[j].length !== n) {
      throw new InputError(
        `Cannot solve least squares: column ${j} has length ${columns[j].length}, y has ${n}`,
        { field: "columns", reason: "length_mismatch", index: j },
      );
    }
  }
  ys.forEach((y, k) => {
    if (y.length !== n) {
      throw new InputError(
        `Cannot solve least squares: response ${k} has length ${y.length}, the columns have ${n}`,
        { field: ys.length === 1 ? "y" : "ys", reason: "length_mismatch", index: k },
      );
    }
  });
  if (n < p) {
    throw new InputError(`Cannot solve least squares: needs at least ${p} rows, got ${n}`, {
      field: "y",
      reason: "too_few_points",
      value: n,
    });
  }
  const { r, qtys } = householderRMany(columns, ys, overwrite);
  let maxDiag = 0;
  for (let i = 0; i < p; i++) maxDiag = Math.max(maxDiag, Math.abs(r[i][i]));
  for (let i = 0; i < p; i++) {
    if (!(Math.abs(r[i][i]) > 1e-10 * maxDiag)) {
      throw new InputError(
        `Cannot solve least squares: the design is rank deficient (column ${i} is collinear with the columns before it)`,
        { field: "columns", reason: "collinear", index: i },
      );
    }
  }
  // back substitution R β = (Qᵀy)[0..p) for each response
  const coefficients = qtys.map((qty) => {
    const beta = new Array<number>(p).fill(0);
    for (let i = p - 1; i >= 0; i--) {
      let s = qty[i];
      for (let j = i + 1; j < p; j++) s -= r[i][j] * beta[j];
      beta[i] = s / r[i][i];
    }
    return beta;
  });
  return { coefficients, r, xtxInverse: xtxInverseOfR(r) };
}

/** (XᵀX)⁻¹ = R⁻¹R⁻ᵀ from the upper-triangular R of X = QR (full rank). */
function xtxInverseOfR(r: number[][]): number[][] {
  const p = r.length;
  // R⁻¹ (upper triangular), then (XᵀX)⁻¹ = R⁻¹ R⁻ᵀ
  const rinv: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let j = 0; j < p; j++) {
    rinv[j][j] = 1 / r[j][j];
    for (let i = j - 1; i >= 0; i--) {
      let s = 0;
      for (let k = i + 1; k <= j; k++) s += r[i][k] * rinv[k][j];
      rinv[i][j] = -s / r[i][i];
    }
  }
  const xtxInverse: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let i = 0; i < p; i++) {
    for (let j = i; j < p; j++) {
      let s = 0;
      for (let k = j; k < p; k++) s += rinv[i][k] * rinv[j][k];
      xtxInverse[i][j] = s;
      xtxInverse[j][i] = s;
    }
  }
  return xtxInverse;
}

/**
 * The R factor of the Householder QR factorisation X = QR, and Qᵀy (internal building block of
 * {@link leastSquaresQr} and the condition number; no rank check).
 *
 * @param columns the design X as columns of equal length n ≥ p
 * @param y optional response; Qᵀy is returned when given
 * @param overwrite work in place on `columns` and `y` @default false
 * @returns R (p×p rows) and Qᵀy (length n, or empty)
 * @example
 * ```ts
 * import { householderR } from "./least_squares_qr.ts";
 * import assert from "node:assert/strict";
 * const { r } = householderR([new Float64Array([3, 4])]);
 * assert.ok(Math.abs(Math.abs(r[0][0]) - 5) < 1e-12);
 * ```
 */
export function householderR(
  columns: readonly Float64Array[],
  y?: Float64Array,
  overwrite = false,
): { r: number[][]; qty: Float64Array } {
  const { r, qtys } = householderRMany(columns, y ? [y] : [], overwrite);
  return { r, qty: y ? qtys[0] : new Float64Array(0) };
}

/**
 * {@link householderR} for several right-hand sides: the design is factorised first (each
 * reflection applied to the later columns in fused passes), then all reflections are applied
 * to two responses at a time while they are in the processor's cache, each column's sums in
 * the order of the one-column loops (so each response's Qᵀy is what it would be alone, bit
 * for bit), rather than each reflection to every response in turn, which streams all the
 * responses from memory twice per reflection.
 */
function householderRMany(
  columns: readonly Float64Array[],
  ys: readonly Float64Array[],
  overwrite: boolean,
): { r: number[][]; qtys: Float64Array[] } {
  const p = columns.length;
  const n = columns[0].length;
  const a = overwrite ? [...columns] : columns.map((c) => Float64Array.from(c));
  const qtys = overwrite ? [...ys] : ys.map((y) => Float64Array.from(y));
  const diag = new Float64Array(p);
  // the scale of column k (max |a_k[i]|, i ≥ k): for k > 0 found while the previous
  // reflection updates the column
  let nextScale = 0;
  for (let i = 0; i < n; i++) nextScale = Math.max(nextScale, Math.abs(a[0][i]));
  const f = new Float64Array(p);
  // per reflection, vᵀv (0: no reflection)
  const vtvs = new Float64Array(p);
  for (let k = 0; k < p; k++) {
    const ak = a[k];
    let norm = 0;
    // scaled 2-norm to avoid overflow
    const scale = nextScale;
    nextScale = 0;
    const rest: Float64Array[] = a.slice(k + 1);
    if (scale === 0) {
      diag[k] = 0;
      if (k + 1 < p) {
        for (let i = k + 1; i < n; i++) nextScale = Math.max(nextScale, Math.abs(a[k + 1][i]));
      }
      continue;
    }
    for (let i = k; i < n; i++) {
      const v = ak[i] / scale;
      norm += v * v;
    }
    norm = scale * Math.sqrt(norm);
    const x0 = ak[k];
    const alpha = x0 > 0 ? -norm : norm;
    // Householder vector v = x − αe₁, stored in ak[k..n); vᵀv = 2 norm (norm + |x₀|)
    ak[k] = x0 - alpha;
    const vtv = 2 * norm * (norm + Math.abs(x0));
    diag[k] = alpha;
    vtvs[k] = vtv;
    if (vtv === 0) {
      if (k + 1 < p) {
        for (let i = k + 1; i < n; i++) nextScale = Math.max(nextScale, Math.abs(a[k + 1][i]));
      }
      continue;
    }
    // the reflection applied to every later column (and y): all dot products in one pass and
    // all updates in one pass, each column's sums in the order of the one-column loops
    dotProducts(ak, rest, k, n, f);
    for (let j = 0; j < rest.length; j++) f[j] = (2 * f[j]) / vtv;
    nextScale = applyReflection(ak, rest, k, n, f, k + 1 < p);
  }
  // Qᵀy: every reflection (v_k in a[k][k..n)) applied to two responses at a time, while they
  // are in the processor's cache
  const pair = new Float64Array(2);
  for (let r = 0; r < qtys.length; r += 2) {
    const ys2 = qtys.slice(r, r + 2);
    for (let k = 0; k < p; k++) {
      const vtv = vtvs[k];
      if (vtv === 0) continue;
      dotProducts(a[k], ys2, k, n, pair);
      for (let j = 0; j < ys2.length; j++) pair[j] = (2 * pair[j]) / vtv;
      applyReflection(a[k], ys2, k, n, pair, false);
    }
  }
  const r: number[][] = [];
  for (let i = 0; i < p; i++) {
    const row = new Array<number>(p).fill(0);
    row[i] = diag[i];
    for (let j = i + 1; j < p; j++) row[j] = a[j][i];
    r.push(row);
  }
  return { r, qtys };
}

/** out[j] = Σ_{i ≥ k} v[i]·cols[j][i], two columns per pass. */
function dotProducts(
  v: Float64Array,
  cols: Float64Array[],
  k: number,
  n: number,
  out: Float64Array,
): void {
  let j = 0;
  for (; j + 1 < cols.length; j += 2) {
    const c0 = cols[j], c1 = cols[j + 1];
    let s0 = 0, s1 = 0;
    for (let i = k; i < n; i++) {
      const vi = v[i];
      s0 += vi * c0[i];
      s1 += vi * c1[i];
    }
    out[j] = s0;
    out[j + 1] = s1;
  }
  if (j < cols.length) {
    const c0 = cols[j];
    let s0 = 0;
    for (let i = k; i < n; i++) s0 += v[i] * c0[i];
    out[j] = s0;
  }
}

/**
 * cols[j][i] −= f[j]·v[i] for i ≥ k, two columns per pass; returns max |cols[0][i]| over
 * i > k after the update when `scaleFirst` (the next column's scale), else 0.
 */
function applyReflection(
  v: Float64Array,
  cols: Float64Array[],
  k: number,
  n: number,
  f: Float64Array,
  scaleFirst: boolean,
): number {
  let scale = 0, j = 0;
  for (; j + 1 < cols.length; j += 2) {
    const c0 = cols[j], c1 = cols[j + 1], f0 = f[j], f1 = f[j + 1];
    c0[k] -= f0 * v[k];
    c1[k] -= f1 * v[k];
    if (j === 0 && scaleFirst) {
      for (let i = k + 1; i < n; i++) {
        const vi = v[i];
        const u = (c0[i] -= f0 * vi);
        c1[i] -= f1 * vi;
        const au = Math.abs(u);
        if (au > scale) scale = au;
      }
    } else {
      for (let i = k + 1; i < n; i++) {
        const vi = v[i];
        c0[i] -= f0 * vi;
        c1[i] -= f1 * vi;
      }
    }
  }
  if (j < cols.length) {
    const c0 = cols[j], f0 = f[j];
    c0[k] -= f0 * v[k];
    if (j === 0 && scaleFirst) {
      for (let i = k + 1; i < n; i++) {
        const au = Math.abs(c0[i] -= f0 * v[i]);
        if (au > scale) scale = au;
      }
    } else {
      for (let i = k + 1; i < n; i++) c0[i] -= f0 * v[i];
    }
  }
  return scale;
}
