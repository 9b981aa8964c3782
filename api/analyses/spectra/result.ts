/**
 * Result of the "spectra" analysis: a Lomb–Scargle periodogram with false-alarm tests, or a
 * tapered FFT periodogram, with its peaks.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, nums, warnings } from "../common/result_parts.ts";

const nullableNum = z.number().nullable();

/** A periodogram peak with its width and false-alarm probabilities. */
const Peak = z.object({
  period: z.number().openapi({ description: "Period of the peak, years" }),
  frequency: z.number().openapi({ description: "Frequency, cycles per year" }),
  power: z.number().openapi({ description: "Power at the peak (`units.power`)" }),
  period_uncertainty: nullableNum.openapi({
    description: "Period uncertainty from the half-width at half maximum, years; null when the " +
      "peak is not resolved on the grid",
  }),
  period_interval: z.tuple([nullableNum, nullableNum]).openapi({
    description: "Periods at the half-power points [shorter, longer], years; null where unresolved",
  }),
  half_width_frequency: nullableNum.openapi({
    description: "Half-width at half maximum, cycles per year",
  }),
  false_alarm_analytic: nullableNum.openapi({
    description: "Horne & Baliunas (1986) false-alarm probability (white-noise null); null " +
      "when not computed",
  }),
  false_alarm_monte_carlo: nullableNum.openapi({
    description: "Monte Carlo family-wise false-alarm probability over the whole grid; null " +
      "when not computed",
  }),
});

const LombScarglePeak = Peak.extend({
  p_local_monte_carlo: nullableNum.openapi({
    description: "Monte Carlo p-value at the peak's own period (one period tested); null " +
      "without Monte Carlo",
  }),
}).openapi("LombScarglePeak");

const Input = z.object({
  id: z.string(),
  name: z.string(),
  quantity: z.string(),
  n: z.number().int().openapi({ description: "Values analysed" }),
});

const Periodogram = z.object({
  frequency: nums.openapi({ description: "Cycles per year" }),
  period: nums.openapi({ description: "Years" }),
  power: nums.openapi({ description: "`units.power`" }),
});

const Units = z.object({
  power: z.string().openapi({ description: "UDUNITS string of the power" }),
  frequency: z.literal("yr-1"),
  period: z.literal("yr"),
});

/** Power level of a false-alarm probability, by test. */
const Level = z.object({
  fap: z.number(),
  analytic: nullableNum.openapi({ description: "Horne & Baliunas (1986) level" }),
  monte_carlo: nullableNum.openapi({ description: "Quantile of the replicate maxima" }),
});

const LombScargleResult = z.object({
  input: Input,
  method: z.literal("lomb_scargle"),
  normalization: z.enum(["horne_baliunas", "psd", "standard"]),
  units: Units,
  grid: z.object({
    min_period: z.number().openapi({ description: "Years" }),
    max_period: z.number().openapi({ description: "Years" }),
    count: z.number().int(),
    spacing: z.enum(["frequency", "period", "list"]),
  }),
  peaks: z.array(LombScarglePeak),
  dominant: LombScarglePeak.nullable().openapi({ description: "The highest peak" }),
  periodogram: Periodogram,
  false_alarm: z.object({
    method: z.enum(["horne_baliunas", "monte_carlo", "both"]),
    independent_frequencies: nullableNum.openapi({
      description: "M of Horne & Baliunas (1986); null without the analytic test",
    }),
    independent_frequencies_source: z.string(),
    replicates: z.number().int().nullable(),
    monte_carlo_tests: z.string().nullable(),
    seed: z.number().int().nullable(),
    null_hypothesis: z.object({
      analytic: z.string(),
      monte_carlo: z.string().nullable(),
    }),
    levels: z.array(Level),
  }),
  warnings,
  cautions,
  inherited,
}).openapi("LombScargleSpectrum");

const FftResult = z.object({
  input: Input,
  method: z.literal("fft"),
  taper: z.enum(["hann", "tukey", "none"]),
  detrend: z.enum(["constant", "linear", "none"]),
  units: Units,
  grid: z.object({
    min_period: z.number().openapi({ description: "Years" }),
    max_period: z.number().openapi({ description: "Years" }),
    count: z.number().int(),
  }),
  peaks: z.array(Peak),
  dominant: Peak.nullable().openapi({ description: "The highest peak" }),
  periodogram: Periodogram,
  false_alarm: z.null(),
  warnings,
  cautions,
  inherited,
}).openapi("FftSpectrum");

export const SpectraResult = z.discriminatedUnion("method", [LombScargleResult, FftResult])
  .openapi("SpectraResult");

/** The result as `compute` builds it. */
export type SpectraResultIn = z.input<typeof SpectraResult>;
/** The result as stored and read back. */
export type SpectraResultOut = z.output<typeof SpectraResult>;
/** One peak as `compute` builds it. */
export type PeakIn = z.input<typeof Peak>;
