/**
 * The factor that puts a sunspot series on the version 1 scale of the sunspot number, the
 * scale on which the amplitude-dependent cycle relations were calibrated.
 *
 * @module
 */

/** What {@link versionOneScale} gives. */
export interface VersionOneScale {
  /** Multiply the series' values by this to reach the version 1 scale. */
  scale: number;
  /** False when the series is a sunspot number that does not declare version 1 or 2. */
  known: boolean;
}

/**
 * Scale of a series to the version 1 sunspot number. Version 2 of the sunspot number (Clette et
 * al. 2014, Space Sci. Rev. 186, 35) dropped the 0.6 factor of version 1, so V1 ≈ 0.6 × V2
 * (exactly so before 1947); the width b(a) of the Hathaway, Wilson & Reichmann (1994) shape and
 * the Waldmeier relation of Hathaway 2010 (Living Rev. Sol. Phys. 7, 1, eq. 7) are stated on
 * the version 1 scale. Other quantities (group number, area) and an undeclared version keep
 * scale 1; the latter is flagged as unknown so the caller can warn.
 *
 * @param quantity the series' quantity, e.g. "sunspot_number"
 * @param version the declared version ("1", "2"), or null
 * @returns the scale and whether it is known
 * @example
 * ```ts
 * import { versionOneScale } from "./version_one_scale.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(versionOneScale("sunspot_number", "2"), { scale: 0.6, known: true });
 * assert.deepEqual(versionOneScale("sunspot_number", null), { scale: 1, known: false });
 * assert.deepEqual(versionOneScale("sunspot_area", null), { scale: 1, known: true });
 * ```
 */
export function versionOneScale(quantity: string, version: string | null): VersionOneScale {
  if (quantity !== "sunspot_number") return { scale: 1, known: true };
  if (version === "2") return { scale: 0.6, known: true };
  return { scale: 1, known: version === "1" };
}
