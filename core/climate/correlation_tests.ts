/**
 * Analytic significance and intervals for a correlation coefficient with a (possibly
 * effective) sample size: Student's t test and Fisher's z interval.
 *
 * - t = r √((N − 2)/(1 − r²)) with N − 2 degrees of freedom (standard; e.g. Wilks 2011,
 *   Statistical Methods in the Atmospheric Sciences, 3rd ed., eq. 5.17); with N replaced by
 *   N_eff for autocorrelated series (Bretherton et al. 1999).
 * - Fisher 1915/1921: z = artanh r is nearly normal with SE 1/√(N − 3).
 *
 * @module
 */
import { InputError } from "../errors.ts";
import { normalQuantile, tCdf } from "../stats/distributions.ts";

/** Result of {@link correlationTTest}. */
export interface CorrelationTTest {
  t: number;
  /** Degrees of freedom N − 2. */
  df: number;
  /** Two-sided p-value. */
  p: number;
}

/**
 * Two-sided t test of ρ = 0 for a sample correlation r with sample size n (or N_eff).
 *
 * @param r correlation in [−1, 1]
 * @param n sample size (may be fractional, an effective size), > 2
 * @returns t, df = n − 2, two-sided p
 * @throws {InputError} (field `r` or `n`) when |r| > 1 or n ≤ 2
 * @example
 * ```ts
 * import { correlationTTest } from "./correlation_tests.ts";
 * import assert from "node:assert/strict";
 * // derived from the formula: r = 0.3, N = 100 → t = 0.3 √(98 / 0.91) = 3.113
 * assert.ok(Math.abs(correlationTTest(0.3, 100).t - 3.113) < 5e-4);
 * ```
 */
export function correlationTTest(r: number, n: number): CorrelationTTest {
  if (!(Math.abs(r) <= 1)) {
    throw new InputError(`Cannot test correlation: r must be in [−1, 1], got ${r}`, {
      field: "r",
      reason: "out_of_range",
      value: r,
    });
  }
  if (!(n > 2) || !Number.isFinite(n)) {
    throw new InputError(`Cannot test correlation: needs a sample size above 2, got ${n}`, {
      field: "n",
      reason: "too_few_points",
      value: n,
    });
  }
  const df = n - 2;
  if (Math.abs(r) === 1) return { t: r > 0 ? Number.MAX_VALUE : -Number.MAX_VALUE, df, p: 0 };
  const t = r * Math.sqrt(df / (1 - r * r));
  const p = Math.min(1, 2 * tCdf(-Math.abs(t), df));
  return { t, df, p };
}

/**
 * Fisher z confidence interval for a correlation: tanh(artanh r ± z_{(1+level)/2}/√(n − 3)).
 *
 * @param r correlation in (−1, 1)
 * @param n sample size (or N_eff), > 3
 * @param level confidence level in (0, 1) @default 0.95
 * @returns [lower, upper]
 * @throws {InputError} (field `r`, `n` or `level`) when |r| ≥ 1, n ≤ 3 or level is outside
 *   (0, 1)
 * @example
 * ```ts
 * import { fisherZInterval } from "./correlation_tests.ts";
 * import assert from "node:assert/strict";
 * // derived from the formula: r = 0.5, N = 50 → tanh(artanh 0.5 ± 1.96/√47) = [0.2575, 0.6833]
 * const [lo, hi] = fisherZInterval(0.5, 50);
 * assert.ok(Math.abs(lo - 0.2575) < 5e-5 && Math.abs(hi - 0.6833) < 5e-5);
 * ```
 */
export function fisherZInterval(r: number, n: number, level = 0.95): [number, number] {
  if (!(Math.abs(r) < 1)) {
    throw new InputError(`Cannot compute Fisher interval: r must be in (−1, 1), got ${r}`, {
      field: "r",
      reason: "out_of_range",
      value: r,
    });
  }
  if (!(n > 3) || !Number.isFinite(n)) {
    throw new InputError(`Cannot compute Fisher interval: needs a sample size above 3, got ${n}`, {
      field: "n",
      reason: "too_few_points",
      value: n,
    });
  }
  if (!(level > 0 && level < 1)) {
    throw new InputError(`Cannot compute Fisher interval: level must be in (0, 1), got ${level}`, {
      field: "level",
      reason: "out_of_range",
      value: level,
    });
  }
  const z = Math.atanh(r);
  const half = normalQuantile((1 + level) / 2) / Math.sqrt(n - 3);
  return [Math.tanh(z - half), Math.tanh(z + half)];
}
