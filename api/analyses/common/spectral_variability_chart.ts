/**
 * The chart of relative solar-cycle variability per wavelength band (|cycle amplitude| /
 * level against band centre, both axes logarithmic), shared by the spectral model (from the
 * sensitivities and the calibration's cycles) and the spectral reconstruction (from the
 * reconstructed bands over many cycles). Bands that fall as activity rises (anti-phase) get
 * their own marker, since a logarithmic axis shows magnitudes only.
 *
 * @module
 */
import type { ChartSpec, Layer } from "../../charts/chart.ts";
import type { RunRecord } from "../../store/types.ts";
import { runDescription, runNotes, runTitle } from "../../charts/run_common.ts";

/** One band's relative variability and its uncertainty (null sd: none stated). */
export interface BandVariabilityPoint {
  lower: number;
  upper: number;
  relative: number | null;
  sd: number | null;
}

/**
 * The variability chart: in-phase and anti-phase bands as markers at the geometric band
 * centre, with a ±1.96·sd band where an SD is known (its lower edge dropped where it reaches
 * zero, which a logarithmic axis cannot show).
 */
export function spectralVariabilityChart(
  run: RunRecord,
  points: BandVariabilityPoint[],
  what: string,
  intervalLabel: string,
): ChartSpec {
  const x = points.map((p) => Math.sqrt(p.lower * p.upper));
  const mag = points.map((
    p,
  ) => (p.relative === null || p.relative === 0 ? null : Math.abs(p.relative)));
  const inPhase = points.map((p, i) => (p.relative !== null && p.relative > 0 ? mag[i] : null));
  const anti = points.map((p, i) => (p.relative !== null && p.relative < 0 ? mag[i] : null));
  const layers: Layer[] = [];
  if (points.some((p) => p.sd !== null)) {
    layers.push({
      type: "band",
      label: intervalLabel,
      x,
      lower: points.map((p, i) => {
        const m = mag[i];
        if (m === null || p.sd === null) return null;
        return m - 1.96 * p.sd > 0 ? m - 1.96 * p.sd : null;
      }),
      upper: points.map((
        p,
        i,
      ) => (mag[i] === null || p.sd === null ? null : mag[i]! + 1.96 * p.sd)),
      color: 0,
    });
  }
  layers.push({ type: "line", x, y: mag, color: 0, width: 0.8, dash: "dotted" });
  layers.push({
    type: "points",
    label: "rises with solar activity",
    x,
    y: inPhase,
    color: 0,
    marker: "circle",
  });
  if (anti.some((v) => v !== null)) {
    layers.push({
      type: "points",
      label: "falls as activity rises (anti-phase)",
      x,
      y: anti,
      color: 1,
      marker: "triangle-down",
    });
  }
  return {
    title: runTitle("Relative solar-cycle variability by wavelength band", run),
    description: runDescription(
      run,
      `${what} Each marker is one band at its geometric centre; both axes are logarithmic, so ` +
        "the magnitude |cycle amplitude| / level is drawn and anti-phase bands are marked apart.",
    ),
    x: {
      label: "Wavelength (nm)",
      kind: "log",
      domain: [Math.min(...points.map((p) => p.lower)), Math.max(...points.map((p) => p.upper))],
    },
    y: { label: "|Cycle amplitude| / level", kind: "log" },
    layers,
    ...runNotes(run),
  };
}
