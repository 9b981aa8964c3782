/**
 * Conversion between version 1 and version 2 of the international sunspot number, by time.
 *
 * @module
 */

/** Versions of the international sunspot number: "1" (to mid-2015) and "2" (from 1 July 2015). */
export type SunspotNumberVersion = "1" | "2";

/** One stretch of time over which version 2 is a constant multiple of version 1. */
export interface SunspotVersionSegment {
  /** Start, decimal year (inclusive); -Infinity for the beginning of the record. */
  start: number;
  /** End, decimal year (exclusive); Infinity for the end of the record. */
  end: number;
  /** V2 / V1 over the segment. */
  v2PerV1: number;
  /** What the segment's factor corrects, with its source and how sure it is. */
  basis: string;
}

/**
 * V2/V1 by time, from the corrections that made version 2 (Clette et al. 2014, Space Sci.
 * Rev. 186, 35; Clette & Lefèvre 2016, Sol. Phys. 291, 2629; the papers are confirmed, the
 * factors and dates below are from memory and checked in the tests against R's version 1
 * `sunspot.month` and the published version 2 cycle extrema):
 * - the whole series: the 0.6 Zürich scale factor is dropped (V2 = V1 / 0.6);
 * - 1947 onwards: the inflation by spot weighting introduced in 1947 ("Waldmeier jump",
 *   about 18 %; factor 1.177) is removed: V2 = V1 / (0.6 × 1.177);
 * - 1849–1867: Wolf's early counts are raised by 14 %: V2 = 1.14 × V1 / 0.6. The end of this
 *   stretch is not known here from the paper: the published extrema place it between
 *   1867-09 and 1870-02, and 1868.0 is used.
 *
 * Checked against R's version 1 monthly series: the published version 2 maxima of cycles 1–21
 * and minima of cycles 1–18 are reproduced to 0.3 % and 0.1; the minima of cycles 19–21 come
 * out 3–6 % low (after 1947 one factor fits the high values, not the low ones).
 *
 * From 1981 version 2 also corrects a drift of the pilot station (Clette et al. 2016, Sol.
 * Phys. 291, 2733, from memory) that these constant factors leave out: see
 * {@link SUNSPOT_DRIFT_CORRECTED_FROM}.
 */
export const SUNSPOT_V2_PER_V1: readonly SunspotVersionSegment[] = [
  {
    start: -Infinity,
    end: 1849,
    v2PerV1: 1 / 0.6,
    basis: "0.6 Zürich scale factor removed (Clette & Lefèvre 2016)",
  },
  {
    start: 1849,
    end: 1868,
    v2PerV1: 1.14 / 0.6,
    basis: "0.6 factor removed and Wolf's early counts raised by 14 % (Clette & Lefèvre 2016; " +
      "factor from memory, end year 1868 derived from the published cycle extrema)",
  },
  {
    start: 1868,
    end: 1947,
    v2PerV1: 1 / 0.6,
    basis: "0.6 Zürich scale factor removed (Clette & Lefèvre 2016)",
  },
  {
    start: 1947,
    end: Infinity,
    v2PerV1: 1 / (0.6 * 1.177),
    basis: "0.6 factor and the 1947 spot-weighting inflation (factor 1.177, about 18 %) " +
      "removed (Clette et al. 2014; Clette & Lefèvre 2016; factor from memory)",
  },
];

/**
 * Decimal year from which version 2 also corrects a drift of its pilot station (Clette et al.
 * 2016, Sol. Phys. 291, 2733; from memory) that {@link SUNSPOT_V2_PER_V1} omits: converted
 * values after it can differ from version 2 by several percent (+5 % at the maximum of
 * cycle 22, −10 % at that of cycle 23: derived in the tests from R's version 1 series and the
 * published version 2 maxima).
 */
export const SUNSPOT_DRIFT_CORRECTED_FROM = 1981;

/**
 * Decimal years where V2/V1 changes (the segment boundaries of {@link SUNSPOT_V2_PER_V1}).
 * A constant factor applied across one of them leaves a step in the converted series.
 */
export const SUNSPOT_VERSION_BREAKS: readonly number[] = SUNSPOT_V2_PER_V1.slice(1).map((s) =>
  s.start
);

