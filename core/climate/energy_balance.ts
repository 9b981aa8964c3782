/**
 * Energy-balance response of surface temperature to a radiative forcing series.
 *
 * - One-box model (e.g. Hansen et al. 1981; Wigley & Schlesinger 1985): C dT/dt = F − λT.
 * - Two-box model (Gregory 2000; Held et al. 2010, J. Climate 23, 2418, eqs. 1–2): a fast
 *   mixed layer T and a deep ocean T_d,
 *   C dT/dt = F − λT − γ(T − T_d),  C_d dT_d/dt = γ(T − T_d).
 *
 * Units: time in years, F in W m-2, T in K, λ and γ in W m-2 K-1, heat capacities in
 * W yr m-2 K-1 (1 W yr m-2 K-1 = 3.156e7 J m-2 K-1; a 50 m mixed layer is about 6.68).
 *
 * Integration is exact for forcing that is linear between samples (first-order hold): each
 * step applies the closed-form solution of the linear ODE, so any time step is stable and
 * the only error is the piecewise-linear reading of the forcing (for a sinusoid of angular
 * frequency ω sampled every h years the amplitude is low by about (ωh)²/12).
 *
 * Steady-state response to F = F₀ sin ωt (one-box): T = F₀/√(λ² + C²ω²) · sin(ωt − φ),
 * φ = arctan(Cω/λ), lag φ/ω (the standard first-order linear response; derived). Two-box:
 * the same from the complex transfer function (iω − A)⁻¹b of the linear system.
 *
 * @module
 */
import { InputError } from "../errors.ts";

/** Parameters of the one-box model. */
export interface OneBoxParameters {
  /** Heat capacity C, W yr m-2 K-1 (> 0). */
  heatCapacity: number;
  /** Climate feedback parameter λ, W m-2 K-1 (> 0). */
  feedback: number;
}

/** Parameters of the two-box model. */
export interface TwoBoxParameters extends OneBoxParameters {
  /** Deep-ocean heat capacity C_d, W yr m-2 K-1 (> 0). */
  deepHeatCapacity: number;
  /** Exchange coefficient γ between the boxes, W m-2 K-1 (> 0). */
  exchange: number;
}

/**
 * Defaults of the one-box model: λ = 1.3 W m-2 K-1 (the feedback of Held et al. 2010, J.
 * Climate 23, 2418; from memory), C = 8.0 W yr m-2 K-1 (a mixed layer of about 60 m of sea
 * water; common practice).
 */
export const ONE_BOX_DEFAULTS: Readonly<OneBoxParameters> = { heatCapacity: 8.0, feedback: 1.3 };

/**
 * Defaults of the two-box model, fitted to a coupled model by Held et al. 2010 (J. Climate
 * 23, 2418; values from memory, M): C = 7.3, C_d = 106 W yr m-2 K-1, λ = 1.3,
 * γ = 0.7 W m-2 K-1.
 */
export const TWO_BOX_DEFAULTS: Readonly<TwoBoxParameters> = {
  heatCapacity: 7.3,
  deepHeatCapacity: 106,
  feedback: 1.3,
  exchange: 0.7,
};

function checkPositive(fn: string, name: string, v: number) {
  if (!(v > 0) || !Number.isFinite(v)) {
    throw new InputError(`Cannot ${fn}: ${name} must be a positive finite number, got ${v}`, {
      field: name,
      reason: "out_of_range",
      value: v,
    });
  }
}

