/**
 * The fixed vocabulary of quantities a series may carry, with the UDUNITS unit strings each
 * accepts (UDUNITS strings as the CF conventions use them). The first unit listed is the canonical one;
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
  "spectral_irradiance",
  "band_irradiance",
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
  // solar irradiance per unit wavelength in a band (band mean), W m-2 nm-1; other scales of the
  // same dimension are converted (SPECTRAL_IRRADIANCE_SCALES)
  spectral_irradiance: {
    canonical: "W m-2 nm-1",
    aliases: ["W/m2/nm", "W m^-2 nm^-1", "W/(m2 nm)", "W/m^2/nm", "W m-2 nm^-1"],
  },
  // solar irradiance integrated over a wavelength band, W m-2 (the band's share of TSI)
  band_irradiance: { canonical: "W m-2", aliases: ["W/m2", "W m^-2", "W/m^2"] },
  temperature: { canonical: "K", aliases: [] },
  temperature_anomaly: { canonical: "K", aliases: [] },
  // sea-surface temperature anomaly indices are often given in K or degC (a difference)
  enso_index: { canonical: "1", aliases: ["", "K", "degC", "°C"] },
  aerosol_optical_depth: { canonical: "1", aliases: [""] },
  radiative_forcing: { canonical: "W m-2", aliases: ["W/m2", "W m^-2", "W/m^2"] },
  other: null,
};

/**
 * Units of spectral irradiance other than W m-2 nm-1, with the factor that converts a value in
 * them to W m-2 nm-1 (exact SI prefixes: 1 m = 1e9 nm, 1 µm = 1e3 nm, 1 mW = 1e-3 W). The CF
 * canonical unit of `solar_irradiance_per_unit_wavelength` is W m-2 m-1 (= W m-3).
 */
export const SPECTRAL_IRRADIANCE_SCALES: Readonly<Record<string, number>> = {
  "mW m-2 nm-1": 1e-3,
  "mW/m2/nm": 1e-3,
  "W m-2 um-1": 1e-3,
  "W m-2 µm-1": 1e-3,
  "W/m2/um": 1e-3,
  "W m-2 m-1": 1e-9,
  "W m-3": 1e-9,
};

/** Quantities that count as sunspot activity for analyses that need one. */
export const SUNSPOT_QUANTITIES: readonly Quantity[] = [
  "sunspot_number",
  "sunspot_group_number",
  "sunspot_area",
];

/**
 * A linear conversion to a quantity's canonical unit:
 * `canonical = (value − zero) × scale + offset`. A one-sigma uncertainty scales by `scale`.
 */
export interface UnitConversion {
  /** The unit as given. */
  from: string;
  /** The canonical unit. */
  to: string;
  zero: number;
  scale: number;
  offset: number;
  /** The rule in words, e.g. "K = degC + 273.15". */
  formula: string;
}

// Temperature spellings (UDUNITS-2 names, symbols and aliases with their plurals and
// underscore forms; from memory of its units database) plus the bare letters and capitalised
// names people write. In UDUNITS "C" is the coulomb and "F" the farad: for a temperature they
// can only mean degrees, so they are read as such and the report says so.
const KELVIN = ["K", "kelvin", "kelvins", "degK", "deg_K", "degreeK", "degree_K", "degrees_K"];
const CELSIUS = [
  "degC",
  "°C",
  "℃",
  "C",
  "deg_C",
  "degreeC",
  "degreesC",
  "degree_C",
  "degrees_C",
  "degree_Celsius",
  "degrees_Celsius",
  "celsius",
];
const FAHRENHEIT = [
  "degF",
  "°F",
  "℉",
  "F",
  "deg_F",
  "degreeF",
  "degreesF",
  "degree_F",
  "degrees_F",
  "degree_Fahrenheit",
  "degrees_Fahrenheit",
  "fahrenheit",
];

/** Which temperature scale a unit string names, or null. Names match case-insensitively. */
function temperatureScale(u: string): "K" | "degC" | "degF" | null {
  const match = (list: string[]) =>
    list.some((a) => a === u || (a.length > 2 && a.toLowerCase() === u.toLowerCase()));
  if (match(KELVIN)) return "K";
  if (match(CELSIUS)) return "degC";
  if (match(FAHRENHEIT)) return "degF";
  return null;
}

/**
 * The conversion of a temperature (absolute) or temperature difference to kelvin.
 * Absolute: T/K = t/°C + 273.15 (BIPM, SI Brochure, 9th ed. 2019, §2.3.1) and
 * t/°F = 1.8 t/°C + 32 (NIST SP 811, 2008, B.8; from memory), so K = (°F − 32) × 5/9 + 273.15.
 * Differences: 1 °C = 1 K and 1 °F = 5/9 K.
 */
function temperatureConversion(
  given: string,
  scale: "K" | "degC" | "degF",
  difference: boolean,
): UnitConversion {
  const bare = given === "C" || given === "F" ? ` ("${given}" read as degrees)` : "";
  const to = (zero: number, factor: number, offset: number, formula: string): UnitConversion => ({
    from: given,
    to: "K",
    zero,
    scale: factor,
    offset,
    formula: formula + bare,
  });
  if (scale === "K") return to(0, 1, 0, "K (unit name only)");
  if (difference) {
    return scale === "degC"
      ? to(0, 1, 0, "a difference of 1 degC is 1 K: values unchanged")
      : to(0, 5 / 9, 0, "a difference of 1 degF is 5/9 K: K = degF × 5/9");
  }
  return scale === "degC"
    ? to(0, 1, 273.15, "K = degC + 273.15")
    : to(32, 5 / 9, 273.15, "K = (degF − 32) × 5/9 + 273.15");
}

