/**
 * Fit of the Hathaway, Wilson & Reichmann (1994) shape function to the monthly values of one
 * solar cycle, with parameter uncertainties.
 *
 * @module
 */
import { InputError } from "../errors.ts";
import { levenbergMarquardt } from "ml-levenberg-marquardt";
import { inverse, Matrix } from "ml-matrix";
import { HATHAWAY_C, hathawayAmplitudeFor, hathawayPeak } from "./hathaway_shape.ts";

/**
 * "free": a, t0 and b fitted (three parameters); "amplitude_dependent": a and t0 fitted with
 * the width tied to the amplitude, b = b(a) (Hathaway et al. 1994; the two-parameter form
 * they recommend for predictions early in a cycle).
 */
export type HathawayWidthModel = "free" | "amplitude_dependent";

/** Options of {@link fitHathawayCycle}. */
export interface HathawayFitOptions {
  /** @default "free" */
  width?: HathawayWidthModel;
  /**
   * Factor that converts the input values to the version 1 sunspot-number scale on which
   * b(a) was calibrated: b is evaluated at a × amplitudeScale. 0.6 for version 2 data (V1 ≈
   * 0.6 × V2, Clette et al. 2014; a scales with the values, b does not).
   * @default 1
   */
  amplitudeScale?: number;
  /**
   * Start the search here (e.g. a previous fit) instead of the built-in multi-start.
   * t0 in decimal years, a in input units per month³, b in months (free width only).
   */
  start?: { t0: number; a: number; b?: number };
  /** Levenberg–Marquardt iterations per start. @default 40 */
  maxIterations?: number;
}

/** A fitted cycle. Times in decimal years unless stated. */
export interface HathawayFit {
  width: HathawayWidthModel;
  /** Start of the shape function, decimal year. */
  t0: number;
  /** Amplitude parameter, input units per month³. */
  a: number;
  /** Width, months (derived from a for the amplitude-dependent model). */
  b: number;
  /** Asymmetry parameter (fixed). */
  c: number;
  /** One-sigma standard errors: t0 in years, a in input units per month³, b in months (null
   * when b is derived). From (JᵀJ)⁻¹ s² at the solution. */
  standardErrors: { t0: number | null; a: number | null; b: number | null };
  /** Lag-1 autocorrelation of the residuals (0 when undefined). */
  residualLag1: number;
  /** √((1 + r1)/(1 − r1)) for r1 > 0, else 1: multiply any standard error by it to allow for
   * AR(1) residuals. */
  autocorrelationInflation: number;
  /** Time and height of the fitted curve's maximum with delta-method standard errors. */
  maximum: { time: number; value: number; timeSE: number | null; valueSE: number | null };
  /** Months from t0 to the maximum. */
  riseMonths: number;
  /** Number of points fitted, residual degrees of freedom, residual sum of squares and
   * standard deviation s = √(RSS/dof) (input units). */
  n: number;
  dof: number;
  rss: number;
  sigma: number;
  /** Fitted values at the input times. */
  fitted: Float64Array;
  /** Levenberg–Marquardt iterations run in total. */
  iterations: number;
}

interface Model {
  f: (p: number[]) => (x: number) => number;
  j: (p: number[]) => (x: number) => number[];
  width: (p: number[]) => number;
}

/**
 * Model in fitting units: x in months since the first observation, p = [A, t0] or
 * [A, t0, b] with A = 1000·a (so that the parameters have comparable magnitudes).
 */
