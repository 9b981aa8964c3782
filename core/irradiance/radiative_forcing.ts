/**
 * Radiative forcing from a change of total solar irradiance.
 *
 * @module
 */
import { InputError } from "../errors.ts";
import { normalQuantile } from "../stats/distributions.ts";

/** Planetary albedo used by default (IPCC AR6 WG1 §7.3.4.4). */
export const PLANETARY_ALBEDO = 0.29;

/**
 * Solar radiative forcing ΔF = ΔTSI·(1 − α)/4: the change of irradiance at the top of the
 * atmosphere spread over the sphere (factor 1/4) and reduced by the reflected fraction α
 * (IPCC AR6 WG1 §7.3.4.4).
 *
 * @param deltaTsi change of TSI, W m-2
 * @param albedo planetary albedo α in [0, 1) @default 0.29
 * @returns ΔF in W m-2
 * @throws {InputError} (field `deltaTsi` or `albedo`) for non-finite ΔTSI or α outside [0, 1)
 * @example
 * ```ts
 * import { radiativeForcing } from "./radiative_forcing.ts";
 * import assert from "node:assert/strict";
 * // IPCC AR6 WG1 §7.3.4.4 with α = 0.29: 1 W m-2 → 0.1775 W m-2
 * assert.ok(Math.abs(radiativeForcing(1) - 0.1775) < 1e-12);
 * ```
 */
export function radiativeForcing(deltaTsi: number, albedo = PLANETARY_ALBEDO): number {
  if (!Number.isFinite(deltaTsi)) {
    throw new InputError(`Cannot compute forcing: deltaTsi must be finite, got ${deltaTsi}`, {
      field: "deltaTsi",
      reason: "not_finite",
      value: deltaTsi,
    });
  }
  if (!(albedo >= 0 && albedo < 1)) {
    throw new InputError(`Cannot compute forcing: albedo must be in [0, 1), got ${albedo}`, {
      field: "albedo",
      reason: "out_of_range",
      value: albedo,
    });
  }
  return (deltaTsi * (1 - albedo)) / 4;
}

/** Result of {@link forcingSeries}. */
export interface ForcingSeries {
  /** Mean TSI over the reference period, W m-2, its standard error, and the points used. */
  referenceTsi: number;
  referenceSd: number | null;
  referencePoints: number;
  /** ΔF per point, W m-2, and its one-sigma uncertainty (null without input uncertainty). */
  value: Float64Array;
  sd: Float64Array | null;
}

/**
 * A forcing series relative to a reference period: ΔF(t) = (TSI(t) − T̄_ref)(1 − α)/4 with
 * T̄_ref the mean TSI of the points in [start, end). With a one-sigma uncertainty σ(t) per
 * point, σ_F(t) = (1 − α)/4 · √(σ(t)² + σ_ref²), where σ_ref is the mean σ over the reference
 * period: the errors inside the reference period are taken as fully correlated, an upper
 * bound (reconstruction errors are strongly autocorrelated), and independent of σ(t).
 *
 * @param time decimal years
 * @param tsi TSI, W m-2 (NaN points are skipped in the reference mean and give NaN)
 * @param sd one-sigma TSI uncertainty per point, or null
 * @param reference `{ start, end }` decimal years, end exclusive
 * @param albedo planetary albedo @default 0.29
 * @returns {@link ForcingSeries}
 * @throws {InputError} (field `reference`, reason `no_overlap`) when the reference period holds
 *   no finite TSI; (field `tsi` or `sd`) when lengths differ; as {@link radiativeForcing}
 * @example
 * ```ts
 * import { forcingSeries } from "./radiative_forcing.ts";
 * import assert from "node:assert/strict";
 * const f = forcingSeries([2000.5, 2001.5, 2002.5], [1360.5, 1361.5, 1361], null,
 *   { start: 2000, end: 2001 });
 * assert.equal(f.referenceTsi, 1360.5);
 * assert.ok(Math.abs(f.value[1] - 0.1775) < 1e-12);
 * ```
 */
