/**
 * Request of the "spectra" analysis.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { SeriesRef } from "../../schemas/series_ref.ts";
import { DEMO_SERIES } from "../../schemas/examples.ts";

/** Largest period grid. */
export const MAX_GRID = 200_000;

export const SpectraRequest = z.object({
  series: SeriesRef,
  method: z.enum(["lomb_scargle", "fft"]).default("lomb_scargle").openapi({
    description: "`lomb_scargle` for any sampling (gaps allowed); `fft`: tapered FFT " +
      "periodogram of a gap-free monthly or annual series",
    example: "lomb_scargle",
  }),
  periods: z.object({
    min: z.number().positive().optional().openapi({
      description: "Shortest period, years (default: twice the median sampling interval)",
      example: 2,
    }),
    max: z.number().positive().optional().openapi({
      description: "Longest period, years (default: the series' span)",
      example: 100,
    }),
    count: z.number().int().min(0).max(MAX_GRID).optional().openapi({
      description: "Grid points (default: 5 per natural resolution 1/span, VanderPlas 2018)",
      example: 5000,
    }),
    spacing: z.enum(["frequency", "period"]).default("frequency").openapi({
      description: "Grid evenly spaced in frequency (fast path) or in period",
      example: "frequency",
    }),
  }).default({ spacing: "frequency" }).openapi({
    description: "Period grid of the Lomb–Scargle periodogram; for `fft`, the range of " +
      "periods reported from the FFT's own grid k/(N·Δt)",
  }),
  period_list: z.array(z.number().positive()).max(MAX_GRID).optional().openapi({
    description: "Explicit periods in years (Lomb–Scargle), instead of `periods`",
    example: [8, 9, 10, 11, 12, 13],
  }),
  normalization: z.enum(["horne_baliunas", "psd", "standard"]).default("horne_baliunas")
    .openapi({
      description: "Lomb–Scargle power: `horne_baliunas` (divided by the variance; false-alarm " +
        "probabilities apply), `psd` (value units squared), `standard` (share of variance, 0..1)",
      example: "horne_baliunas",
    }),
  false_alarm: z.enum(["horne_baliunas", "monte_carlo", "both"]).default("horne_baliunas")
    .openapi({
      description: "False-alarm probability of peaks: analytic with the Horne & Baliunas (1986) " +
        "number of independent frequencies, a seeded Monte Carlo permutation test, or both",
      example: "both",
    }),
  monte_carlo_null: z.enum(["ar1", "permutation"]).default("ar1").openapi({
    description: "Null hypothesis of the Monte Carlo test: `ar1` red noise with the series' " +
      "variance and persistence on its own times (Schulz & Mudelsee 2002), or `permutation` " +
      "(white noise: values shuffled over the times)",
    example: "ar1",
  }),
  replicates: z.number().int().min(20).max(10_000).default(200).openapi({
    description: "Monte Carlo replicates",
    example: 200,
  }),
  seed: z.number().int().min(0).max(4294967295).default(1),
  taper: z.enum(["hann", "tukey", "none"]).default("hann").openapi({
    description: "FFT taper",
    example: "hann",
  }),
  tukey_fraction: z.number().gt(0).max(1).default(0.1).openapi({
    description: "Share of the record tapered by the Tukey window",
    example: 0.1,
  }),
  detrend: z.enum(["constant", "linear", "none"]).default("constant").openapi({
    description: "FFT: remove the mean, a fitted line, or nothing",
    example: "constant",
  }),
  max_peaks: z.number().int().min(1).max(50).default(5),
}).openapi("SpectraRequest", {
  example: { series: DEMO_SERIES.SSN, method: "lomb_scargle", false_alarm: "horne_baliunas" },
});

export type SpectraParams = z.output<typeof SpectraRequest>;