function checkSeries(fn: string, time: ArrayLike<number>, forcing: ArrayLike<number>) {
  if (time.length !== forcing.length) {
    throw new InputError(
      `Cannot ${fn}: time has ${time.length} values, forcing has ${forcing.length}`,
      { field: "forcing", reason: "length_mismatch", value: forcing.length },
    );
  }
  if (time.length < 2) {
    throw new InputError(`Cannot ${fn}: needs at least 2 forcing values, got ${time.length}`, {
      field: "forcing",
      reason: "too_few_points",
      value: time.length,
    });
  }
  for (let i = 0; i < time.length; i++) {
    if (!Number.isFinite(time[i]) || !Number.isFinite(forcing[i])) {
      throw new InputError(`Cannot ${fn}: time or forcing at index ${i} is not finite`, {
        field: Number.isFinite(time[i]) ? "forcing" : "time",
        reason: "not_finite",
        index: i,
      });
    }
    if (i > 0 && !(time[i] > time[i - 1])) {
      throw new InputError(`Cannot ${fn}: time must increase strictly (index ${i})`, {
        field: "time",
        reason: "not_increasing",
        index: i,
        value: time[i],
      });
    }
  }
}

/**
 * Integrate the one-box model C dT/dt = F − λT through a forcing series, exactly for forcing
 * linear between samples.
 *
 * @param time decimal years, strictly increasing (any spacing)
 * @param forcing W m-2 at those times
 * @param params heat capacity and feedback @default ONE_BOX_DEFAULTS
 * @param initial temperature at time[0], K @default 0
 * @returns temperature response in K at each time
 * @throws {InputError} on mismatched, non-finite or non-increasing input (field `time` or
 *   `forcing`, with the index), or non-positive parameters (the parameter's name)
 * @example
 * ```ts
 * import { oneBoxResponse } from "./energy_balance.ts";
 * import assert from "node:assert/strict";
 * // constant forcing: T → F/λ with e-folding time C/λ
 * const time = Float64Array.from({ length: 201 }, (_, i) => i);
 * const T = oneBoxResponse(time, new Float64Array(201).fill(1.3), { heatCapacity: 8, feedback: 1.3 });
 * assert.ok(Math.abs(T[200] - 1) < 1e-12);
 * assert.ok(Math.abs(T[1] - (1 - Math.exp(-1.3 / 8))) < 1e-12);
 * ```
 */
export function oneBoxResponse(
  time: ArrayLike<number>,
  forcing: ArrayLike<number>,
  params: OneBoxParameters = ONE_BOX_DEFAULTS,
  initial = 0,
): Float64Array {
  const fn = "integrate one-box model";
  checkSeries(fn, time, forcing);
  checkPositive(fn, "heatCapacity", params.heatCapacity);
  checkPositive(fn, "feedback", params.feedback);
  const lam = params.feedback, tau = params.heatCapacity / lam;
  const n = time.length;
  const out = new Float64Array(n);
  out[0] = initial;
  for (let i = 1; i < n; i++) {
    const h = time[i] - time[i - 1];
    const s = (forcing[i] - forcing[i - 1]) / h;
    const e = Math.exp(-h / tau);
    // T(t) = T_p(t) + (T0 − T_p(t0)) e^{−(t−t0)/τ}, T_p = (F(t) − sτ)/λ
    const p0 = (forcing[i - 1] - s * tau) / lam, p1 = (forcing[i] - s * tau) / lam;
    out[i] = p1 + (out[i - 1] - p0) * e;
  }
  return out;
}

/** 2×2 real matrix as [a, b, c, d] = [[a, b], [c, d]]. */
type M2 = [number, number, number, number];

function mul(m: M2, v: [number, number]): [number, number] {
  return [m[0] * v[0] + m[1] * v[1], m[2] * v[0] + m[3] * v[1]];
}

function inv(m: M2): M2 {
  const det = m[0] * m[3] - m[1] * m[2];
  return [m[3] / det, -m[1] / det, -m[2] / det, m[0] / det];
}

/** e^{Ah} for a 2×2 matrix with real distinct eigenvalues (the two-box system always has). */
function expm(a: M2, h: number): M2 {
  const m = (a[0] + a[3]) / 2;
  const det = a[0] * a[3] - a[1] * a[2];
  const q = Math.sqrt(Math.max(0, m * m - det));
  const em = Math.exp(m * h);
  const ch = Math.cosh(q * h);
  const sh = q > 0 ? Math.sinh(q * h) / q : h;
  return [
    em * (ch + sh * (a[0] - m)),
    em * sh * a[1],
    em * sh * a[2],
    em * (ch + sh * (a[3] - m)),
  ];
}