export function forcingSeries(
  time: ArrayLike<number>,
  tsi: ArrayLike<number>,
  sd: ArrayLike<number> | null,
  reference: { start: number; end: number },
  albedo = PLANETARY_ALBEDO,
): ForcingSeries {
  const n = time.length;
  if (tsi.length !== n || (sd && sd.length !== n)) {
    throw new InputError("Cannot compute forcing series: time, tsi and sd differ in length", {
      field: tsi.length !== n ? "tsi" : "sd",
      reason: "length_mismatch",
    });
  }
  let sum = 0, count = 0, sdSum = 0, sdCount = 0;
  for (let i = 0; i < n; i++) {
    if (time[i] >= reference.start && time[i] < reference.end && Number.isFinite(tsi[i])) {
      sum += tsi[i];
      count++;
      if (sd && Number.isFinite(sd[i])) (sdSum += sd[i]), sdCount++;
    }
  }
  if (count === 0) {
    throw new InputError(
      `Cannot compute forcing series: the reference period [${reference.start}, ${reference.end}) holds no TSI value`,
      { field: "reference", reason: "no_overlap", value: [reference.start, reference.end] },
    );
  }
  const ref = sum / count;
  const refSd = sd && sdCount > 0 ? sdSum / sdCount : null;
  const k = radiativeForcing(1, albedo);
  const value = new Float64Array(n);
  const out = sd ? new Float64Array(n) : null;
  for (let i = 0; i < n; i++) {
    value[i] = Number.isFinite(tsi[i]) ? (tsi[i] - ref) * k : NaN;
    if (out && sd) {
      out[i] = Number.isFinite(sd[i]) ? k * Math.sqrt(sd[i] * sd[i] + (refSd ?? 0) ** 2) : NaN;
    }
  }
  return { referenceTsi: ref, referenceSd: refSd, referencePoints: count, value, sd: out };
}

/** A two-sided normal interval (result of {@link forcingInterval}). */
export interface ForcingInterval {
  lower: Float64Array;
  upper: Float64Array;
  /** The normal quantile z used (1.96 for 95 %). */
  z: number;
}

/**
 * The interval ΔF ± z·σ_F with z the standard normal quantile for a two-sided `level` (the
 * forcing's uncertainty taken as normal; 1.959964 for 95 %). NaN where ΔF or σ_F is missing.
 *
 * @param f a forcing series with uncertainty
 * @param level coverage in (0, 1) @default 0.95
 * @returns {@link ForcingInterval}
 * @throws {InputError} (field `sd`) when the series has no uncertainty; (field `level`) when
 *   out of range
 * @example
 * ```ts
 * import { forcingInterval } from "./radiative_forcing.ts";
 * import assert from "node:assert/strict";
 * const i = forcingInterval({ value: Float64Array.of(0.1), sd: Float64Array.of(0.01),
 *   referenceTsi: 1361, referenceSd: 0, referencePoints: 1 });
 * assert.ok(Math.abs(i.upper[0] - (0.1 + 1.959964 * 0.01)) < 1e-7);
 * ```
 */
export function forcingInterval(f: ForcingSeries, level = 0.95): ForcingInterval {
  if (!f.sd) {
    throw new InputError("Cannot build a forcing interval: the series has no uncertainty", {
      field: "sd",
      reason: "empty",
    });
  }
  if (!(level > 0 && level < 1)) {
    throw new InputError(`Cannot build a forcing interval: level must be in (0, 1), got ${level}`, {
      field: "level",
      reason: "out_of_range",
      value: level,
    });
  }
  const z = normalQuantile(1 - (1 - level) / 2);
  const sd = f.sd, n = f.value.length;
  const lower = new Float64Array(n), upper = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    lower[i] = f.value[i] - z * sd[i];
    upper[i] = f.value[i] + z * sd[i];
  }
  return { lower, upper, z };
}
