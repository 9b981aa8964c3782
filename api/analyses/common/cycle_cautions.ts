/**
 * Cautions printed with every solar-cycle result (cycle tables, fits, forecasts).
 *
 * @module
 */

/** Results are not an assessment or an official prediction. */
export const CAUTION_CYCLE_REVIEW =
  "These results do not replace peer-reviewed assessment or official solar-cycle predictions.";

/** Amplitudes depend on the sunspot-number version (Clette et al. 2014, Space Sci. Rev. 186, 35). */
export const CAUTION_SCALE =
  "Sunspot-number versions differ in scale (version 1 ≈ 0.6 × version 2 before 1947): " +
  "compare amplitudes only within one version.";