/** Output of {@link twoBoxResponse}. */
export interface TwoBoxResponse {
  /** Mixed-layer (surface) temperature, K. */
  surface: Float64Array;
  /** Deep-ocean temperature, K. */
  deep: Float64Array;
}

function twoBoxSystem(p: TwoBoxParameters): { a: M2; b: [number, number] } {
  const { heatCapacity: c, deepHeatCapacity: cd, feedback: lam, exchange: g } = p;
  return { a: [-(lam + g) / c, g / c, g / cd, -g / cd], b: [1 / c, 0] };
}

/**
 * Integrate the two-box model through a forcing series, exactly for forcing linear between
 * samples: X(t) = X_p(t) + e^{A(t−t₀)}(X₀ − X_p(t₀)) with X_p = −A⁻¹b F(t) − A⁻²b s on each
 * step (s the forcing slope).
 *
 * @param time decimal years, strictly increasing
 * @param forcing W m-2
 * @param params C, C_d, λ, γ @default TWO_BOX_DEFAULTS
 * @param initial [T, T_d] at time[0], K @default [0, 0]
 * @returns surface and deep temperatures, K
 * @throws {InputError} as {@link oneBoxResponse}
 * @example
 * ```ts
 * import { twoBoxResponse } from "./energy_balance.ts";
 * import assert from "node:assert/strict";
 * // constant forcing: both boxes reach F/λ in equilibrium
 * const time = Float64Array.from({ length: 11 }, (_, i) => i * 1000);
 * const r = twoBoxResponse(time, new Float64Array(11).fill(2.6));
 * assert.ok(Math.abs(r.surface[10] - 2) < 1e-9 && Math.abs(r.deep[10] - 2) < 1e-9);
 * ```
 */
export function twoBoxResponse(
  time: ArrayLike<number>,
  forcing: ArrayLike<number>,
  params: TwoBoxParameters = TWO_BOX_DEFAULTS,
  initial: [number, number] = [0, 0],
): TwoBoxResponse {
  const fn = "integrate two-box model";
  checkSeries(fn, time, forcing);
  for (const k of ["heatCapacity", "deepHeatCapacity", "feedback", "exchange"] as const) {
    checkPositive(fn, k, params[k]);
  }
  const { a, b } = twoBoxSystem(params);
  const ai = inv(a);
  const aib = mul(ai, b); // A⁻¹b
  const ai2b = mul(ai, aib); // A⁻²b
  const n = time.length;
  const surface = new Float64Array(n), deep = new Float64Array(n);
  let x: [number, number] = [initial[0], initial[1]];
  surface[0] = x[0];
  deep[0] = x[1];
  let lastH = NaN;
  let e: M2 = [1, 0, 0, 1];
  for (let i = 1; i < n; i++) {
    const h = time[i] - time[i - 1];
    if (h !== lastH) {
      e = expm(a, h);
      lastH = h;
    }
    const s = (forcing[i] - forcing[i - 1]) / h;
    const p0: [number, number] = [
      -aib[0] * forcing[i - 1] - ai2b[0] * s,
      -aib[1] * forcing[i - 1] - ai2b[1] * s,
    ];
    const p1: [number, number] = [
      -aib[0] * forcing[i] - ai2b[0] * s,
      -aib[1] * forcing[i] - ai2b[1] * s,
    ];
    const d = mul(e, [x[0] - p0[0], x[1] - p0[1]]);
    x = [p1[0] + d[0], p1[1] + d[1]];
    surface[i] = x[0];
    deep[i] = x[1];
  }
  return { surface, deep };
}

/** Steady-state response to a sinusoidal forcing of unit amplitude. */
export interface SinusoidResponse {
  /** Temperature amplitude per unit forcing amplitude, K per W m-2. */
  gain: number;
  /** Phase lag φ of the temperature behind the forcing, radians in [0, π). */
  phase: number;
  /** Time lag φ/ω, years. */
  lagYears: number;
}

