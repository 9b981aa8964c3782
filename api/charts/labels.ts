/**
 * Readable axis labels: quantity names in words and UDUNITS strings with superscript
 * exponents ("W m-2" → "W m⁻²"), so a chart reads like a figure in a paper.
 *
 * @module
 */

const QUANTITY_LABELS: Record<string, string> = {
  sunspot_number: "Sunspot number",
  sunspot_group_number: "Sunspot group number",
  sunspot_area: "Sunspot area",
  facular_index: "Facular index",
  radio_flux: "Radio flux",
  tsi: "Total solar irradiance",
  spectral_irradiance: "Spectral solar irradiance",
  band_irradiance: "Band solar irradiance",
  temperature: "Temperature",
  temperature_anomaly: "Temperature anomaly",
  enso_index: "ENSO index",
  aerosol_optical_depth: "Aerosol optical depth",
  radiative_forcing: "Radiative forcing",
  other: "Value",
};

/** The quantity in words ("tsi" → "Total solar irradiance"); unknown names are de-snaked. */
export function quantityLabel(quantity: string | undefined | null): string {
  if (!quantity) return "Value";
  const known = QUANTITY_LABELS[quantity];
  if (known) return known;
  const s = quantity.replace(/_/g, " ").trim();
  return s ? s[0].toUpperCase() + s.slice(1) : "Value";
}

const SUPERSCRIPT: Record<string, string> = {
  "-": "⁻",
  "0": "⁰",
  "1": "¹",
  "2": "²",
  "3": "³",
  "4": "⁴",
  "5": "⁵",
  "6": "⁶",
  "7": "⁷",
  "8": "⁸",
  "9": "⁹",
};

/**
 * A UDUNITS unit string for display: exponents become superscripts, "1" (dimensionless)
 * becomes "" and "1e-6" (of the hemisphere, for spot areas) "millionths of hemisphere".
 *
 * @example
 * ```ts
 * import { unitsLabel } from "./labels.ts";
 * import assert from "node:assert/strict";
 * assert.equal(unitsLabel("W m-2"), "W m⁻²");
 * assert.equal(unitsLabel("1e-22 W m-2 Hz-1"), "10⁻²² W m⁻² Hz⁻¹");
 * assert.equal(unitsLabel("1"), "");
 * ```
 */
export function unitsLabel(units: string | undefined | null, quantity?: string): string {
  const u = (units ?? "").trim();
  if (u === "" || u === "1") return "";
  if (u === "1e-6" && quantity === "sunspot_area") return "millionths of hemisphere";
  return u.split(/\s+/).map((tok) => {
    const sci = /^1e(-?\d+)$/.exec(tok);
    if (sci) return "10" + [...sci[1]].map((c) => SUPERSCRIPT[c]).join("");
    const m = /^([A-Za-z°%µ]+)\^?(-?\d+)$/.exec(tok);
    if (m) return m[1] + [...m[2]].map((c) => SUPERSCRIPT[c]).join("");
    return tok;
  }).join(" ");
}

/** "Total solar irradiance (W m⁻²)", or the name alone for dimensionless quantities. */
export function axisLabel(name: string, units?: string | null, quantity?: string): string {
  const u = unitsLabel(units, quantity);
  return u ? `${name} (${u})` : name;
}
