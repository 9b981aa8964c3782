/**
 * Wavelength bands of a spectral irradiance record: their checks, the spectral coverage they
 * give, and the weights that integrate band values over a wavelength range.
 *
 * A band [λ₁, λ₂) in nm carries either the band-mean spectral irradiance in W m-2 nm-1
 * ("per_nm", the CF quantity `solar_irradiance_per_unit_wavelength`) or the irradiance
 * integrated over the band in W m-2 ("per_band"). The irradiance over a range is the sum over
 * bands of value × (overlap in nm) for per-nm values, or value × (overlap ÷ width) for
 * per-band values: within a band the spectrum is taken as flat, the usual assumption when
 * re-binning band-integrated data (common practice). Nothing is added for parts of a range
 * that no band covers: those are reported as missing, never invented.
 *
 * @module
 */
import { InputError } from "../errors.ts";

/** A wavelength band, nm, lower bound included and upper excluded. */
export interface WavelengthBand {
  lower: number;
  upper: number;
}

/** How a band's value relates to irradiance: per nm of the band, or integrated over it. */
export type BandValueKind = "per_nm" | "per_band";

/**
 * Check a list of bands: finite, 0 < lower < upper, sorted by lower bound and not
 * overlapping (a band may start where the previous one ends).
 *
 * @param bands the bands, nm
 * @throws {InputError} field `lower` or `upper` with the band's index: reason `not_finite`,
 *   `out_of_range` (lower ≤ 0, or upper ≤ lower), `not_increasing` (lower below the previous
 *   band's) or `overlap` (lower below the previous band's upper; `value` is that upper)
 * @example
 * ```ts
 * import { checkWavelengthBands } from "./wavelength_bands.ts";
 * import assert from "node:assert/strict";
 * checkWavelengthBands([{ lower: 200, upper: 210 }, { lower: 210, upper: 220 }]);
 * assert.throws(
 *   () => checkWavelengthBands([{ lower: 200, upper: 215 }, { lower: 210, upper: 220 }]),
 *   { field: "lower", index: 1, reason: "overlap" },
 * );
 * ```
 */
export function checkWavelengthBands(bands: readonly WavelengthBand[]): void {
  const fn = "Cannot use the wavelength bands";
  bands.forEach((b, i) => {
    for (const f of ["lower", "upper"] as const) {
      if (!Number.isFinite(b[f])) {
        throw new InputError(`${fn}: band ${i} has ${f} = ${b[f]}`, {
          field: f,
          reason: "not_finite",
          index: i,
          value: b[f],
        });
      }
    }
    if (!(b.lower > 0)) {
      throw new InputError(`${fn}: band ${i} starts at ${b.lower} nm; wavelengths are > 0`, {
        field: "lower",
        reason: "out_of_range",
        index: i,
        value: b.lower,
      });
    }
    if (!(b.upper > b.lower)) {
      throw new InputError(
        `${fn}: band ${i} ends at ${b.upper} nm, not after its start ${b.lower} nm`,
        { field: "upper", reason: "out_of_range", index: i, value: b.upper },
      );
    }
    if (i === 0) return;
    const prev = bands[i - 1];
    if (b.lower < prev.lower) {
      throw new InputError(
        `${fn}: band ${i} starts at ${b.lower} nm, before band ${
          i - 1
        } (${prev.lower} nm); bands must be sorted by wavelength`,
        { field: "lower", reason: "not_increasing", index: i, value: b.lower },
      );
    }
    if (b.lower < prev.upper) {
      throw new InputError(
        `${fn}: band ${i} [${b.lower}, ${b.upper}) nm overlaps band ${
          i - 1
        } [${prev.lower}, ${prev.upper}) nm`,
        { field: "lower", reason: "overlap", index: i, value: prev.upper },
      );
    }
  });
}

/**
 * The factor that turns a band value into irradiance in W m-2: the band width in nm for
 * per-nm values, 1 for per-band values.
 *
 * @param band the band, nm
 * @param kind what the value is
 * @returns nm or 1
 * @example
 * ```ts
 * import { bandIrradianceFactor } from "./wavelength_bands.ts";
 * import assert from "node:assert/strict";
 * assert.equal(bandIrradianceFactor({ lower: 200, upper: 210 }, "per_nm"), 10);
 * assert.equal(bandIrradianceFactor({ lower: 200, upper: 210 }, "per_band"), 1);
 * ```
 */
export function bandIrradianceFactor(band: WavelengthBand, kind: BandValueKind): number {
  return kind === "per_nm" ? band.upper - band.lower : 1;
}

/** What a set of bands covers (result of {@link spectralCoverage}). */
export interface SpectralCoverage {
  /** Shortest and longest wavelength covered, nm. */
  lower: number;
  upper: number;
  /** The covered intervals (adjacent bands merged), nm. */
  intervals: [number, number][];
  /** Intervals between lower and upper that no band covers, nm. */
  gaps: [number, number][];
  /** Total covered width, nm. */
  width: number;
}

