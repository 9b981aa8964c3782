/**
 * Sunspot darkening: the Photometric Sunspot Index (PSI) of Hudson, Silva, Woodard & Willson
 * (1982, Sol. Phys. 76, 211), in the form of Fröhlich, Pap & Hudson (1994, Sol. Phys. 152,
 * 111):
 *
 *   PSI = Σᵢ Cᵢ · Aᵢ · μᵢ(3μᵢ + 2)/2,   ΔS_spots = −S_Q · PSI
 *
 * with Aᵢ the true (foreshortening-corrected) area of group i as a fraction of the visible
 * hemisphere (MSH × 1e-6), μᵢ = cos θᵢ, Cᵢ the bolometric contrast. The factor μ(3μ + 2)/2 is
 * the foreshortening 2μ times Eddington limb darkening (2 + 3μ)/5 over its disc mean 0.8; its
 * mean over μ uniform in [0, 1] is exactly 1 (the disc-average factor).
 *
 * @module
 */
import { InputError } from "../errors.ts";

/** Bolometric contrast model. */
export type ContrastModel =
  | { kind: "constant"; value?: number }
  | { kind: "area_dependent" };

/** The constant contrast of Hudson et al. (1982): 0.32. */
export const HUDSON_CONTRAST = 0.32;

/**
 * The position factor μ(3μ + 2)/2 of the PSI (foreshortening × limb darkening / 0.8).
 *
 * @param mu μ = cos θ in [0, 1]
 * @returns the factor: 2.5 at disc centre, 0.875 at μ = 0.5, 0 at the limb
 * @throws {InputError} when μ is not in [0, 1]
 * @example
 * ```ts
 * import { psiPositionFactor } from "./photometric_sunspot_index.ts";
 * import assert from "node:assert/strict";
 * assert.equal(psiPositionFactor(1), 2.5);
 * assert.equal(psiPositionFactor(0.5), 0.875);
 * ```
 */
export function psiPositionFactor(mu: number): number {
  if (!(mu >= 0 && mu <= 1)) {
    throw new InputError(
      `Cannot compute PSI position factor: mu must be in [0, 1], current value is ${mu}`,
      { field: "mu", reason: "out_of_range", value: mu },
    );
  }
  return (mu * (3 * mu + 2)) / 2;
}

/**
 * Bolometric sunspot contrast C: constant (0.32, Hudson et al. 1982) or area-dependent
 * C = 0.2231 + 0.0244·log10(A[MSH]) (Brandt, Stix & Weinhardt 1994, Sol. Phys. 152, 119).
 *
 * @param areaMsh true group area in millionths of the hemisphere (> 0 for area_dependent)
 * @param model contrast model @default { kind: "constant", value: 0.32 }
 * @returns the contrast (dimensionless)
 * @throws {InputError} for a non-positive area with the area-dependent model, or a constant
 *   outside (0, 1]
 * @example
 * ```ts
 * import { sunspotContrast } from "./photometric_sunspot_index.ts";
 * import assert from "node:assert/strict";
 * assert.ok(Math.abs(sunspotContrast(1000, { kind: "area_dependent" }) - 0.2963) < 1e-12);
 * assert.equal(sunspotContrast(1000), 0.32);
 * ```
 */
export function sunspotContrast(
  areaMsh: number,
  model: ContrastModel = { kind: "constant", value: HUDSON_CONTRAST },
): number {
  if (model.kind === "constant") {
    const c = model.value ?? HUDSON_CONTRAST;
    if (!(c > 0 && c <= 1)) {
      throw new InputError(`Cannot compute contrast: constant must be in (0, 1], got ${c}`, {
        field: "contrast",
        reason: "out_of_range",
        value: c,
      });
    }
    return c;
  }
  if (!(areaMsh > 0) || !Number.isFinite(areaMsh)) {
    throw new InputError(
      `Cannot compute area-dependent contrast: area must be positive MSH, current value is ${areaMsh}`,
      { field: "areaMsh", reason: "out_of_range", value: areaMsh },
    );
  }
  return 0.2231 + 0.0244 * Math.log10(areaMsh);
}

