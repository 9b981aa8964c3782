/**
 * Lag-1 autocorrelation by the standard sample estimator (the one R's `acf` uses):
 * r₁ = Σ_{t=1}^{n−1} (x_t − x̄)(x_{t+1} − x̄) / Σ_{t=1}^{n} (x_t − x̄)² (Box & Jenkins 1976,
 * eq. 2.1.12).
 *
 * @module
 */
import { InputError } from "../errors.ts";

/**
 * Lag-1 autocorrelation of `x[start..end)`.
 *
 * @param x series, finite values
 * @param start first index included @default 0
 * @param end one past the last index @default x.length
 * @returns r₁ in [−1, 1]
 * @throws {InputError} (field `x`) when fewer than 3 values are given or the segment is
 *   constant
 * @example
 * ```ts
 * import { lag1Autocorrelation } from "./lag1_autocorrelation.ts";
 * import assert from "node:assert/strict";
 * // R: acf(c(1, 2, 3, 4, 5), plot = FALSE)$acf[2] = 0.4
 * assert.ok(Math.abs(lag1Autocorrelation(new Float64Array([1, 2, 3, 4, 5])) - 0.4) < 1e-15);
 * ```
 */
export function lag1Autocorrelation(x: ArrayLike<number>, start = 0, end = x.length): number {
  const n = end - start;
  if (n < 3) {
    throw new InputError(
      `Cannot compute lag-1 autocorrelation: needs at least 3 values, got ${n}`,
      { field: "x", reason: "too_few_points", value: n },
    );
  }
  let mean = 0;
  for (let i = start; i < end; i++) mean += x[i];
  mean /= n;
  let c0 = 0, c1 = 0, prev = x[start] - mean;
  c0 = prev * prev;
  for (let i = start + 1; i < end; i++) {
    const d = x[i] - mean;
    c0 += d * d;
    c1 += d * prev;
    prev = d;
  }
  if (!(c0 > 0)) {
    throw new InputError("Cannot compute lag-1 autocorrelation: the series is constant", {
      field: "x",
      reason: "constant",
    });
  }
  return c1 / c0;
}
