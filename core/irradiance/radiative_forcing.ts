/**
 * Radiative forcing from a change of total solar irradiance.
 *
 * @module
 */
import { InputError } from "../errors.ts";
import { type StopOptions, throwIfStopped } from "../stop_signal.ts";
import { normalQuantile } from "../stats/distributions.ts";
import {
  differenceFromMeanVariance,
  type ReconstructionErrorModel,
} from "./reconstruction_error_model.ts";

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
  /** Mean TSI over the reference period, W m-2, the SD of that mean, and the points used. */
  referenceTsi: number;
  referenceSd: number | null;
  referencePoints: number;
  /** ΔF per point, W m-2, and its one-sigma uncertainty (null without input uncertainty). */
  value: Float64Array;
  sd: Float64Array | null;
}

/**
 * The errors of the TSI a forcing is computed from: none; one-sigma uncertainties of points
 * whose errors are independent of each other (all a stored series can say); or a linearised
 * error model with the covariances between points (a reconstruction's,
 * core/irradiance/reconstruction_error_model.ts).
 */
export type ForcingErrors =
  | null
  | { kind: "independent"; sd: ArrayLike<number> }
  | { kind: "error_model"; model: ReconstructionErrorModel };

/**
 * The reference points of a forcing: those in [start, end) with a finite TSI.
 *
 * @param time decimal years
 * @param tsi TSI, W m-2 (NaN for missing)
 * @param reference `{ start, end }` decimal years, end exclusive
 * @returns 1 at the reference points
 * @throws {InputError} (field `reference`, reason `no_overlap`) when there is none; (field
 *   `tsi`) when the lengths differ
 * @example
 * ```ts
 * import { referencePoints } from "./radiative_forcing.ts";
 * import assert from "node:assert/strict";
 * const r = referencePoints([2000.5, 2001.5, 2002.5], [1361, NaN, 1361], { start: 2000, end: 2002 });
 * assert.deepEqual([...r], [1, 0, 0]);
 * ```
 */
export function referencePoints(
  time: ArrayLike<number>,
  tsi: ArrayLike<number>,
  reference: { start: number; end: number },
): Uint8Array {
  const n = time.length;
  if (tsi.length !== n) {
    throw new InputError("Cannot compute forcing series: time and tsi differ in length", {
      field: "tsi",
      reason: "length_mismatch",
    });
  }
  const out = new Uint8Array(n);
  let count = 0;
  for (let i = 0; i < n; i++) {
    if (time[i] >= reference.start && time[i] < reference.end && Number.isFinite(tsi[i])) {
      out[i] = 1;
      count++;
    }
  }
  if (count === 0) {
    throw new InputError(
      `Cannot compute forcing series: the reference period [${reference.start}, ${reference.end}) holds no TSI value`,
      { field: "reference", reason: "no_overlap", value: [reference.start, reference.end] },
    );
  }
  return out;
}

