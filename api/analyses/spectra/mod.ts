/**
 * Analysis "spectra": Lomb–Scargle periodogram (uneven or gapped series) with false-alarm
 * probabilities, or a tapered FFT periodogram (evenly sampled series), and the dominant peaks
 * with period uncertainties from their widths (core/spectral/).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { SpectraRequest } from "./request.ts";
import { SpectraResult } from "./result.ts";
import { computeSpectra } from "./compute.ts";
import { spectraChart } from "./chart.ts";
import { spectraTasks } from "./tasks.ts";
import { estimateSpectraSeconds } from "./estimate.ts";

export const spectraKind = defineAnalysis({
  kind: "spectra",
  path: "/v1/spectra",
  // 2: one mixed-radix FFT (the FFT periodogram changes in the last bits)
  algorithmVersion: "2",
  tag: "Solar cycles",
  summary: "Periodogram, dominant periods and false-alarm probabilities",
  description: "Lomb–Scargle periodogram (Lomb 1976; Scargle 1982) of any series, gaps and " +
    "uneven sampling allowed, on a period grid you can set, with false-alarm probabilities " +
    "of its peaks (Horne & Baliunas 1986, and a seeded Monte Carlo test against red (AR(1)) " +
    "or white noise); or the " +
    "tapered FFT periodogram of a gap-free monthly or annual series. Peaks come with a period " +
    "uncertainty from their half-width at half maximum. Periods in years, frequencies in " +
    "cycles per year.",
  request: SpectraRequest,
  result: SpectraResult,
  estimateSeconds: estimateSpectraSeconds,
  compute: computeSpectra,
  chart: spectraChart,
  tasks: spectraTasks,
});
