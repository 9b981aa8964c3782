/**
 * The solar disc as seen from Earth on a date: heliographic latitude B0 and Carrington
 * longitude L0 of the disc centre and the position angle P of the rotation axis, and the
 * heliocentric angle of a point given by its heliographic coordinates.
 *
 * @module
 */
import { InputError } from "../errors.ts";

import { daysFromCivil, daysInYear } from "../time/calendar.ts";

const RAD = Math.PI / 180;

/** Disc geometry of one instant, degrees. */
export interface SolarDiscGeometry {
  /** Heliographic latitude of the disc centre, degrees (−7.25..7.25). */
  b0Deg: number;
  /** Carrington longitude of the disc centre, degrees in [0, 360). */
  l0Deg: number;
  /** Position angle of the northern rotation axis, east of celestial north, degrees. */
  pDeg: number;
}

/**
 * Julian Day of a decimal year (UTC on sunlag's proleptic Gregorian axis; the ≈1 minute
 * difference between UT and dynamical time is ignored, far below what disc geometry needs).
 *
 * @param t decimal year
 * @returns Julian Day
 * @throws {InputError} when t is not finite
 * @example
 * ```ts
 * import { julianDay } from "./solar_disc_geometry.ts";
 * import assert from "node:assert/strict";
 * assert.equal(julianDay(2000 + 0.5 / 366), 2451545); // 2000-01-01 12:00 = J2000.0
 * ```
 */
export function julianDay(t: number): number {
  if (!Number.isFinite(t)) {
    throw new InputError(`Cannot compute Julian Day: decimal year must be finite, got ${t}`, {
      field: "t",
      reason: "not_finite",
      value: t,
    });
  }
  const year = Math.floor(t);
  return 2440587.5 + daysFromCivil(year, 1, 1) + (t - year) * daysInYear(year);
}

/**
 * B0, L0 and P of the solar disc at a Julian Day, by Meeus (1998, Astronomical Algorithms,
 * 2nd ed., ch. 29 "Ephemeris for physical observations of the Sun", after Carrington's
 * elements: inclination I = 7.25°, node K = 73.6667° + 1.3958333° (JD − 2396758)/36525,
 * rotation θ = (JD − 2398220)·360°/25.38), with the Sun's apparent longitude from the
 * low-precision theory of Meeus ch. 25 (accuracy about 0.01°):
 * B0 = asin(sin(λ − K) sin I), η = atan2(−sin(λ − K) cos I, −cos(λ − K)), L0 = η − θ,
 * P = atan(−cos λ tan ε) + atan(−cos(λ − K) tan I).
 * Checked against sunpy (fixtures/reference/disc_geometry_sunpy.py): B0 and P within 0.05°;
 * L0 within 0.04° near 2000, drifting by ~0.1° per century because sunpy follows the IAU
 * rotation model (pole fixed in ICRS) while Meeus refers the node to the ecliptic of date.
 *
 * @param jd Julian Day (UT ≈ TT)
 * @returns {@link SolarDiscGeometry} in degrees
 * @throws {InputError} when jd is not finite
 * @example
 * ```ts
 * import { solarDiscGeometry } from "./solar_disc_geometry.ts";
 * import assert from "node:assert/strict";
 * // Meeus 1998, example 29.a, 1992 October 13.0: B0 = +5.99°, L0 = 238.63°, P = +26.27°
 * const g = solarDiscGeometry(2448908.5);
 * assert.ok(Math.abs(g.b0Deg - 5.99) < 0.02);
 * assert.ok(Math.abs(g.l0Deg - 238.63) < 0.02);
 * assert.ok(Math.abs(g.pDeg - 26.27) < 0.02);
 * ```
 */