/**
 * The wavelengths a checked list of bands covers: contiguous bands merged into intervals,
 * the gaps between them, and the covered width.
 *
 * @param bands checked bands ({@link checkWavelengthBands}), at least one
 * @returns {@link SpectralCoverage}
 * @throws {InputError} (field `bands`, reason `empty`) for no band
 * @example
 * ```ts
 * import { spectralCoverage } from "./wavelength_bands.ts";
 * import assert from "node:assert/strict";
 * const c = spectralCoverage([{ lower: 200, upper: 210 }, { lower: 210, upper: 220 }, { lower: 300, upper: 400 }]);
 * assert.deepEqual(c.intervals, [[200, 220], [300, 400]]);
 * assert.deepEqual(c.gaps, [[220, 300]]);
 * assert.equal(c.width, 120);
 * ```
 */
export function spectralCoverage(bands: readonly WavelengthBand[]): SpectralCoverage {
  if (bands.length === 0) {
    throw new InputError("Cannot describe spectral coverage: no band", {
      field: "bands",
      reason: "empty",
    });
  }
  const intervals: [number, number][] = [];
  for (const b of bands) {
    const last = intervals[intervals.length - 1];
    if (last && b.lower <= last[1]) last[1] = Math.max(last[1], b.upper);
    else intervals.push([b.lower, b.upper]);
  }
  const gaps: [number, number][] = [];
  for (let i = 1; i < intervals.length; i++) gaps.push([intervals[i - 1][1], intervals[i][0]]);
  return {
    lower: intervals[0][0],
    upper: intervals[intervals.length - 1][1],
    intervals,
    gaps,
    width: intervals.reduce((s, [a, b]) => s + (b - a), 0),
  };
}

/** Weights that integrate band values over a range (result of {@link rangeWeights}). */
export interface RangeWeights {
  /** Per band: W m-2 per unit band value (0 for bands outside the range). */
  weights: Float64Array;
  /** Indices of the bands with a non-zero weight. */
  bands: number[];
  /** Covered width inside the range, nm, and the range's width. */
  coveredWidth: number;
  rangeWidth: number;
  /** Parts of the range that no band covers, nm (not included, not invented). */
  missing: [number, number][];
}

/**
 * Weights w_i with Σ w_i·v_i the irradiance (W m-2) of the bands over [lower, upper): the
 * overlap of band i with the range in nm for per-nm values, overlap ÷ band width for per-band
 * values (flat spectrum within a band). Parts of the range outside every band are listed as
 * missing and contribute nothing.
 *
 * @param bands checked bands ({@link checkWavelengthBands})
 * @param range the range, nm, lower < upper
 * @param kind what the band values are
 * @returns {@link RangeWeights}
 * @throws {InputError} field `range`: reason `out_of_range` when lower ≥ upper or not finite,
 *   `no_overlap` when no band overlaps the range
 * @example
 * ```ts
 * import { rangeWeights } from "./wavelength_bands.ts";
 * import assert from "node:assert/strict";
 * const bands = [{ lower: 200, upper: 250 }, { lower: 250, upper: 300 }, { lower: 300, upper: 350 }];
 * const w = rangeWeights(bands, { lower: 225, upper: 300 }, "per_nm");
 * assert.deepEqual([...w.weights], [25, 50, 0]); // nm of each band inside 225–300 nm
 * const m = rangeWeights(bands, { lower: 180, upper: 260 }, "per_band");
 * assert.deepEqual([...m.weights], [1, 0.2, 0]);
 * assert.deepEqual(m.missing, [[180, 200]]);
 * ```
 */
export function rangeWeights(
  bands: readonly WavelengthBand[],
  range: WavelengthBand,
  kind: BandValueKind,
): RangeWeights {
  if (
    !(Number.isFinite(range.lower) && Number.isFinite(range.upper) && range.upper > range.lower)
  ) {
    throw new InputError(
      `Cannot integrate over [${range.lower}, ${range.upper}) nm: the range must have lower < upper`,
      { field: "range", reason: "out_of_range", value: [range.lower, range.upper] },
    );
  }
  const weights = new Float64Array(bands.length);
  const used: number[] = [];
  let covered = 0;
  bands.forEach((b, i) => {
    const overlap = Math.min(b.upper, range.upper) - Math.max(b.lower, range.lower);
    if (!(overlap > 0)) return;
    weights[i] = kind === "per_nm" ? overlap : overlap / (b.upper - b.lower);
    covered += overlap;
    used.push(i);
  });
  if (used.length === 0) {
    throw new InputError(
      `Cannot integrate over [${range.lower}, ${range.upper}) nm: no band overlaps the range`,
      { field: "range", reason: "no_overlap", value: [range.lower, range.upper] },
    );
  }
  const missing: [number, number][] = [];
  let at = range.lower;
  for (const i of used) {
    const b = bands[i];
    if (b.lower > at) missing.push([at, b.lower]);
    at = Math.max(at, b.upper);
  }
  if (at < range.upper) missing.push([at, range.upper]);
  return {
    weights,
    bands: used,
    coveredWidth: covered,
    rangeWidth: range.upper - range.lower,
    missing,
  };
}