function checkPeriod(fn: string, period: number) {
  checkPositive(fn, "period", period);
}

/**
 * Analytic steady-state one-box response to F₀ sin(2πt/P): gain 1/√(λ² + C²ω²),
 * phase arctan(Cω/λ), lag phase/ω.
 *
 * @param params C and λ
 * @param period forcing period P, years
 * @returns gain (K per W m-2), phase (rad), lag (yr)
 * @throws {InputError} on non-positive parameters or period (field: the parameter's name)
 * @example
 * ```ts
 * import { oneBoxSinusoidResponse } from "./energy_balance.ts";
 * import assert from "node:assert/strict";
 * // derived from the closed form: λ = 1.3, C = 8, P = 11 yr, F₀ = 0.08875 → 0.0374 K p-p, 2.26 yr
 * const r = oneBoxSinusoidResponse({ heatCapacity: 8, feedback: 1.3 }, 11);
 * assert.ok(Math.abs(2 * 0.08875 * r.gain - 0.0374) < 5e-5);
 * assert.ok(Math.abs(r.lagYears - 2.26) < 5e-3);
 * ```
 */
export function oneBoxSinusoidResponse(params: OneBoxParameters, period: number): SinusoidResponse {
  const fn = "compute one-box sinusoid response";
  checkPositive(fn, "heatCapacity", params.heatCapacity);
  checkPositive(fn, "feedback", params.feedback);
  checkPeriod(fn, period);
  const w = (2 * Math.PI) / period;
  const cw = params.heatCapacity * w;
  const phase = Math.atan2(cw, params.feedback);
  return { gain: 1 / Math.hypot(params.feedback, cw), phase, lagYears: phase / w };
}

/**
 * Analytic steady-state two-box surface response to F₀ sin(2πt/P), from the transfer
 * function X̂ = (iωI − A)⁻¹ b F̂ of the linear system.
 *
 * @param params C, C_d, λ, γ
 * @param period forcing period P, years
 * @returns gain, phase and lag of the surface temperature
 * @throws {InputError} on non-positive parameters or period (field: the parameter's name)
 * @example
 * ```ts
 * import { oneBoxSinusoidResponse, twoBoxSinusoidResponse } from "./energy_balance.ts";
 * import assert from "node:assert/strict";
 * // a deep ocean that barely couples (tiny γ) leaves the one-box answer
 * const two = twoBoxSinusoidResponse(
 *   { heatCapacity: 8, deepHeatCapacity: 100, feedback: 1.3, exchange: 1e-9 }, 11);
 * const one = oneBoxSinusoidResponse({ heatCapacity: 8, feedback: 1.3 }, 11);
 * assert.ok(Math.abs(two.gain - one.gain) < 1e-9 && Math.abs(two.phase - one.phase) < 1e-9);
 * ```
 */
export function twoBoxSinusoidResponse(params: TwoBoxParameters, period: number): SinusoidResponse {
  const fn = "compute two-box sinusoid response";
  for (const k of ["heatCapacity", "deepHeatCapacity", "feedback", "exchange"] as const) {
    checkPositive(fn, k, params[k]);
  }
  checkPeriod(fn, period);
  const w = (2 * Math.PI) / period;
  const h = twoBoxTransfer(params, w);
  // T = Re(h e^{iωt}) for F = Re(e^{iωt}); F = sin ωt likewise: gain |h|, phase lag −arg h
  const phase = -Math.atan2(h.surfaceIm, h.surfaceRe);
  return { gain: Math.hypot(h.surfaceRe, h.surfaceIm), phase, lagYears: phase / w };
}

