/**
 * The fixed vocabulary of quantities a series may carry, with the UDUNITS unit strings each
 * accepts (CF conventions, shared/SCIENCE.md §11). The first unit listed is the canonical one;
 * aliases are rewritten to it on upload.
 *
 * @module
 */

/** Names of the quantities sunlag knows. */
export const QUANTITIES = [
  "sunspot_number",
  "sunspot_group_number",
  "sunspot_area",
  "facular_index",
  "radio_flux",
  "tsi",
  "temperature",
  "temperature_anomaly",
  "enso_index",
  "aerosol_optical_depth",
  "radiative_forcing",
  "other",
] as const;

export type Quantity = typeof QUANTITIES[number];

/** Accepted units per quantity: canonical first, then aliases mapped to it. `null` = any unit. */
export const QUANTITY_UNITS: Record<Quantity, { canonical: string; aliases: string[] } | null> = {
  sunspot_number: { canonical: "1", aliases: [""] },
  sunspot_group_number: { canonical: "1", aliases: [""] },
  // millionths of the solar hemisphere (MSH)
  sunspot_area: { canonical: "1e-6", aliases: ["MSH", "msh", "ppm"] },
  facular_index: { canonical: "1", aliases: [""] },
  // solar flux units: 1 sfu = 1e-22 W m-2 Hz-1
  radio_flux: { canonical: "1e-22 W m-2 Hz-1", aliases: ["sfu", "SFU", "10-22 W m-2 Hz-1"] },
  tsi: { canonical: "W m-2", aliases: ["W/m2", "W m^-2", "W/m^2"] },
  temperature: { canonical: "K", aliases: [] },
  temperature_anomaly: { canonical: "K", aliases: [] },
  enso_index: { canonical: "1", aliases: ["", "K"] },
  aerosol_optical_depth: { canonical: "1", aliases: [""] },
  radiative_forcing: { canonical: "W m-2", aliases: ["W/m2", "W m^-2", "W/m^2"] },
  other: null,
};

/** Quantities that count as sunspot activity for analyses that need one. */
export const SUNSPOT_QUANTITIES: readonly Quantity[] = [
  "sunspot_number",
  "sunspot_group_number",
  "sunspot_area",
];

/**
 * Check a unit string against a quantity and return the canonical unit.
 *
 * Temperatures in degrees Celsius are accepted for `temperature_anomaly` (a difference, so
 * 1 degC = 1 K) and rejected for `temperature` (an offset would be needed).
 *
 * @param quantity one of {@link QUANTITIES}
 * @param units a UDUNITS string
 * @returns `{ ok: true, units }` with the canonical unit, or `{ ok: false, reason }`
 * @example
 * ```ts
 * import { canonicalUnits } from "./quantities.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(canonicalUnits("tsi", "W/m2"), { ok: true, units: "W m-2" });
 * assert.equal(canonicalUnits("tsi", "K").ok, false);
 * ```
 */
export function canonicalUnits(
  quantity: Quantity,
  units: string,
): { ok: true; units: string } | { ok: false; reason: string } {
  const spec = QUANTITY_UNITS[quantity];
  const u = units.trim();
  if (spec === null) return { ok: true, units: u };
  if (u === spec.canonical || spec.aliases.includes(u)) return { ok: true, units: spec.canonical };
  if (quantity === "temperature_anomaly" && (u === "degC" || u === "°C" || u === "C")) {
    return { ok: true, units: "K" };
  }
  const accepted = [spec.canonical, ...spec.aliases.filter((a) => a !== "")].map((a) => `"${a}"`)
    .join(", ");
  return {
    ok: false,
    reason: `units "${units}" contradict quantity ${quantity}; expected ${accepted}` +
      (quantity === "temperature" && /deg|°|C$/.test(u)
        ? " (absolute temperatures must be in K; use temperature_anomaly for differences in degC)"
        : ""),
  };
}
