/**
 * Typed wrappers for the Student-t, normal and chi-square distribution functions of the
 * maintained `@stdlib` packages (cumulative distribution functions and quantiles). The
 * wrappers check their arguments, so a bad degree of freedom is an {@link InputError} (a
 * RangeError naming the argument), never a silent NaN.
 *
 * @module
 */
import stdlibTCdf from "@stdlib/stats-base-dists-t-cdf";
import stdlibTQuantile from "@stdlib/stats-base-dists-t-quantile";
import stdlibNormalCdf from "@stdlib/stats-base-dists-normal-cdf";
import stdlibNormalQuantile from "@stdlib/stats-base-dists-normal-quantile";
import stdlibChiSquareCdf from "@stdlib/stats-base-dists-chisquare-cdf";
import { InputError } from "../errors.ts";

function checkDf(fn: string, df: number, field = "df"): void {
  if (!(df > 0) || !Number.isFinite(df)) {
    throw new InputError(
      `Cannot evaluate ${fn}: degrees of freedom must be a positive finite number, current value is ${df}`,
      { field, reason: "out_of_range", value: df },
    );
  }
}

function checkProbability(fn: string, p: number): void {
  if (!(p >= 0 && p <= 1)) {
    throw new InputError(`Cannot evaluate ${fn}: p must be in [0, 1], current value is ${p}`, {
      field: "p",
      reason: "out_of_range",
      value: p,
    });
  }
}

function checkX(fn: string, x: number): void {
  if (Number.isNaN(x)) {
    throw new InputError(`Cannot evaluate ${fn}: x is NaN`, { field: "x", reason: "not_finite" });
  }
}

/**
 * Cumulative distribution function of Student's t distribution, P(T ≤ x).
 *
 * @param x the value (±Infinity allowed)
 * @param df degrees of freedom, positive (need not be an integer)
 * @returns a probability in [0, 1]
 * @throws {InputError} when x is NaN or df is not a positive finite number
 * @example
 * ```ts
 * import { tCdf } from "./distributions.ts";
 * import assert from "node:assert/strict";
 * // R: pt(2, 10) = 0.9633060
 * assert.ok(Math.abs(tCdf(2, 10) - 0.9633060) < 1e-7);
 * ```
 */
export function tCdf(x: number, df: number): number {
  checkX("tCdf", x);
  checkDf("tCdf", df);
  return stdlibTCdf(x, df);
}

/**
 * Quantile function of Student's t distribution: the x with P(T ≤ x) = p.
 *
 * @param p probability in [0, 1]
 * @param df degrees of freedom, positive
 * @returns the quantile (±Infinity at p = 0 or 1)
 * @throws {InputError} when p is outside [0, 1] or df is not a positive finite number
 * @example
 * ```ts
 * import { tQuantile } from "./distributions.ts";
 * import assert from "node:assert/strict";
 * // R: qt(0.975, 10) = 2.228139
 * assert.ok(Math.abs(tQuantile(0.975, 10) - 2.228139) < 1e-6);
 * ```
 */
export function tQuantile(p: number, df: number): number {
  checkProbability("tQuantile", p);
  checkDf("tQuantile", df);
  return stdlibTQuantile(p, df);
}

/**
 * Cumulative distribution function of the normal distribution N(mean, sd²).
 *
 * @param x the value
 * @param mean @default 0
 * @param sd standard deviation, positive @default 1
 * @returns a probability in [0, 1]
 * @throws {InputError} when x is NaN or sd is not positive
 * @example
 * ```ts
 * import { normalCdf } from "./distributions.ts";
 * import assert from "node:assert/strict";
 * // R: pnorm(1.96) = 0.9750021
 * assert.ok(Math.abs(normalCdf(1.96) - 0.9750021) < 1e-7);
 * ```
 */
export function normalCdf(x: number, mean = 0, sd = 1): number {
  checkX("normalCdf", x);
  if (!(sd > 0) || !Number.isFinite(sd) || !Number.isFinite(mean)) {
    throw new InputError(
      `Cannot evaluate normalCdf: needs finite mean and positive sd, got mean ${mean}, sd ${sd}`,
      { field: Number.isFinite(mean) ? "sd" : "mean", reason: "out_of_range" },
    );
  }
  return stdlibNormalCdf(x, mean, sd);
}

/**
 * Quantile function of the normal distribution N(mean, sd²).
 *
 * @param p probability in [0, 1]
 * @param mean @default 0
 * @param sd standard deviation, positive @default 1
 * @returns the quantile (±Infinity at p = 0 or 1)
 * @throws {InputError} when p is outside [0, 1] or sd is not positive
 * @example
 * ```ts
 * import { normalQuantile } from "./distributions.ts";
 * import assert from "node:assert/strict";
 * // R: qnorm(0.975) = 1.959964
 * assert.ok(Math.abs(normalQuantile(0.975) - 1.959964) < 1e-6);
 * ```
 */
export function normalQuantile(p: number, mean = 0, sd = 1): number {
  checkProbability("normalQuantile", p);
  if (!(sd > 0) || !Number.isFinite(sd) || !Number.isFinite(mean)) {
    throw new InputError(
      `Cannot evaluate normalQuantile: needs finite mean and positive sd, got mean ${mean}, sd ${sd}`,
      { field: Number.isFinite(mean) ? "sd" : "mean", reason: "out_of_range" },
    );
  }
  return stdlibNormalQuantile(p, mean, sd);
}

/**
 * Cumulative distribution function of the chi-square distribution with k degrees of freedom.
 *
 * @param x the value (negative x gives 0)
 * @param k degrees of freedom, positive
 * @returns a probability in [0, 1]
 * @throws {InputError} when x is NaN or k is not a positive finite number
 * @example
 * ```ts
 * import { chiSquareCdf } from "./distributions.ts";
 * import assert from "node:assert/strict";
 * // R: pchisq(3.841459, 1) = 0.95
 * assert.ok(Math.abs(chiSquareCdf(3.841459, 1) - 0.95) < 1e-6);
 * ```
 */
export function chiSquareCdf(x: number, k: number): number {
  checkX("chiSquareCdf", x);
  checkDf("chiSquareCdf", k, "k");
  return stdlibChiSquareCdf(x, k);
}
