/**
 * The Hathaway, Wilson & Reichmann (1994) solar-cycle shape function, its amplitude-dependent
 * width, its peak, and the Waldmeier rise-time relation.
 *
 * Method: Hathaway, D. H., Wilson, R. M. & Reichmann, E. J. 1994, "The shape of the sunspot
 * cycle", Sol. Phys. 151, 177:
 *
 *   F(t) = a (t − t0)^3 / [exp((t − t0)^2 / b^2) − c],   t and t0 in months, c = 0.71,
 *
 * on the version 1 sunspot-number scale, with the one-parameter width
 * b(a) = 27.12 + 25.15 / (a·1e3)^(1/4) months (constants from memory).
 * Writing x = (t − t0)/b, F = a b^3 g(x) with g(x) = x^3 / (exp(x^2) − c), so the cycle peaks
 * at t0 + x* b with F_max = g(x*) a b^3; for c = 0.71, x* = 1.081 and g(x*) = 0.5038 (derived).
 *
 * @module
 */

/** Default asymmetry parameter c of the shape function (Hathaway et al. 1994). */
export const HATHAWAY_C = 0.71;

/** Parameters of one cycle of the Hathaway shape function. */
export interface HathawayCycle {
  /** Start time t0 of the cycle, months (any origin, same as `t`). */
  t0: number;
  /** Amplitude parameter a, sunspot number per month^3 (V1 scale); must be > 0. */
  a: number;
  /**
   * Width b, months; must be > 0.
   * @default hathawayWidth(a)
   */
  b?: number;
  /**
   * Asymmetry parameter c, dimensionless, in [0, 1).
   * @default 0.71
   */
  c?: number;
}

function checkC(fn: string, c: number): void {
  if (!Number.isFinite(c) || c < 0 || c >= 1) {
    throw new RangeError(
      `Cannot ${fn}: c must be a finite number in [0, 1), current value is ${c}`,
    );
  }
}

function checkPositive(fn: string, name: string, v: number): void {
  if (!Number.isFinite(v) || v <= 0) {
    throw new RangeError(
      `Cannot ${fn}: ${name} must be a finite positive number, current value is ${v}`,
    );
  }
}

/**
 * The amplitude-dependent width b(a) of the Hathaway et al. (1994) shape function:
 * b = 27.12 + 25.15 / (a·1e3)^(1/4) months (constants from memory).
 *
 * Larger cycles get narrower widths and hence shorter rise times (the Waldmeier effect).
 *
 * @param a amplitude parameter, sunspot number per month^3 (V1 scale), > 0
 * @returns width b in months
 * @throws {RangeError} when a is not a finite positive number
 * @example
 * ```ts
 * import { hathawayWidth } from "./hathaway_shape.ts";
 * import assert from "node:assert/strict";
 * // a = 1e-3 → (a·1e3)^(1/4) = 1 → b = 27.12 + 25.15
 * assert.ok(Math.abs(hathawayWidth(1e-3) - 52.27) < 1e-12);
 * ```
 */
export function hathawayWidth(a: number): number {
  checkPositive("compute Hathaway width", "a", a);
  return 27.12 + 25.15 / Math.pow(a * 1e3, 0.25);
}

/**
 * The peak of the dimensionless shape g(x) = x^3 / (exp(x^2) − c), x > 0.
 *
 * Setting g'(x) = 0 gives 3 (exp(x^2) − c) = 2 x^2 exp(x^2), i.e.
 * h(x) = (3 − 2x^2) exp(x^2) − 3c = 0, solved here by bisection on [0.5, √1.5] where h
 * changes sign for every c in [0, 1) (written by hand: a one-dimensional root of a smooth
 * monotone function needs no library). For c = 0.71, x* = 1.081 and g(x*) = 0.5038 (derived
 * here).
 *
 * @param c asymmetry parameter in [0, 1) (default 0.71)
 * @returns `{ x, g }`: location x* (in units of b) and height g(x*) of the peak
 * @throws {RangeError} when c is outside [0, 1)
 * @example
 * ```ts
 * import { hathawayPeak } from "./hathaway_shape.ts";
 * import assert from "node:assert/strict";
 * const { x, g } = hathawayPeak();
 * assert.ok(Math.abs(x - 1.081) < 5e-4 && Math.abs(g - 0.5038) < 5e-5);
 * ```
 */