/**
 * The factor that takes a sunspot number at time t from one version to the other.
 *
 * Method: the piecewise-constant V2/V1 ratio of {@link SUNSPOT_V2_PER_V1} (Clette et al. 2014;
 * Clette & Lefèvre 2016). Dimensionless.
 *
 * @param t decimal year (finite)
 * @param from version of the values
 * @param to version wanted
 * @returns the multiplier (1 when from = to)
 * @throws {RangeError} for a non-finite t or an unknown version
 * @example
 * ```ts
 * import { sunspotVersionFactor } from "./sunspot_number_versions.ts";
 * import assert from "node:assert/strict";
 * // cycle 16 maximum, 1928-04: 78.1 in version 1, 130.2 in version 2 (Clette & Lefèvre 2016)
 * assert.equal(Math.round(78.1 * sunspotVersionFactor(1928.3, "1", "2") * 10) / 10, 130.2);
 * assert.ok(Math.abs(sunspotVersionFactor(1958.2, "1", "2") - 1 / (0.6 * 1.177)) < 1e-12);
 * assert.equal(sunspotVersionFactor(1958.2, "2", "2"), 1);
 * ```
 */
export function sunspotVersionFactor(
  t: number,
  from: SunspotNumberVersion,
  to: SunspotNumberVersion,
): number {
  checkVersion(from, "from");
  checkVersion(to, "to");
  if (!Number.isFinite(t)) {
    throw new RangeError(`Cannot convert sunspot-number versions: time must be finite, got ${t}`);
  }
  if (from === to) return 1;
  const seg = SUNSPOT_V2_PER_V1.find((s) => t >= s.start && t < s.end)!;
  return from === "1" ? seg.v2PerV1 : 1 / seg.v2PerV1;
}

/**
 * Convert a sunspot-number series between versions, time by time ({@link sunspotVersionFactor}).
 * NaN values stay NaN.
 *
 * @param time decimal years, finite
 * @param value sunspot numbers in version `from`
 * @param from version of the values
 * @param to version wanted
 * @returns the values in version `to`
 * @throws {RangeError} when lengths differ, a time is not finite or a version is unknown
 * @example
 * ```ts
 * import { convertSunspotNumberVersion } from "./sunspot_number_versions.ts";
 * import assert from "node:assert/strict";
 * const v2 = convertSunspotNumberVersion([1937.3, 1958.2], [119.2, 201.3], "1", "2");
 * // published version 2 maxima of cycles 17 and 19: 198.6 and 285.0
 * assert.ok(Math.abs(v2[0] - 198.6) < 0.2 && Math.abs(v2[1] - 285.0) < 0.2);
 * ```
 */
export function convertSunspotNumberVersion(
  time: ArrayLike<number>,
  value: ArrayLike<number>,
  from: SunspotNumberVersion,
  to: SunspotNumberVersion,
): Float64Array {
  if (time.length !== value.length) {
    throw new RangeError(
      `Cannot convert sunspot-number versions: time has ${time.length} entries, value ${value.length}`,
    );
  }
  const out = new Float64Array(value.length);
  for (let i = 0; i < value.length; i++) {
    out[i] = value[i] * sunspotVersionFactor(time[i], from, to);
  }
  return out;
}

/**
 * The version breaks ({@link SUNSPOT_VERSION_BREAKS}) that fall inside a time span: where a
 * constant conversion factor leaves a step, since V2/V1 changes there.
 *
 * @param start first time, decimal year
 * @param end last time, decimal year
 * @returns the breaks t with start < t <= end, in increasing order
 * @example
 * ```ts
 * import { versionBreaksWithin } from "./sunspot_number_versions.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(versionBreaksWithin(1900, 2000), [1947]);
 * assert.deepEqual(versionBreaksWithin(1950, 2000), []);
 * ```
 */
export function versionBreaksWithin(start: number, end: number): number[] {
  return SUNSPOT_VERSION_BREAKS.filter((b) => b > start && b <= end);
}

function checkVersion(v: string, name: string): void {
  if (v !== "1" && v !== "2") {
    throw new RangeError(
      `Cannot convert sunspot-number versions: ${name} must be "1" or "2", current value is ${
        JSON.stringify(v)
      }`,
    );
  }
}
