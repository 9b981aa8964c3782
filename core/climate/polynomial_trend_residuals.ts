/**
 * Removing a mean, linear or quadratic trend from a series with gaps, before a composite
 * (otherwise a trend makes late epochs look warmer than early ones).
 *
 * @module
 */
import { ordinaryLeastSquares } from "../stats/ordinary_least_squares.ts";
import { InputError } from "../errors.ts";

/**
 * Residuals of the least-squares polynomial of the given degree in the sample index, fitted to
 * the finite values only (ordinary least squares by Householder QR; Draper & Smith 1998,
 * Applied Regression Analysis, ch. 5). The index is centred and scaled to [−1, 1] for
 * conditioning; gaps (NaN) stay gaps and are never filled. Units: those of x.
 *
 * @param x evenly spaced values, NaN where missing
 * @param degree 0 (mean), 1 (linear) or 2 (quadratic)
 * @returns a new array: x minus the fitted polynomial, NaN where x is NaN
 * @throws {InputError} when fewer than degree + 4 values are finite (field `x`, reason
 *   `too_few_points`) or the degree is not 0, 1 or 2 (`degree`)
 * @example
 * ```ts
 * import { polynomialTrendResiduals } from "./polynomial_trend_residuals.ts";
 * import assert from "node:assert/strict";
 * const r = polynomialTrendResiduals(Float64Array.of(1, 2, NaN, 4, 5, 6), 1);
 * assert.ok(Number.isNaN(r[2]));
 * assert.ok([0, 1, 3, 4, 5].every((i) => Math.abs(r[i]) < 1e-12));
 * ```
 */
export function polynomialTrendResiduals(x: Float64Array, degree: 0 | 1 | 2): Float64Array {
  if (degree !== 0 && degree !== 1 && degree !== 2) {
    throw new InputError(
      `Cannot remove polynomial trend: degree must be 0, 1 or 2, got ${degree}`,
      {
        field: "degree",
        reason: "unsupported",
        value: degree,
      },
    );
  }
  const idx: number[] = [];
  for (let i = 0; i < x.length; i++) if (Number.isFinite(x[i])) idx.push(i);
  if (idx.length < degree + 4) {
    throw new InputError(
      `Cannot remove polynomial trend: needs at least ${degree + 4} values, got ${idx.length}`,
      { field: "x", reason: "too_few_points", value: idx.length },
    );
  }
  const mid = (x.length - 1) / 2;
  const cols = Array.from(
    { length: degree },
    (_, d) => Float64Array.from(idx, (i) => ((i - mid) / Math.max(mid, 1)) ** (d + 1)),
  );
  const fit = ordinaryLeastSquares(cols, Float64Array.from(idx, (i) => x[i]));
  const out = new Float64Array(x.length).fill(NaN);
  idx.forEach((i, k) => (out[i] = fit.residuals[k]));
  return out;
}