export function hathawayPeak(c: number = HATHAWAY_C): { x: number; g: number } {
  checkC("locate Hathaway peak", c);
  const h = (x: number) => (3 - 2 * x * x) * Math.exp(x * x) - 3 * c;
  // h(0.5) = 2.5·e^0.25 − 3c > 0 for c < 1; h(√1.5) = −3c ≤ 0
  let lo = 0.5, hi = Math.sqrt(1.5);
  if (c === 0) return { x: hi, g: hi ** 3 / Math.exp(1.5) };
  for (let i = 0; i < 200 && hi - lo > 1e-15; i++) {
    const mid = 0.5 * (lo + hi);
    if (h(mid) > 0) lo = mid;
    else hi = mid;
  }
  const x = 0.5 * (lo + hi);
  return { x, g: x ** 3 / (Math.exp(x * x) - c) };
}

/**
 * Evaluate the Hathaway et al. (1994) shape function F(t) = a (t − t0)^3 /
 * [exp((t − t0)^2 / b^2) − c] at one time.
 *
 * Edge cases: the function describes a cycle after its start, so F = 0 for t ≤ t0 (the cubic
 * would be negative there); it decays to 0 far after the peak (exp overflow gives 0, not NaN).
 *
 * @param t time, months (same origin as `cycle.t0`)
 * @param cycle t0 (months), a (V1 sunspot number per month^3), optional b (months, default
 *   b(a)) and c (default 0.71)
 * @returns sunspot number (V1 scale), ≥ 0
 * @throws {RangeError} when t or t0 is not finite, a or b not positive, c outside [0, 1)
 * @example
 * ```ts
 * import { hathawayShape, hathawayPeak, hathawayWidth } from "./hathaway_shape.ts";
 * import assert from "node:assert/strict";
 * const a = 0.002, b = hathawayWidth(a);
 * const { x, g } = hathawayPeak();
 * assert.ok(Math.abs(hathawayShape(x * b, { t0: 0, a }) - g * a * b ** 3) < 1e-9);
 * assert.equal(hathawayShape(-5, { t0: 0, a }), 0);
 * ```
 */
export function hathawayShape(t: number, cycle: HathawayCycle): number {
  const fn = "evaluate Hathaway shape";
  if (!Number.isFinite(t)) {
    throw new RangeError(`Cannot ${fn}: t must be finite, current value is ${t}`);
  }
  if (!Number.isFinite(cycle.t0)) {
    throw new RangeError(`Cannot ${fn}: t0 must be finite, current value is ${cycle.t0}`);
  }
  checkPositive(fn, "a", cycle.a);
  const b = cycle.b ?? hathawayWidth(cycle.a);
  checkPositive(fn, "b", b);
  const c = cycle.c ?? HATHAWAY_C;
  checkC(fn, c);
  const d = t - cycle.t0;
  if (d <= 0) return 0;
  const e = Math.exp((d * d) / (b * b));
  if (!Number.isFinite(e)) return 0;
  return (cycle.a * d * d * d) / (e - c);
}

/**
 * Peak sunspot number of a Hathaway cycle: F_max = g(x*) a b^3 (= 0.5038 a b^3 for c = 0.71).
 *
 * @param a amplitude parameter (V1 sunspot number per month^3), > 0
 * @param options b (months, default b(a)) and c (default 0.71)
 * @returns peak sunspot number (V1 scale)
 * @throws {RangeError} when a or b is not positive or c is outside [0, 1)
 * @example
 * ```ts
 * import { hathawayMaximum } from "./hathaway_shape.ts";
 * import assert from "node:assert/strict";
 * assert.ok(Math.abs(hathawayMaximum(1, { b: 10 }) - 503.8) < 0.05);
 * ```
 */
