/**
 * The fraction of a blackbody's radiant exitance in a wavelength band (Planck's law), used
 * to state how much of the solar spectrum a set of bands covers when the Sun is approximated
 * by a blackbody at its effective temperature.
 *
 * @module
 */
import { InputError } from "../errors.ts";

/**
 * Second radiation constant c₂ = hc/k in nm K (CODATA 2018; exact since the 2019 SI
 * redefinition: 1.438776877e-2 m K).
 */
export const SECOND_RADIATION_CONSTANT_NM_K = 1.438776877e7;

/**
 * Nominal solar effective temperature, K (IAU 2015 Resolution B3; Prša et al. 2016, AJ 152,
 * 41; from memory).
 */
export const SOLAR_EFFECTIVE_TEMPERATURE_K = 5772;

// Bernoulli numbers B_k for k = 0, 1, 2, 4, ..., 20 (odd k > 1 vanish)
const BERNOULLI: [number, number][] = [
  [0, 1],
  [1, -1 / 2],
  [2, 1 / 6],
  [4, -1 / 30],
  [6, 1 / 42],
  [8, -1 / 30],
  [10, 5 / 66],
  [12, -691 / 2730],
  [14, 7 / 6],
  [16, -3617 / 510],
  [18, 43867 / 798],
  [20, -174611 / 330],
];

/** ∫ₓ^∞ t³/(eᵗ − 1) dt, the tail of the Planck integral in x = c₂/(λT). */
function planckTail(x: number): number {
  const total = Math.PI ** 4 / 15;
  if (x <= 0) return total;
  if (x >= 1) {
    // Σ_n e^{−nx}(x³/n + 3x²/n² + 6x/n³ + 6/n⁴) (Widger & Woodall 1976, Bull. Am. Meteorol.
    // Soc. 57, 1217), to double precision
    let s = 0;
    for (let n = 1; n < 2000; n++) {
      const term = Math.exp(-n * x) *
        (x ** 3 / n + 3 * x * x / n ** 2 + 6 * x / n ** 3 + 6 / n ** 4);
      s += term;
      if (term < 1e-17 * s) break;
    }
    return s;
  }
  // small x: ∫₀ˣ t³/(eᵗ − 1) dt = Σ_k B_k x^{k+3} / (k! (k + 3)) (t/(eᵗ − 1) = Σ B_k t^k/k!,
  // convergent for |x| < 2π; terms to k = 20 reach double precision for x < 1)
  let head = 0, fact = 1, kPrev = 0;
  for (const [k, b] of BERNOULLI) {
    for (let j = kPrev + 1; j <= k; j++) fact *= j;
    kPrev = k;
    head += (b * x ** (k + 3)) / (fact * (k + 3));
  }
  return total - head;
}

/**
 * Fraction of a blackbody's radiant exitance between two wavelengths: F(λ₁, λ₂) =
 * F(0→λ₂) − F(0→λ₁) with F(0→λ) = (15/π⁴) ∫ₓ^∞ t³/(eᵗ − 1) dt, x = c₂/(λT) (Planck's law
 * integrated over wavelength; the series of Widger & Woodall 1976, Bull. Am. Meteorol. Soc.
 * 57, 1217, for x ≥ 1 and the Bernoulli expansion for x < 1). Units: nm and K.
 *
 * @param lower lower wavelength, nm (≥ 0)
 * @param upper upper wavelength, nm (> lower; Infinity allowed)
 * @param temperature blackbody temperature, K (> 0) @default 5772 (the nominal Sun)
 * @returns the fraction in [0, 1]
 * @throws {InputError} (field `lower`, `upper` or `temperature`, reason `out_of_range`)
 * @example
 * ```ts
 * import { blackbodyBandFraction } from "./blackbody_band_fraction.ts";
 * import assert from "node:assert/strict";
 * // Wien's displacement law: a quarter of the exitance lies below λ_max = 2897.77 µm K / T
 * // (handbook value F(0→λT = 2898 µm K) = 0.2501, e.g. Incropera & DeWitt, Table 12.1; from memory)
 * assert.ok(Math.abs(blackbodyBandFraction(0, 2898e3 / 5772) - 0.2501) < 2e-4);
 * assert.ok(Math.abs(blackbodyBandFraction(0, Infinity) - 1) < 1e-12);
 * ```
 */
export function blackbodyBandFraction(
  lower: number,
  upper: number,
  temperature: number = SOLAR_EFFECTIVE_TEMPERATURE_K,
): number {
  const fn = "Cannot compute a blackbody band fraction";
  if (!(temperature > 0) || !Number.isFinite(temperature)) {
    throw new InputError(`${fn}: temperature must be > 0 K, got ${temperature}`, {
      field: "temperature",
      reason: "out_of_range",
      value: temperature,
    });
  }
  if (!(lower >= 0) || !Number.isFinite(lower)) {
    throw new InputError(`${fn}: lower must be a wavelength ≥ 0 nm, got ${lower}`, {
      field: "lower",
      reason: "out_of_range",
      value: lower,
    });
  }
  if (!(upper > lower)) {
    throw new InputError(`${fn}: upper (${upper} nm) must exceed lower (${lower} nm)`, {
      field: "upper",
      reason: "out_of_range",
      value: upper,
    });
  }
  const below = (lambda: number) =>
    lambda === 0
      ? 0
      : lambda === Infinity
      ? 1
      : (15 / Math.PI ** 4) * planckTail(SECOND_RADIATION_CONSTANT_NM_K / (lambda * temperature));
  return Math.min(1, Math.max(0, below(upper) - below(lower)));
}