function model(width: HathawayWidthModel, scale: number, c: number): Model {
  const bOf = width === "free"
    ? (p: number[]) => p[2]
    : (p: number[]) => 27.12 + 25.15 / Math.pow(p[0] * scale, 0.25);
  const dbdA = (p: number[]) => -(25.15 / 4) * Math.pow(scale, -0.25) * Math.pow(p[0], -1.25);
  const f = (p: number[]) => {
    const a = p[0] / 1000, t0 = p[1], b = bOf(p);
    return (x: number) => {
      const d = x - t0;
      if (d <= 0) return 0;
      const e = Math.exp((d * d) / (b * b));
      return Number.isFinite(e) ? (a * d * d * d) / (e - c) : 0;
    };
  };
  const j = (p: number[]) => {
    const a = p[0] / 1000, t0 = p[1], b = bOf(p);
    const free = width === "free";
    const db = free ? 0 : dbdA(p);
    return (x: number) => {
      const d = x - t0;
      if (d <= 0) return free ? [0, 0, 0] : [0, 0];
      const e = Math.exp((d * d) / (b * b));
      if (!Number.isFinite(e)) return free ? [0, 0, 0] : [0, 0];
      const den = e - c;
      const dFda = (d * d * d) / den;
      const dFdd = (a * d * d * (3 * den - (2 * d * d * e) / (b * b))) / (den * den);
      const dFdb = (2 * a * d ** 5 * e) / (b ** 3 * den * den);
      return free ? [dFda / 1000, -dFdd, dFdb] : [dFda / 1000 + dFdb * db, -dFdd];
    };
  };
  return { f, j, width: bOf };
}

function rss(x: Float64Array, y: Float64Array, f: (x: number) => number): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += (y[i] - f(x[i])) ** 2;
  return s;
}

/**
 * Fit F(t) = a (t − t0)³ / [exp((t − t0)²/b²) − c], c = 0.71, to the monthly values of one
 * cycle (Hathaway, Wilson & Reichmann 1994, Sol. Phys. 151, 177), by
 * least squares.
 *
 * Solver: the maintained `ml-levenberg-marquardt` package with the analytic Jacobian. It
 * returns no parameter covariance, so the covariance is computed here from the Jacobian at
 * the solution, (JᵀJ)⁻¹ s² with s² = RSS/(n − p) (with ml-matrix), and standard errors of the
 * maximum's time and height follow by the delta method. The package has no relative
 * convergence test (it runs every iteration unless the absolute RSS falls below a tolerance),
 * so the iteration count is kept small and several starts are tried when no `start` is
 * given: t0 12, 3 and −6 months before the first value for the free width; t0 12 months before
 * and at the first value, with maxima of 50, 120 and 250 (V1 scale), for the
 * amplitude-dependent width.
 *
 * Monthly residuals are autocorrelated, which makes (JᵀJ)⁻¹ s² too optimistic; the fit
 * therefore also reports the residuals' lag-1 autocorrelation r1 and standard errors inflated
 * by √((1 + r1)/(1 − r1)), the AR(1) variance-inflation factor of an effective sample size
 * n(1 − r1)/(1 + r1) (Bretherton et al. 1999, J. Climate 12, 1990, eq. 31).
 *
 * Units: t and t0 in decimal years (the shape function's months are (t − t0)·12); a in input
 * units per month³; b in months.
 *
 * @param time decimal years of the monthly values (any spacing), finite, ≥ p + 2 points
 * @param value sunspot numbers (or areas) at those times, finite
 * @param options width model, scale of b(a), start and iterations
 * @returns the fit
 * @throws {InputError} for too few points (field `time`), non-finite values or an all-zero
 *   series (field `value`), or a non-positive amplitudeScale
 * @example
 * ```ts
 * import { fitHathawayCycle } from "./cycle_shape_fit.ts";
 * import { hathawayShape } from "./hathaway_shape.ts";
 * import assert from "node:assert/strict";
 * const t = Array.from({ length: 130 }, (_, i) => 2000 + i / 12);
 * const v = t.map((x) => hathawayShape((x - 2000) * 12, { t0: -4, a: 0.002 }));
 * const fit = fitHathawayCycle(t, v, { width: "amplitude_dependent" });
 * assert.ok(Math.abs(fit.a - 0.002) < 1e-6);
 * assert.ok(Math.abs(fit.t0 - (2000 - 4 / 12)) < 1e-3);
 * ```
 */