/**
 * Check a unit string against a quantity: the canonical unit, and the conversion the values
 * need to be in it (null when the string is the canonical unit or a plain alias of it).
 *
 * Temperatures (`temperature`) are accepted in kelvin, degrees Celsius or degrees Fahrenheit
 * in the usual spellings (`degC`, `°C`, `Celsius`, `degF`, `°F`, `F`, `degree_Celsius`...)
 * and converted to K; temperature differences (`temperature_anomaly`) in °C are the same
 * number of K and in °F 5/9 as many. Spectral irradiance (`spectral_irradiance`) in mW m-2
 * nm-1, W m-2 µm-1 or W m-2 m-1 (W m-3) is converted to W m-2 nm-1
 * ({@link SPECTRAL_IRRADIANCE_SCALES}).
 *
 * @param quantity one of {@link QUANTITIES}
 * @param units a unit string (UDUNITS spelling, or a common alias listed for the quantity)
 * @returns `{ ok: true, units, conversion }`, or `{ ok: false, reason }`
 * @example
 * ```ts
 * import { unitsForQuantity } from "./quantities.ts";
 * import assert from "node:assert/strict";
 * const r = unitsForQuantity("temperature", "degF");
 * assert.ok(r.ok && r.conversion);
 * // 32 °F is the ice point, 273.15 K
 * assert.equal((32 - r.conversion.zero) * r.conversion.scale + r.conversion.offset, 273.15);
 * assert.deepEqual(unitsForQuantity("tsi", "W/m2"), { ok: true, units: "W m-2", conversion: null });
 * const s = unitsForQuantity("spectral_irradiance", "W m-3");
 * assert.ok(s.ok && s.conversion && s.conversion.scale === 1e-9); // 1 W m-3 = 1e-9 W m-2 nm-1
 * ```
 */
export function unitsForQuantity(
  quantity: Quantity,
  units: string,
): { ok: true; units: string; conversion: UnitConversion | null } | { ok: false; reason: string } {
  const spec = QUANTITY_UNITS[quantity];
  const u = units.trim();
  if (spec === null) return { ok: true, units: u, conversion: null };
  if (u === spec.canonical || spec.aliases.includes(u)) {
    return { ok: true, units: spec.canonical, conversion: null };
  }
  const scale = quantity === "spectral_irradiance" ? SPECTRAL_IRRADIANCE_SCALES[u] : undefined;
  if (scale !== undefined) {
    return {
      ok: true,
      units: spec.canonical,
      conversion: {
        from: u,
        to: spec.canonical,
        zero: 0,
        scale,
        offset: 0,
        formula: `W m-2 nm-1 = ${u} × ${scale}`,
      },
    };
  }
  const t = temperatureScale(u);
  if (t !== null && (quantity === "temperature" || quantity === "temperature_anomaly")) {
    const conversion = temperatureConversion(u, t, quantity === "temperature_anomaly");
    return { ok: true, units: "K", conversion: t === "K" ? null : conversion };
  }
  const accepted = [spec.canonical, ...spec.aliases.filter((a) => a !== "")].map((a) => `"${a}"`)
    .join(", ");
  const temps = quantity === "temperature" || quantity === "temperature_anomaly"
    ? ", or degrees Celsius or Fahrenheit (degC, °C, degF, °F), converted to K"
    : quantity === "spectral_irradiance"
    ? `, or ${
      Object.keys(SPECTRAL_IRRADIANCE_SCALES).map((a) => `"${a}"`).join(", ")
    }, converted to W m-2 nm-1`
    : "";
  return {
    ok: false,
    reason: `units "${units}" contradict quantity ${quantity}; expected ${accepted}${temps}`,
  };
}

/**
 * Convert values to the canonical unit: `(v − zero) × scale + offset` (NaN stays NaN).
 *
 * @param values values in the given unit
 * @param conversion from {@link unitsForQuantity}
 * @param uncertainty true for one-sigma uncertainties, which only scale
 * @returns a new array in the canonical unit
 * @example
 * ```ts
 * import { convertToCanonicalUnits, unitsForQuantity } from "./quantities.ts";
 * import assert from "node:assert/strict";
 * const r = unitsForQuantity("temperature", "°C");
 * assert.ok(r.ok && r.conversion);
 * assert.deepEqual(Array.from(convertToCanonicalUnits([0, 100], r.conversion)), [273.15, 373.15]);
 * ```
 */
export function convertToCanonicalUnits(
  values: ArrayLike<number>,
  conversion: UnitConversion,
  uncertainty = false,
): Float64Array {
  const { zero, scale, offset } = conversion;
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) {
    out[i] = uncertainty ? values[i] * scale : (values[i] - zero) * scale + offset;
  }
  return out;
}

/**
 * Check a unit string against a quantity and return the canonical unit, for strings that need
 * no change of the values (the canonical unit, an alias, or °C for a temperature difference).
 * A unit that needs a conversion (°C or °F for an absolute temperature, °F for a difference)
 * is refused here: use {@link unitsForQuantity} and convert.
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
  const r = unitsForQuantity(quantity, units);
  if (!r.ok) return r;
  const c = r.conversion;
  if (c && !(c.zero === 0 && c.scale === 1 && c.offset === 0)) {
    return {
      ok: false,
      reason: `units "${units}" need a conversion of the values to ${r.units} (${c.formula})`,
    };
  }
  return { ok: true, units: r.units };
}
