/**
 * Chart of the "spectral-irradiance-models" analysis: each band's relative solar-cycle
 * variability (cycle amplitude / level) against wavelength, from its sensitivities and the
 * proxies' cycles in the calibration period, with the 95 % interval from the coefficients.
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import { spectralVariabilityChart } from "../common/spectral_variability_chart.ts";
import type { SpectralModelResultOut } from "./result.ts";

export const spectralModelChart: KindChart<SpectralModelResultOut> = {
  build(run, r) {
    if (r.bands.every((b) => b.cycle === null)) return null;
    return spectralVariabilityChart(
      run,
      r.bands.map((b) => ({
        lower: b.band.lower,
        upper: b.band.upper,
        relative: b.cycle?.relative ?? null,
        sd: b.cycle?.relative_sd ?? null,
      })),
      `Relative solar-cycle variability of each band's model over the ${r.cycles.length} cycle(s) of the calibration period (${r.resolution} cells).`,
      "±1.96 σ from the band coefficients",
    );
  },
};