export function fitHathawayCycle(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  options: HathawayFitOptions = {},
): HathawayFit {
  const width = options.width ?? "free";
  const scale = options.amplitudeScale ?? 1;
  const c = HATHAWAY_C;
  const np = width === "free" ? 3 : 2;
  const n = time.length;
  const fn = "fit Hathaway cycle";
  if (value.length !== n) {
    throw new InputError(`Cannot ${fn}: time has ${n} points but value has ${value.length}`, {
      field: "value",
      reason: "length_mismatch",
      value: value.length,
    });
  }
  if (n < np + 2) {
    throw new InputError(`Cannot ${fn}: needs at least ${np + 2} points, got ${n}`, {
      field: "time",
      reason: "too_few_points",
      value: n,
    });
  }
  if (!(Number.isFinite(scale) && scale > 0)) {
    throw new InputError(`Cannot ${fn}: amplitudeScale must be > 0, current value is ${scale}`, {
      field: "amplitudeScale",
      reason: "out_of_range",
      value: scale,
    });
  }
  const t0Ref = time[0];
  const x = new Float64Array(n), y = new Float64Array(n);
  let peak = -Infinity, peakX = 0;
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(time[i]) || !Number.isFinite(value[i])) {
      throw new InputError(`Cannot ${fn}: point ${i} is not finite (${time[i]}, ${value[i]})`, {
        field: Number.isFinite(time[i]) ? "value" : "time",
        reason: "not_finite",
        index: i,
      });
    }
    x[i] = (time[i] - t0Ref) * 12;
    y[i] = value[i];
  }
  // a robust peak: the highest centred 7-point mean
  for (let i = 0; i < n; i++) {
    let s = 0, k = 0;
    for (let j = Math.max(0, i - 3); j <= Math.min(n - 1, i + 3); j++) {
      s += y[j];
      k++;
    }
    if (s / k > peak) {
      peak = s / k;
      peakX = x[i];
    }
  }
  if (!(peak > 0)) {
    throw new InputError(`Cannot ${fn}: every value is zero or negative`, {
      field: "value",
      reason: "out_of_range",
    });
  }
  const xEnd = x[n - 1];
  const m = model(width, scale, c);
  const { x: xs, g } = hathawayPeak(c);
  const minValues = width === "free" ? [1e-4, -60, 4] : [1e-4, -60];
  const maxValues = width === "free" ? [1e5, xEnd, 400] : [1e5, xEnd];
  const iters = options.maxIterations ?? 40;
  const run = (p0: number[], it: number) => {
    const r = levenbergMarquardt({ x, y }, m.f, {
      initialValues: p0,
      jacobianFunction: m.j,
      minValues,
      maxValues,
      maxIterations: it,
      errorTolerance: 0,
      damping: 1e-2,
    });
    return { p: r.parameterValues, err: rss(x, y, m.f(r.parameterValues)), it: r.iterations };
  };
  const starts: number[][] = [];
  if (options.start) {
    const A = options.start.a * 1000, t0 = (options.start.t0 - t0Ref) * 12;
    starts.push(width === "free" ? [A, t0, options.start.b ?? m.width([A, t0])] : [A, t0]);
  } else if (width === "free") {
    for (const t0 of [-12, -3, 6]) {
      const b = Math.max(8, (peakX - t0) / xs);
      starts.push([(1000 * peak) / (g * b ** 3), t0, b]);
    }
  } else {
    for (const mx of [50, 120, 250]) {
      for (const t0 of [-12, 0]) starts.push([1000 * hathawayAmplitudeFor(mx) / scale, t0]);
    }
  }
  let best = { p: starts[0], err: Infinity, it: 0 };
  let total = 0;
  for (const s of starts) {
    const r = run(s, starts.length > 1 ? Math.min(iters, 15) : iters);
    total += r.it;
    if (r.err < best.err) best = r;
  }
  if (starts.length > 1) {
    const r = run(best.p, iters);
    total += r.it;
    if (r.err <= best.err) best = r;
  }
  const p = best.p;
  const f = m.f(p), jf = m.j(p);
  const fitted = new Float64Array(n);
  const J = new Matrix(n, np);
  for (let i = 0; i < n; i++) {
    fitted[i] = f(x[i]);
    const row = jf(x[i]);
    for (let k = 0; k < np; k++) J.set(i, k, row[k]);
  }
  let r0 = 0, r1 = 0;
  for (let i = 0; i < n; i++) {
    const e = y[i] - fitted[i];
    r0 += e * e;
    if (i > 0) r1 += e * (y[i - 1] - fitted[i - 1]);
  }
  const lag1 = r0 > 0 ? Math.max(-0.99, Math.min(0.99, r1 / r0)) : 0;
  const dof = n - np;
  const s2 = best.err / dof;
  let cov: Matrix | null = null;
  try {
    const cm = inverse(J.transpose().mmul(J)).mul(s2);
    let ok = true;
    for (let k = 0; k < np; k++) {
      if (!(cm.get(k, k) >= 0 && Number.isFinite(cm.get(k, k)))) ok = false;
    }
    cov = ok ? cm : null;
  } catch {
    cov = null;
  }
  const A = p[0], a = A / 1000, b = m.width(p);
  const se = (k: number) => (cov ? Math.sqrt(cov.get(k, k)) : null);
  // delta method for the maximum: t_max = t0 + x*·b, F_max = g·a·b³
  const db = width === "free" ? [0, 0, 1] : [-(25.15 / 4) * scale ** -0.25 * A ** -1.25, 0];
  const gT = width === "free" ? [0, 1, xs] : [xs * db[0], 1];
  const gF = width === "free"
    ? [(g * b ** 3) / 1000, 0, 3 * g * a * b * b]
    : [g * (b ** 3 / 1000 + 3 * a * b * b * db[0]), 0];
  const quad = (v: number[]) => {
    if (!cov) return null;
    let q = 0;
    for (let i = 0; i < np; i++) for (let k = 0; k < np; k++) q += v[i] * cov.get(i, k) * v[k];
    return q >= 0 ? Math.sqrt(q) : null;
  };
  const tSE = quad(gT);
  return {
    width,
    t0: t0Ref + p[1] / 12,
    a,
    b,
    c,
    standardErrors: {
      t0: se(1) === null ? null : se(1)! / 12,
      a: se(0) === null ? null : se(0)! / 1000,
      b: width === "free" ? se(2) : null,
    },
    maximum: {
      time: t0Ref + (p[1] + xs * b) / 12,
      value: g * a * b ** 3,
      timeSE: tSE === null ? null : tSE / 12,
      valueSE: quad(gF),
    },
    residualLag1: lag1,
    autocorrelationInflation: lag1 > 0 ? Math.sqrt((1 + lag1) / (1 - lag1)) : 1,
    riseMonths: xs * b,
    n,
    dof,
    rss: best.err,
    sigma: Math.sqrt(s2),
    fitted,
    iterations: total,
  };
}

/**
 * Evaluate a fitted cycle at decimal-year times.
 *
 * @param fit from {@link fitHathawayCycle}
 * @param time decimal years
 * @returns values in input units (0 before t0)
 * @example
 * ```ts
 * import { hathawayCurve } from "./cycle_shape_fit.ts";
 * import assert from "node:assert/strict";
 * const v = hathawayCurve({ t0: 2000, a: 0.002, b: 45, c: 0.71 }, [1999, 2004]);
 * assert.equal(v[0], 0);
 * assert.ok(v[1] > 0);
 * ```
 */
export function hathawayCurve(
  fit: Pick<HathawayFit, "t0" | "a" | "b" | "c">,
  time: ArrayLike<number>,
): Float64Array {
  const out = new Float64Array(time.length);
  for (let i = 0; i < time.length; i++) {
    const d = (time[i] - fit.t0) * 12;
    if (d <= 0) continue;
    const e = Math.exp((d * d) / (fit.b * fit.b));
    out[i] = Number.isFinite(e) ? (fit.a * d * d * d) / (e - fit.c) : 0;
  }
  return out;
}