/**
 * Convert a projected area (millionths of the disc) at μ to true area (millionths of the
 * hemisphere): A_true = A_proj / (2μ) (the hemisphere has twice the disc's area and a patch
 * at μ appears shrunk by μ).
 *
 * @param projectedMsd projected area, millionths of the disc, ≥ 0
 * @param mu μ in (0, 1]
 * @returns true area in MSH
 * @throws {InputError} for negative area or μ outside (0, 1]
 * @example
 * ```ts
 * import { trueAreaFromProjected } from "./photometric_sunspot_index.ts";
 * import assert from "node:assert/strict";
 * assert.equal(trueAreaFromProjected(1000, 0.5), 1000);
 * assert.equal(trueAreaFromProjected(1000, 1), 500);
 * ```
 */
export function trueAreaFromProjected(projectedMsd: number, mu: number): number {
  if (!(projectedMsd >= 0) || !Number.isFinite(projectedMsd)) {
    throw new InputError(`Cannot convert projected area: must be ≥ 0, got ${projectedMsd}`, {
      field: "projectedMsd",
      reason: "out_of_range",
      value: projectedMsd,
    });
  }
  if (!(mu > 0 && mu <= 1)) {
    throw new InputError(`Cannot convert projected area: mu must be in (0, 1], got ${mu}`, {
      field: "mu",
      reason: "out_of_range",
      value: mu,
    });
  }
  return projectedMsd / (2 * mu);
}

/**
 * PSI of one sunspot group: C · A · μ(3μ + 2)/2, A = area × 1e-6.
 *
 * @param areaMsh true area, MSH, ≥ 0 (0 gives 0)
 * @param mu μ = cos θ in [0, 1]
 * @param contrast contrast model @default constant 0.32
 * @returns the group's PSI (fraction of the quiet-Sun irradiance)
 * @throws {InputError} as {@link psiPositionFactor} and {@link sunspotContrast}
 * @example
 * ```ts
 * import { groupPsi } from "./photometric_sunspot_index.ts";
 * import assert from "node:assert/strict";
 * // Hudson et al. 1982 form, worked by hand: 1000 MSH at θ = 30°, C = 0.32 → 6.3713e-4
 * assert.ok(Math.abs(groupPsi(1000, Math.cos(Math.PI / 6)) - 6.3713e-4) < 5e-8);
 * ```
 */
export function groupPsi(areaMsh: number, mu: number, contrast?: ContrastModel): number {
  if (!(areaMsh >= 0) || !Number.isFinite(areaMsh)) {
    throw new InputError(`Cannot compute PSI: area must be ≥ 0 MSH, current value is ${areaMsh}`, {
      field: "areaMsh",
      reason: "out_of_range",
      value: areaMsh,
    });
  }
  if (areaMsh === 0) return 0;
  return sunspotContrast(areaMsh, contrast) * areaMsh * 1e-6 * psiPositionFactor(mu);
}

/**
 * PSI when only the total (true) spot area of a day is known: the position factor is replaced
 * by its disc average, exactly 1, so PSI = C · A (area-dependent contrast uses the total area,
 * an approximation since contrast depends on single groups).
 *
 * @param areaMsh total true area, MSH, ≥ 0
 * @param contrast contrast model @default constant 0.32
 * @returns PSI
 * @throws {InputError} for negative or non-finite area
 * @example
 * ```ts
 * import { psiFromTotalArea } from "./photometric_sunspot_index.ts";
 * import assert from "node:assert/strict";
 * assert.ok(Math.abs(psiFromTotalArea(1000) - 3.2e-4) < 1e-15);
 * ```
 */
export function psiFromTotalArea(areaMsh: number, contrast?: ContrastModel): number {
  if (!(areaMsh >= 0) || !Number.isFinite(areaMsh)) {
    throw new InputError(`Cannot compute PSI: area must be ≥ 0 MSH, current value is ${areaMsh}`, {
      field: "areaMsh",
      reason: "out_of_range",
      value: areaMsh,
    });
  }
  if (areaMsh === 0) return 0;
  return sunspotContrast(areaMsh, contrast) * areaMsh * 1e-6;
}

