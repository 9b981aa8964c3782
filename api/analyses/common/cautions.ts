/**
 * Scientific cautions the solar–climate results carry beside their numbers (correlation is not
 * attribution, results do not replace assessment, reconstructions before the satellite era
 * are model-dependent).
 *
 * @module
 */
import type { StoredSeries } from "../../store/types.ts";

export const CAUTION_CORRELATION =
  "Correlation is not attribution: a statistical association with the solar series does not " +
  "show that the Sun caused the variation, and other forcings with similar timing can alias " +
  "into it.";
export const CAUTION_REVIEW =
  "These results do not replace peer-reviewed assessment of solar influence on climate.";
export const CAUTION_PRE_SATELLITE =
  "Solar irradiance before the satellite era (before 1978) is a reconstruction and is " +
  "model-dependent; results that rely on it inherit that dependence.";

/**
 * Cautions for a set of solar inputs: correlation and review always, and the pre-satellite
 * caution when a TSI or forcing series reaches back before 1978.
 */
export function solarCautions(solar: readonly StoredSeries[]): string[] {
  const c = [CAUTION_CORRELATION, CAUTION_REVIEW];
  if (
    solar.some((s) =>
      (s.quantity === "tsi" || s.quantity === "radiative_forcing") && s.start < 1978
    )
  ) {
    c.push(CAUTION_PRE_SATELLITE);
  }
  return c;
}
