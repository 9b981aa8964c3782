/**
 * The plausibility warnings and standing cautions of the irradiance analyses, each with its
 * published source.
 *
 * @module
 */

/** TSI at the 2008 solar minimum on the current absolute scale, W m-2 (Kopp & Lean 2011). */
export const TSI_SCALE_2008_MINIMUM = 1360.8;

/** Warning when a quiet-Sun level is far from the current absolute scale. */
export function quietSunWarning(sq: number): string[] {
  if (Math.abs(sq - TSI_SCALE_2008_MINIMUM) <= 2) return [];
  return [
    `The quiet-Sun level ${sq.toFixed(2)} W m-2 is ${
      (sq - TSI_SCALE_2008_MINIMUM).toFixed(2)
    } W m-2 from 1360.8 W m-2, the 2008-minimum level on the current absolute scale (Kopp & Lean 2011); the TSI record may be on an older scale (about 1365.4 W m-2).`,
  ];
}

/** Warning when a cycle amplitude falls outside the measured 0.9–1.6 W m-2. */
export function cycleAmplitudeWarning(amp: number | null): string[] {
  if (amp === null || (amp >= 0.9 && amp <= 1.6)) return [];
  return [
    `The median solar-cycle amplitude of the reconstruction, ${
      amp.toFixed(3)
    } W m-2 (annual means, maximum minus preceding minimum), is outside the 0.9–1.6 W m-2 of measured cycles (about 0.1 %; Kopp 2016, IPCC AR6 §7.3.4.4).`,
  ];
}

/** The caution that reconstructions before the satellite era are model-dependent. */
export const PRE_SATELLITE_CAUTION =
  "Reconstructions before the satellite era (1978) are model-dependent: they extend a calibrated proxy model through empirical mappings, and their intervals hold only if the proxy relations did not change.";

/** The caution that results do not replace assessment. */
export const ASSESSMENT_CAUTION =
  "These results do not replace peer-reviewed assessment of solar forcing.";