export function solarDiscGeometry(jd: number): SolarDiscGeometry {
  if (!Number.isFinite(jd)) {
    throw new InputError(`Cannot compute solar disc geometry: jd must be finite, got ${jd}`, {
      field: "jd",
      reason: "not_finite",
      value: jd,
    });
  }
  const T = (jd - 2451545) / 36525;
  // Meeus ch. 25, low accuracy apparent longitude
  const L0s = 280.46646 + 36000.76983 * T + 0.0003032 * T * T;
  const M = (357.52911 + 35999.05029 * T - 0.0001537 * T * T) * RAD;
  const C = (1.914602 - 0.004817 * T - 0.000014 * T * T) * Math.sin(M) +
    (0.019993 - 0.000101 * T) * Math.sin(2 * M) + 0.000289 * Math.sin(3 * M);
  const omega = (125.04 - 1934.136 * T) * RAD;
  const lambda = (L0s + C - 0.00569 - 0.00478 * Math.sin(omega)) * RAD;
  // mean obliquity (Meeus eq. 22.2) plus the nutation-in-obliquity term of ch. 25
  const eps = (23.439291 - 0.0130042 * T + 0.00256 * Math.cos(omega)) * RAD;
  // Meeus ch. 29
  const theta = ((jd - 2398220) * 360) / 25.38;
  const I = 7.25 * RAD;
  const K = (73.6667 + (1.3958333 * (jd - 2396758)) / 36525) * RAD;
  const lk = lambda - K;
  const x = Math.atan(-Math.cos(lambda) * Math.tan(eps));
  const y = Math.atan(-Math.cos(lk) * Math.tan(I));
  const b0 = Math.asin(Math.sin(lk) * Math.sin(I));
  const eta = Math.atan2(-Math.sin(lk) * Math.cos(I), -Math.cos(lk)) / RAD;
  let l0 = (eta - theta) % 360;
  if (l0 < 0) l0 += 360;
  return { b0Deg: b0 / RAD, l0Deg: l0, pDeg: (x + y) / RAD };
}

/**
 * μ = cos θ of a point on the disc from its heliographic latitude φ and its longitude from
 * the central meridian Δλ: cos θ = sin B0 sin φ + cos B0 cos φ cos Δλ (spherical cosine rule
 * between the point and the disc centre (B0, L0); the Sun seen from infinite distance, which
 * changes θ by at most 0.27°). Points behind the limb give μ ≤ 0.
 *
 * @param latitudeDeg heliographic latitude φ, degrees in [−90, 90]
 * @param centralMeridianDeg longitude from the central meridian (L − L0), degrees
 * @param b0Deg heliographic latitude of the disc centre, degrees @default 0
 * @returns μ in [−1, 1]
 * @throws {InputError} for non-finite input or |φ| > 90
 * @example
 * ```ts
 * import { heliographicMu } from "./solar_disc_geometry.ts";
 * import assert from "node:assert/strict";
 * assert.ok(Math.abs(heliographicMu(0, 60) - 0.5) < 1e-12);
 * assert.ok(Math.abs(heliographicMu(7.25, 0, 7.25) - 1) < 1e-12); // at the disc centre
 * ```
 */
export function heliographicMu(latitudeDeg: number, centralMeridianDeg: number, b0Deg = 0): number {
  if (
    !Number.isFinite(latitudeDeg) || !Number.isFinite(centralMeridianDeg) ||
    !Number.isFinite(b0Deg) || Math.abs(latitudeDeg) > 90
  ) {
    throw new InputError(
      `Cannot compute mu: needs finite latitude in [-90, 90], longitude and B0, got ${latitudeDeg}, ${centralMeridianDeg}, ${b0Deg}`,
      {
        field: !Number.isFinite(latitudeDeg) || Math.abs(latitudeDeg) > 90
          ? "latitudeDeg"
          : !Number.isFinite(centralMeridianDeg)
          ? "centralMeridianDeg"
          : "b0Deg",
        reason: "out_of_range",
      },
    );
  }
  const p = latitudeDeg * RAD, b = b0Deg * RAD, d = centralMeridianDeg * RAD;
  return Math.sin(b) * Math.sin(p) + Math.cos(b) * Math.cos(p) * Math.cos(d);
}