/**
 * A forcing series relative to a reference period: ΔF(t) = (TSI(t) − T̄_ref)(1 − α)/4 with
 * T̄_ref the mean TSI of the {@link referencePoints}. Its one-sigma uncertainty is
 * (1 − α)/4·√Var(x_t − m̄) with Var(x_t − m̄) = Var(x_t) + Var(m̄) − 2·Cov(x_t, m̄) (the
 * variance of a difference, e.g. Bevington & Robinson 2003, §3.2):
 *
 * - independent point errors σ_t: Var(m̄) = Σ_ref σ²/n², Cov(x_t, m̄) = σ_t²/n inside the
 *   reference and 0 outside;
 * - an error model: the covariances it implies
 *   (core/irradiance/reconstruction_error_model.ts `differenceFromMeanVariance`), so errors
 *   shared with the reference (the quiet-Sun level) cancel.
 *
 * @param time decimal years
 * @param tsi TSI, W m-2 (NaN points are skipped in the reference mean and give NaN)
 * @param errors {@link ForcingErrors}; an array is read as independent one-sigma errors
 * @param reference `{ start, end }` decimal years, end exclusive
 * @param albedo planetary albedo @default 0.29
 * @returns {@link ForcingSeries}
 * @throws {InputError} as {@link referencePoints}; (field `sd` or `errorModel`) when the
 *   errors do not cover every point; as {@link radiativeForcing}
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
  errors: ForcingErrors | ArrayLike<number>,
  reference: { start: number; end: number },
  albedo = PLANETARY_ALBEDO,
): ForcingSeries {
  const n = time.length;
  const inRef = referencePoints(time, tsi, reference);
  const e: ForcingErrors = errors === null || "kind" in errors
    ? errors as ForcingErrors
    : { kind: "independent", sd: errors as ArrayLike<number> };
  let sum = 0, count = 0;
  for (let i = 0; i < n; i++) if (inRef[i]) (sum += tsi[i]), count++;
  const ref = sum / count;
  const k = radiativeForcing(1, albedo);
  const value = new Float64Array(n);
  for (let i = 0; i < n; i++) value[i] = Number.isFinite(tsi[i]) ? (tsi[i] - ref) * k : NaN;
  if (e === null) {
    return { referenceTsi: ref, referenceSd: null, referencePoints: count, value, sd: null };
  }
  const sd = new Float64Array(n);
  let refVar: number;
  if (e.kind === "independent") {
    if (e.sd.length !== n) {
      throw new InputError("Cannot compute forcing series: time and sd differ in length", {
        field: "sd",
        reason: "length_mismatch",
      });
    }
    let sq = 0;
    for (let i = 0; i < n; i++) if (inRef[i]) sq += Number.isFinite(e.sd[i]) ? e.sd[i] ** 2 : 0;
    refVar = sq / (count * count);
    for (let i = 0; i < n; i++) {
      const s2 = e.sd[i] * e.sd[i];
      const v = s2 + refVar - (inRef[i] ? (2 * s2) / count : 0);
      sd[i] = Number.isFinite(tsi[i]) ? k * Math.sqrt(Math.max(0, v)) : NaN;
    }
  } else {
    if (e.model.cells !== n) {
      throw new InputError(
        `Cannot compute forcing series: the error model has ${e.model.cells} cells for ${n} points`,
        { field: "errorModel", reason: "length_mismatch", value: e.model.cells },
      );
    }
    const d = differenceFromMeanVariance(e.model, inRef);
    refVar = d.meanVariance;
    for (let i = 0; i < n; i++) {
      sd[i] = Number.isFinite(tsi[i]) ? k * Math.sqrt(d.variance[i]) : NaN;
    }
  }
  return {
    referenceTsi: ref,
    referenceSd: Math.sqrt(refVar),
    referencePoints: count,
    value,
    sd,
  };
}

/**
 * Forcing members: each member of a TSI ensemble relative to its own reference mean,
 * ΔF_m(t) = (TSI_m(t) − T̄_ref,m)(1 − α)/4, so the reference's uncertainty and its covariance
 * with every point are carried member by member.
 *
 * @param time decimal years (n points)
 * @param members count × n values, member-major (NaN for missing)
 * @param count members
 * @param reference `{ start, end }`
 * @param albedo @default 0.29
 * @param options `shouldStop`, polled before every member
 * @returns count × n forcing values, member-major
 * @throws {InputError} (field `members`) when its length is not count × n; as
 *   {@link referencePoints} for the first member
 * @throws {StoppedError} when `shouldStop` answers true
 * @example
 * ```ts
 * import { forcingMembers } from "./radiative_forcing.ts";
 * import assert from "node:assert/strict";
 * const f = forcingMembers([2000.5, 2001.5], Float64Array.of(1361, 1362, 1360, 1360.5), 2,
 *   { start: 2000, end: 2001 });
 * assert.ok(Math.abs(f[1] - 0.1775) < 1e-12 && Math.abs(f[3] - 0.5 * 0.1775) < 1e-12);
 * ```
 */
export function forcingMembers(
  time: ArrayLike<number>,
  members: Float64Array,
  count: number,
  reference: { start: number; end: number },
  albedo = PLANETARY_ALBEDO,
  options: StopOptions = {},
): Float64Array {
  const n = time.length;
  if (members.length !== count * n) {
    throw new InputError(
      `Cannot compute forcing members: ${members.length} values are not ${count} members of ${n}`,
      { field: "members", reason: "length_mismatch", value: members.length },
    );
  }
  const k = radiativeForcing(1, albedo);
  const out = new Float64Array(count * n);
  for (let m = 0; m < count; m++) {
    throwIfStopped(options, "compute forcing members");
    const x = members.subarray(m * n, (m + 1) * n);
    const inRef = referencePoints(time, x, reference);
    let sum = 0, c = 0;
    for (let i = 0; i < n; i++) if (inRef[i]) (sum += x[i]), c++;
    const ref = sum / c;
    for (let i = 0; i < n; i++) out[m * n + i] = Number.isFinite(x[i]) ? (x[i] - ref) * k : NaN;
  }
  return out;
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