export function hathawayMaximum(a: number, options: { b?: number; c?: number } = {}): number {
  checkPositive("compute Hathaway maximum", "a", a);
  const b = options.b ?? hathawayWidth(a);
  checkPositive("compute Hathaway maximum", "b", b);
  return hathawayPeak(options.c ?? HATHAWAY_C).g * a * b ** 3;
}

/**
 * Rise time of a Hathaway cycle, from its start t0 to its maximum: x* b months
 * (= 1.081 b for c = 0.71). t0 precedes the smoothed minimum slightly, because the previous
 * cycle's tail overlaps the start of this one.
 *
 * @param a amplitude parameter (V1 sunspot number per month^3), > 0
 * @param options b (months, default b(a)) and c (default 0.71)
 * @returns months from t0 to the peak
 * @throws {RangeError} when a or b is not positive or c is outside [0, 1)
 * @example
 * ```ts
 * import { hathawayRiseMonths } from "./hathaway_shape.ts";
 * import assert from "node:assert/strict";
 * assert.ok(Math.abs(hathawayRiseMonths(1, { b: 40 }) - 43.24) < 0.02);
 * ```
 */
export function hathawayRiseMonths(a: number, options: { b?: number; c?: number } = {}): number {
  checkPositive("compute Hathaway rise time", "a", a);
  const b = options.b ?? hathawayWidth(a);
  checkPositive("compute Hathaway rise time", "b", b);
  return hathawayPeak(options.c ?? HATHAWAY_C).x * b;
}

/**
 * Invert the one-parameter Hathaway cycle: the amplitude parameter a whose peak, with the width
 * b(a), equals the given maximum sunspot number. The peak g(x*) a b(a)^3 increases strictly
 * with a, so the root is found by bisection on log a (written by hand: a scalar monotone root).
 *
 * @param maximum peak sunspot number (V1 scale), > 0
 * @param c asymmetry parameter, default 0.71
 * @returns a, V1 sunspot number per month^3
 * @throws {RangeError} when maximum is not a finite positive number
 * @example
 * ```ts
 * import { hathawayAmplitudeFor, hathawayMaximum } from "./hathaway_shape.ts";
 * import assert from "node:assert/strict";
 * const a = hathawayAmplitudeFor(150);
 * assert.ok(Math.abs(hathawayMaximum(a) - 150) < 1e-9);
 * ```
 */
export function hathawayAmplitudeFor(maximum: number, c: number = HATHAWAY_C): number {
  checkPositive("invert Hathaway maximum", "maximum", maximum);
  const g = hathawayPeak(c).g;
  const peak = (a: number) => g * a * hathawayWidth(a) ** 3;
  let lo = -40, hi = 40; // natural log of a
  for (let i = 0; i < 300 && hi - lo > 1e-14; i++) {
    const mid = 0.5 * (lo + hi);
    if (peak(Math.exp(mid)) < maximum) lo = mid;
    else hi = mid;
  }
  return Math.exp(0.5 * (lo + hi));
}

/**
 * The Waldmeier effect as a rise-time relation: rise (months) ≈ 35 + 1800 / amplitude,
 * amplitude the smoothed maximum sunspot number on the V1 scale (Hathaway 2010, Living Rev.
 * Sol. Phys. 7, 1, eq. 7).
 *
 * @param amplitude smoothed cycle maximum, V1 sunspot number, > 0
 * @returns rise time from minimum to maximum, months
 * @throws {RangeError} when amplitude is not a finite positive number
 * @example
 * ```ts
 * import { waldmeierRiseMonths } from "./hathaway_shape.ts";
 * import assert from "node:assert/strict";
 * assert.equal(waldmeierRiseMonths(100), 53);
 * ```
 */
export function waldmeierRiseMonths(amplitude: number): number {
  checkPositive("compute Waldmeier rise time", "amplitude", amplitude);
  return 35 + 1800 / amplitude;
}
