/**
 * Charts of the "spectral-irradiance-reconstructions" analysis: the chosen bands over time,
 * each as its change relative to its own mean (so bands of very different levels share one
 * axis), solid where the proxies were observed and the back-extension boundary marked; and
 * (view `variability`) the relative cycle variability of every band over the reconstruction's
 * cycles.
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import type { Layer } from "../../charts/chart.ts";
import { runDescription, runNotes, runTitle } from "../../charts/run_common.ts";
import { spectralVariabilityChart } from "../common/spectral_variability_chart.ts";
import type { SpectralReconstructionResultOut } from "./result.ts";

export const spectralReconstructionChart: KindChart<SpectralReconstructionResultOut> = {
  build(run, r) {
    const s = r.spectrum;
    const layers: Layer[] = r.chart_bands.map((b, j) => {
      const v = s.value[b];
      const finite = v.filter((x): x is number => x !== null);
      const mean = finite.reduce((a, x) => a + x, 0) / Math.max(1, finite.length);
      return {
        type: "line",
        label: `${s.bands[b].lower}–${s.bands[b].upper} nm`,
        x: s.time,
        y: v.map((x) => (x === null || mean === 0 ? null : (100 * (x - mean)) / mean)),
        color: j,
      };
    });
    const segs = r.source_segments;
    for (let k = 1; k < segs.length; k++) {
      const a = segs[k - 1], b = segs[k];
      if (a.source === "back_extended" && b.source === "direct") {
        layers.push({
          type: "vline",
          x: (a.end + b.start) / 2,
          text: "proxies observed from here",
        });
      }
    }
    return {
      title: runTitle(`Reconstructed spectral irradiance by band (${r.resolution} means)`, run),
      description: runDescription(
        run,
        "Chosen bands of the spectral reconstruction, each as the percentage change from its " +
          "own mean over the period, so that ultraviolet bands (several per cent over a cycle) " +
          "and visible or infrared bands (a tenth of a per cent, some in anti-phase) share one " +
          "axis. Before the marked boundary the proxies are mapped from sunspot number.",
      ),
      x: { label: "Year", kind: "year" },
      y: { label: "Change from the band's mean (%)" },
      layers,
      ...runNotes(run),
    };
  },
  views: {
    variability: {
      description: "Relative cycle variability (cycle amplitude / level) of every band against " +
        "wavelength, both axes logarithmic",
      build(run, r) {
        if (r.variability.cycles.length === 0) return null;
        return spectralVariabilityChart(
          run,
          r.variability.bands.map((b) => ({
            lower: b.band.lower,
            upper: b.band.upper,
            relative: b.relative,
            sd: null,
          })),
          `Relative solar-cycle variability of each reconstructed band: the mean over ${r.variability.cycles.length} cycles of the TSI reconstruction of (annual mean at the maximum − at the preceding minimum) over the level.`,
          "",
        );
      },
    },
  },
};
