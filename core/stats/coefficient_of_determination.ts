/**
 * The coefficient of determination of a fit from its residual sum of squares.
 *
 * @module
 */

/**
 * R² = 1 − RSS/TSS: the share of the values' variance about their mean that a fit explains
 * (the usual definition, e.g. Draper & Smith 1998, "Applied Regression Analysis"), with TSS = Σ(yᵢ − ȳ)² over the finite values. Missing (non-finite) values are left out. R² is
 * negative for a fit worse than the mean.
 *
 * @param value the observed values (NaN = missing), input units
 * @param rss residual sum of squares of the fit over the same values, input units²
 * @returns R², dimensionless; null with fewer than 2 finite values or when they are constant
 * @example
 * ```ts
 * import { coefficientOfDetermination } from "./coefficient_of_determination.ts";
 * import assert from "node:assert/strict";
 * // values 1, 2, 3 (TSS = 2) and a fit with residuals 0.5, -0.5, 0 (RSS = 0.5)
 * assert.equal(coefficientOfDetermination([1, NaN, 2, 3], 0.5), 0.75);
 * assert.equal(coefficientOfDetermination([4, 4], 0), null);
 * ```
 */
export function coefficientOfDetermination(
  value: ArrayLike<number>,
  rss: number,
): number | null {
  let n = 0, m = 0;
  for (let i = 0; i < value.length; i++) {
    if (Number.isFinite(value[i])) {
      n++;
      m += value[i];
    }
  }
  if (n < 2) return null;
  m /= n;
  let tss = 0;
  for (let i = 0; i < value.length; i++) if (Number.isFinite(value[i])) tss += (value[i] - m) ** 2;
  return tss > 0 ? 1 - rss / tss : null;
}