/**
 * Complex transfer function (iωI − A)⁻¹ b of the two-box model at angular frequency ω: the
 * steady response to F = Re(e^{iωt}) is T = Re(h e^{iωt}) (K per W m-2).
 *
 * @param params C, C_d, λ, γ
 * @param omega angular frequency, rad per year
 * @returns real and imaginary parts for the surface and deep boxes
 * @example
 * ```ts
 * import { twoBoxTransfer } from "./energy_balance.ts";
 * import assert from "node:assert/strict";
 * // ω → 0: the equilibrium response 1/λ in both boxes
 * const h = twoBoxTransfer({ heatCapacity: 7.3, deepHeatCapacity: 106, feedback: 1.3, exchange: 0.7 }, 1e-9);
 * assert.ok(Math.abs(h.surfaceRe - 1 / 1.3) < 1e-6 && Math.abs(h.deepRe - 1 / 1.3) < 1e-6);
 * ```
 */
export function twoBoxTransfer(
  params: TwoBoxParameters,
  omega: number,
): { surfaceRe: number; surfaceIm: number; deepRe: number; deepIm: number } {
  const { a, b } = twoBoxSystem(params);
  // M = iωI − A, complex 2×2: real part −A, imaginary part ωI
  const m11r = -a[0], m12r = -a[1], m21r = -a[2], m22r = -a[3];
  // det = (m11r + iω)(m22r + iω) − m12r m21r
  const detR = m11r * m22r - omega * omega - m12r * m21r;
  const detI = omega * (m11r + m22r);
  const d2 = detR * detR + detI * detI;
  // inverse · b with b = [b0, 0]: x1 = (m22r + iω) b0 / det, x2 = −m21r b0 / det
  const n1r = m22r * b[0], n1i = omega * b[0];
  const n2r = -m21r * b[0];
  return {
    surfaceRe: (n1r * detR + n1i * detI) / d2,
    surfaceIm: (n1i * detR - n1r * detI) / d2,
    deepRe: (n2r * detR) / d2,
    deepIm: (-n2r * detI) / d2,
  };
}

/**
 * Temperature at t = 0 of the steady-state one-box response to F₀ sin(2πt/P):
 * T(0) = F₀ · gain · sin(−φ) (from {@link oneBoxSinusoidResponse}). An integration started
 * there follows the steady state from the first step, with no transient to wait out.
 *
 * @param params C and λ
 * @param period forcing period P, years
 * @param amplitude F₀, W m-2
 * @returns T(0), K
 * @throws {InputError} as {@link oneBoxSinusoidResponse}
 * @example
 * ```ts
 * import { oneBoxResponse, oneBoxSinusoidStart } from "./energy_balance.ts";
 * import assert from "node:assert/strict";
 * const p = { heatCapacity: 8, feedback: 1.3 };
 * const t = Float64Array.from({ length: 1101 }, (_, i) => i / 100);
 * const f = t.map((x) => 0.1 * Math.sin((2 * Math.PI * x) / 11));
 * const T = oneBoxResponse(t, f, p, oneBoxSinusoidStart(p, 11, 0.1));
 * // one full period later the steady state is back where it started
 * assert.ok(Math.abs(T[1100] - T[0]) < 1e-6);
 * ```
 */
export function oneBoxSinusoidStart(
  params: OneBoxParameters,
  period: number,
  amplitude: number,
): number {
  const r = oneBoxSinusoidResponse(params, period);
  return amplitude * r.gain * Math.sin(-r.phase);
}

/**
 * Surface and deep temperatures at t = 0 of the steady-state two-box response to
 * F₀ sin(2πt/P): F₀ times the imaginary parts of the transfer function ({@link twoBoxTransfer}),
 * so an integration started there has no transient.
 *
 * @param params C, C_d, λ, γ
 * @param period forcing period P, years
 * @param amplitude F₀, W m-2
 * @returns [T(0), T_d(0)], K
 * @throws {InputError} on non-positive parameters or period (field: the parameter's name)
 * @example
 * ```ts
 * import { twoBoxResponse, twoBoxSinusoidStart } from "./energy_balance.ts";
 * import assert from "node:assert/strict";
 * const p = { heatCapacity: 7.3, deepHeatCapacity: 106, feedback: 1.3, exchange: 0.7 };
 * const t = Float64Array.from({ length: 1101 }, (_, i) => i / 100);
 * const f = t.map((x) => 0.1 * Math.sin((2 * Math.PI * x) / 11));
 * const r = twoBoxResponse(t, f, p, twoBoxSinusoidStart(p, 11, 0.1));
 * assert.ok(Math.abs(r.surface[1100] - r.surface[0]) < 1e-6);
 * assert.ok(Math.abs(r.deep[1100] - r.deep[0]) < 1e-6);
 * ```
 */