/** Per-day PSI sums (result of {@link dailyPsi}). */
export interface DailyPsi {
  /** Day numbers since 1970-01-01 (sorted) of the days that had at least one record. */
  days: Int32Array;
  psi: Float64Array;
  /** Number of group records per day. */
  groups: Int32Array;
}

/**
 * Sum group PSI per day: PSI_day = Σ over the day's groups of C·A·μ(3μ + 2)/2. Days appear
 * only when they have a record; a record with area 0 marks an observed spotless day.
 *
 * @param day day number of each record (days since 1970-01-01)
 * @param areaMsh true area of each record, MSH
 * @param mu μ of each record (ignored when `discAverage` is true)
 * @param options contrast model and `discAverage` (use the factor 1 instead of μ)
 * @returns {@link DailyPsi}
 * @throws {InputError} when lengths differ or a record is invalid: `field` is `day`, `areaMsh`,
 *   `mu` or `contrast`, `index` the record
 * @example
 * ```ts
 * import { dailyPsi } from "./photometric_sunspot_index.ts";
 * import assert from "node:assert/strict";
 * const d = dailyPsi([5, 5, 6], [1000, 1000, 0], [1, 1, 1]);
 * assert.deepEqual([...d.days], [5, 6]);
 * assert.ok(Math.abs(d.psi[0] - 1.6e-3) < 1e-15);
 * assert.equal(d.psi[1], 0);
 * ```
 */
export function dailyPsi(
  day: ArrayLike<number>,
  areaMsh: ArrayLike<number>,
  mu: ArrayLike<number> | null,
  options: { contrast?: ContrastModel; discAverage?: boolean } = {},
): DailyPsi {
  const n = day.length;
  if (areaMsh.length !== n || (mu && mu.length !== n)) {
    throw new InputError("Cannot compute daily PSI: day, area and mu differ in length", {
      field: areaMsh.length !== n ? "areaMsh" : "mu",
      reason: "length_mismatch",
    });
  }
  if (!options.discAverage && !mu) {
    throw new InputError("Cannot compute daily PSI: mu is needed unless discAverage is set", {
      field: "mu",
      reason: "invalid",
    });
  }
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => day[a] - day[b]);
  const days: number[] = [], psi: number[] = [], groups: number[] = [];
  for (const i of order) {
    if (!Number.isInteger(day[i])) {
      throw new InputError(`Cannot compute daily PSI: day at record ${i} is ${day[i]}`, {
        field: "day",
        reason: "invalid",
        index: i,
        value: day[i],
      });
    }
    let v: number;
    try {
      v = options.discAverage
        ? psiFromTotalArea(areaMsh[i], options.contrast)
        : groupPsi(areaMsh[i], mu![i], options.contrast);
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      // the record's field (areaMsh, mu or contrast) and index
      throw new InputError(`Cannot compute daily PSI: record ${i}: ${e.message}`, {
        field: e.field,
        reason: e.reason,
        index: i,
        value: e.value,
      });
    }
    if (days.length > 0 && days[days.length - 1] === day[i]) {
      psi[psi.length - 1] += v;
      groups[groups.length - 1]++;
    } else {
      days.push(day[i]);
      psi.push(v);
      groups.push(1);
    }
  }
  return {
    days: Int32Array.from(days),
    psi: Float64Array.from(psi),
    groups: Int32Array.from(groups),
  };
}

/**
 * Sunspot darkening in W m-2: ΔS = −S_Q · PSI.
 *
 * @param psi Photometric Sunspot Index (fraction), ≥ 0
 * @param quietSun quiet-Sun TSI S_Q, W m-2 @default 1360.8 (Kopp & Lean 2011)
 * @returns ΔS in W m-2 (≤ 0)
 * @example
 * ```ts
 * import { sunspotDarkening } from "./photometric_sunspot_index.ts";
 * import assert from "node:assert/strict";
 * assert.ok(Math.abs(sunspotDarkening(8e-4) + 1.08864) < 1e-12);
 * ```
 */
export function sunspotDarkening(psi: number, quietSun = 1360.8): number {
  return -quietSun * psi;
}
