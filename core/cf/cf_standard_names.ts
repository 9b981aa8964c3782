/**
 * CF standard names for sunlag's quantities, where the CF standard-name table has one that fits
 * the quantity exactly (CF Standard Name Table; names and canonical units from memory: no
 * package on the npm registry or in Debian 12 ships the table, so it could not be checked
 * against a copy here). A quantity without an exact match gets none: a standard name is a
 * claim about what was measured, and a wrong one misleads more than a missing one.
 *
 * - `tsi` → `solar_irradiance` (canonical units W m-2): the total irradiance from the Sun at
 *   1 AU, integrated over wavelength.
 * - the uncertainty of a variable is its standard name with the `standard_error` modifier
 *   (CF conventions 1.10, Appendix C "Standard Name Modifiers").
 *
 * Sunspot numbers, areas and facular indices, radio flux indices, ENSO indices and the solar
 * forcing (a change of effective radiative forcing, not a flux) have no entry, so they are
 * written with `long_name` only. Temperatures are left without one too: "temperature" may be
 * of the air, the sea surface or the ground, which only the user knows.
 *
 * @module
 */

/** Standard name and its canonical units for each quantity that has one. */
export const CF_STANDARD_NAMES: Readonly<Record<string, { name: string; units: string }>> = {
  tsi: { name: "solar_irradiance", units: "W m-2" },
};

/**
 * The CF standard name of a sunlag quantity, if the table has one that fits.
 *
 * @param quantity a quantity of sunlag's vocabulary (see `QUANTITIES`)
 * @returns the standard name, or undefined
 * @example
 * ```ts
 * import { cfStandardName } from "./cf_standard_names.ts";
 * import assert from "node:assert/strict";
 * assert.equal(cfStandardName("tsi"), "solar_irradiance");
 * assert.equal(cfStandardName("sunspot_number"), undefined);
 * ```
 */
export function cfStandardName(quantity: string): string | undefined {
  return Object.hasOwn(CF_STANDARD_NAMES, quantity) ? CF_STANDARD_NAMES[quantity].name : undefined;
}

/**
 * The quantity a CF standard name stands for, when it is one of the names above (for reading
 * files back).
 *
 * @param standardName a `standard_name` attribute
 * @returns the quantity, or undefined
 * @example
 * ```ts
 * import { quantityOfStandardName } from "./cf_standard_names.ts";
 * import assert from "node:assert/strict";
 * assert.equal(quantityOfStandardName("solar_irradiance"), "tsi");
 * assert.equal(quantityOfStandardName("air_temperature"), undefined);
 * ```
 */
export function quantityOfStandardName(standardName: string): string | undefined {
  const s = standardName.trim();
  for (const [q, v] of Object.entries(CF_STANDARD_NAMES)) if (v.name === s) return q;
  return undefined;
}