export function twoBoxSinusoidStart(
  params: TwoBoxParameters,
  period: number,
  amplitude: number,
): [number, number] {
  const fn = "compute two-box sinusoid start";
  for (const k of ["heatCapacity", "deepHeatCapacity", "feedback", "exchange"] as const) {
    checkPositive(fn, k, params[k]);
  }
  checkPeriod(fn, period);
  const h = twoBoxTransfer(params, (2 * Math.PI) / period);
  return [amplitude * h.surfaceIm, amplitude * h.deepIm];
}

/**
 * Least-squares fit of A sin(ωt − φ) + c to a series (linear in sin, cos and a constant):
 * used to read the amplitude and phase of a numerical response.
 *
 * @param time decimal years
 * @param values the series
 * @param period P, years
 * @returns amplitude A ≥ 0, phase φ in (−π, π] relative to sin(ωt), and lag φ/ω
 * @throws {InputError} with fewer than 3 points (field `values`) or a non-positive period
 *   (`period`)
 * @example
 * ```ts
 * import { fitSinusoid } from "./energy_balance.ts";
 * import assert from "node:assert/strict";
 * const t = Float64Array.from({ length: 100 }, (_, i) => i / 10);
 * const v = t.map((x) => 2 * Math.sin(2 * Math.PI * x / 5 - 0.4) + 1);
 * const f = fitSinusoid(t, v, 5);
 * assert.ok(Math.abs(f.amplitude - 2) < 1e-12 && Math.abs(f.phase - 0.4) < 1e-12);
 * ```
 */
export function fitSinusoid(
  time: ArrayLike<number>,
  values: ArrayLike<number>,
  period: number,
): { amplitude: number; phase: number; lagYears: number } {
  if (time.length !== values.length || time.length < 3) {
    throw new InputError("Cannot fit sinusoid: needs at least 3 points with matching lengths", {
      field: "values",
      reason: time.length !== values.length ? "length_mismatch" : "too_few_points",
      value: values.length,
    });
  }
  checkPeriod("fit sinusoid", period);
  const w = (2 * Math.PI) / period;
  // normal equations for [sin, cos, 1] (3×3, solved by Cramer's rule; well conditioned over
  // whole periods)
  let ss = 0, sc = 0, s1 = 0, cc = 0, c1 = 0, n = 0, ys = 0, yc = 0, y1 = 0;
  for (let i = 0; i < time.length; i++) {
    const s = Math.sin(w * time[i]), c = Math.cos(w * time[i]), y = values[i];
    ss += s * s;
    sc += s * c;
    s1 += s;
    cc += c * c;
    c1 += c;
    n += 1;
    ys += y * s;
    yc += y * c;
    y1 += y;
  }
  const det3 = (m: number[]) =>
    m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6]) +
    m[2] * (m[3] * m[7] - m[4] * m[6]);
  const M = [ss, sc, s1, sc, cc, c1, s1, c1, n];
  const D = det3(M);
  const p = det3([ys, sc, s1, yc, cc, c1, y1, c1, n]) / D; // coefficient of sin
  const q = det3([ss, ys, s1, sc, yc, c1, s1, y1, n]) / D; // coefficient of cos
  // A sin(ωt − φ) = A cos φ sin ωt − A sin φ cos ωt
  const amplitude = Math.hypot(p, q);
  const phase = Math.atan2(-q, p);
  return { amplitude, phase, lagYears: phase / w };
}
