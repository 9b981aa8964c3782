/**
 * Run kind "spectra": Lomb–Scargle periodogram (uneven or gapped series) with false-alarm
 * probabilities, or a tapered FFT periodogram (evenly sampled series), and the dominant peaks
 * with period uncertainties from their widths (core/spectral/).
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { quantileSorted } from "d3-array";
import { InputProblem, type RunKind } from "../runs/kind.ts";
import { refId, SeriesRef } from "../schemas/series_ref.ts";
import {
  ar1Persistence,
  defaultGridCount,
  falseAlarmProbability,
  fftPeriodogram,
  findSpectralPeaks,
  hornBaliunasFrequencies,
  lombScargle,
  type LombScargleChunkInput,
  monteCarloFalseAlarm,
  type MonteCarloMaximaInput,
  type MonteCarloNull,
  periodGrid,
  powerAtFalseAlarm,
} from "../../core/spectral/mod.ts";
import { activityGrid, num } from "./cycles_common.ts";

const MAX_GRID = 200_000;
/** Points × frequencies above which the periodogram is computed in parallel chunks. */
const PARALLEL_WORK = 4_000_000;
/** Frequencies per parallel chunk (fixed: results must not depend on the worker count). */
const LS_CHUNK = 1024;

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
}).openapi("SpectraRequest");

type Params = z.output<typeof SpectraRequest>;

function median(x: number[]): number {
  const s = x.slice().sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

/** The frequency grid of a Lomb–Scargle request (cycles per year), or a 422. */
function lombScargleGrid(p: Params, time: Float64Array) {
  if (p.period_list) {
    if (p.period_list.length === 0) {
      throw new InputProblem("/period_list", "the period grid is empty: give at least one period");
    }
    const f = Float64Array.from(p.period_list, (x) => 1 / x).sort();
    return { frequency: f, min: 1 / f[f.length - 1], max: 1 / f[0], spacing: "list" };
  }
  const n = time.length;
  const span = time[n - 1] - time[0];
  const dts: number[] = [];
  for (let i = 1; i < n; i++) dts.push(time[i] - time[i - 1]);
  const lo = p.periods.min ?? 2 * median(dts);
  const hi = p.periods.max ?? span;
  if (!(lo < hi)) {
    throw new InputProblem(
      "/periods",
      `the period grid is empty: min (${lo}) must be below max (${hi}) years`,
    );
  }
  const count = p.periods.count ?? Math.min(MAX_GRID, defaultGridCount(span, lo, hi));
  if (count < 1) {
    throw new InputProblem("/periods/count", "the period grid is empty: count must be at least 1");
  }
  const frequency = periodGrid({ minPeriod: lo, maxPeriod: hi, count, spacing: p.periods.spacing });
  return { frequency, min: lo, max: hi, spacing: p.periods.spacing };
}

export const spectraKind: RunKind<typeof SpectraRequest> = {
  kind: "spectra",
  path: "/v1/spectra",
  algorithmVersion: "1",
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
  result: LegacyResult,
  estimateSeconds(p) {
    const grid = p.period_list?.length ?? p.periods.count ?? 5000;
    const mc = p.false_alarm === "horne_baliunas" || p.method === "fft" ? 0 : p.replicates;
    return (3600 * grid * (1 + mc)) / 1e9;
  },
  async compute(p, ctx) {
    const s = ctx.series(refId(p.series));
    const warnings: string[] = [];
    const cautions = [
      "The analytic (Horne & Baliunas) and permutation false-alarm probabilities test against " +
      "white noise: in a red (autocorrelated) series, such as monthly sunspot numbers, " +
      "long-period peaks then look more significant than they are; the Monte Carlo AR(1) null " +
      "allows for that persistence.",
      "A periodogram peak describes the record analysed; it is not by itself a physical period.",
    ];
    if (p.method === "fft") {
      const grid = activityGrid(s);
      const gaps = grid.value.reduce((c, v) => c + (Number.isNaN(v) ? 1 : 0), 0);
      if (gaps > 0) {
        throw new InputProblem(
          "/method",
          `the FFT periodogram needs a gap-free series; this one has ${gaps} missing ` +
            `${grid.resolution === "monthly" ? "months" : "years"}: use lomb_scargle`,
        );
      }
      if (grid.value.length < 8) {
        throw new InputProblem("/series", "series too short: the FFT periodogram needs 8 points");
      }
      const pg = fftPeriodogram(grid.value, grid.step, {
        taper: p.taper,
        tukeyFraction: p.tukey_fraction,
        detrend: p.detrend,
      });
      const lo = p.periods.min ?? 2 * grid.step;
      const hi = p.periods.max ?? grid.value.length * grid.step;
      if (!(lo < hi)) {
        throw new InputProblem(
          "/periods",
          `the period grid is empty: min (${lo}) must be below max (${hi}) years`,
        );
      }
      const keep: number[] = [];
      for (let k = 1; k < pg.frequency.length; k++) {
        const per = 1 / pg.frequency[k];
        if (per >= lo - 1e-12 && per <= hi + 1e-12) keep.push(k);
      }
      if (keep.length < 2) {
        throw new InputProblem(
          "/periods",
          `the period grid is empty: fewer than 2 FFT frequencies k/(N·Δt) fall between ${lo} ` +
            `and ${hi} years`,
        );
      }
      const f = keep.map((k) => pg.frequency[k]), pw = keep.map((k) => pg.power[k]);
      const peaks = findSpectralPeaks(f, pw, { maxPeaks: p.max_peaks });
      return {
        input: { id: s.id, name: s.name, quantity: s.quantity, n: grid.value.length },
        method: "fft",
        taper: p.taper,
        detrend: p.detrend,
        units: { power: `(${s.units})^2 yr`, frequency: "yr-1", period: "yr" },
        grid: { min_period: 1 / f[f.length - 1], max_period: 1 / f[0], count: f.length },
        peaks: peaks.map((q) => peakJson(q, null, null)),
        dominant: peaks.length ? peakJson(peaks[0], null, null) : null,
        periodogram: { frequency: f, period: f.map((x) => 1 / x), power: pw },
        false_alarm: null,
        warnings,
        cautions,
      };
    }
    const tt: number[] = [], yy: number[] = [];
    for (let i = 0; i < s.time.length; i++) {
      if (Number.isFinite(s.value[i])) {
        tt.push(s.time[i]);
        yy.push(s.value[i]);
      }
    }
    if (tt.length < 6) {
      throw new InputProblem(
        "/series",
        `series too short: the Lomb-Scargle periodogram needs at least 6 values, got ${tt.length}`,
      );
    }
    const time = Float64Array.from(tt), value = Float64Array.from(yy);
    if (value.every((v) => v === value[0])) {
      throw new InputProblem("/series", "the series is constant: it has no periodogram");
    }
    const g = lombScargleGrid(p, time);
    const span = time[time.length - 1] - time[0];
    if (g.max > span) {
      warnings.push(
        `periods longer than the series' span (${span.toFixed(1)} yr) are not resolved`,
      );
    }
    {
      const dts: number[] = [];
      for (let i = 1; i < time.length; i++) dts.push(time[i] - time[i - 1]);
      const nyquistPeriod = 2 * median(dts);
      if (g.min < nyquistPeriod * (1 - 1e-9)) {
        warnings.push(
          `periods shorter than twice the median sampling interval (${
            nyquistPeriod.toPrecision(3)
          } yr) can be aliases of longer ones`,
        );
      }
    }
    // large grids are split into fixed chunks of frequencies (the same split whatever the
    // number of workers, so the numbers do not depend on it) and computed in parallel
    let power: Float64Array;
    const K = g.frequency.length;
    if (time.length * K < PARALLEL_WORK) {
      power = lombScargle(time, value, g.frequency, { normalization: p.normalization });
    } else {
      const chunks: LombScargleChunkInput[] = [];
      for (let k0 = 0; k0 < K; k0 += LS_CHUNK) {
        chunks.push({
          time,
          value,
          frequency: g.frequency.slice(k0, Math.min(K, k0 + LS_CHUNK)),
          normalization: p.normalization,
        });
      }
      const parts = await ctx.parallel<LombScargleChunkInput, Float64Array>(
        "spectral.lomb_scargle_chunk",
        chunks,
      );
      power = new Float64Array(K);
      let o = 0;
      for (const part of parts) {
        power.set(part, o);
        o += part.length;
      }
    }
    ctx.progress(0.1);
    const peaks = findSpectralPeaks(g.frequency, power, { maxPeaks: p.max_peaks });
    const n = time.length;
    const m = hornBaliunasFrequencies(n);
    const analytic = p.false_alarm !== "monte_carlo" && p.normalization === "horne_baliunas";
    if (p.false_alarm !== "monte_carlo" && !analytic) {
      warnings.push(
        "analytic false-alarm probabilities need normalization horne_baliunas; none reported",
      );
    }
    let maxima: Float64Array | null = null;
    let localP: number[] | null = null;
    if (p.false_alarm !== "horne_baliunas") {
      const chunk = 25;
      const probe = peaks.map((q) => q.index);
      const inputs: MonteCarloMaximaInput[] = [];
      for (let r0 = 0; r0 < p.replicates; r0 += chunk) {
        inputs.push({
          time,
          value,
          frequency: g.frequency,
          seed: p.seed,
          replicates: Math.min(chunk, p.replicates - r0),
          firstReplicate: r0,
          normalization: p.normalization,
          null: p.monte_carlo_null,
          probe,
        });
      }
      const outs = await ctx.parallel<MonteCarloMaximaInput, MonteCarloNull>(
        "spectral.monte_carlo_maxima",
        inputs,
      );
      maxima = new Float64Array(p.replicates);
      const above = new Array(probe.length).fill(0);
      let o = 0;
      for (const a of outs) {
        for (let r = 0; r < a.maxima.length; r++) {
          maxima[o++] = a.maxima[r];
          for (let j = 0; j < probe.length; j++) {
            if (a.probed[r * probe.length + j] >= peaks[j].power) above[j]++;
          }
        }
      }
      maxima.sort();
      localP = above.map((c) => (1 + c) / (1 + p.replicates));
    }
    const levels = (fap: number) => ({
      fap,
      analytic: analytic ? powerAtFalseAlarm(fap, m) : null,
      monte_carlo: maxima ? quantileSorted(Array.from(maxima), 1 - fap) ?? null : null,
    });
    const fapOf = (z: number) => ({
      analytic: analytic ? falseAlarmProbability(z, m) : null,
      monte_carlo: maxima ? monteCarloFalseAlarm(z, maxima) : null,
    });
    const pk = peaks.map((q, j) => {
      const f = fapOf(q.power);
      return {
        ...peakJson(q, f.analytic, f.monte_carlo),
        p_local_monte_carlo: localP?.[j] ?? null,
      };
    });
    return {
      input: { id: s.id, name: s.name, quantity: s.quantity, n },
      method: "lomb_scargle",
      normalization: p.normalization,
      units: {
        power: p.normalization === "psd" ? `(${s.units})^2` : "1",
        frequency: "yr-1",
        period: "yr",
      },
      grid: { min_period: g.min, max_period: g.max, count: g.frequency.length, spacing: g.spacing },
      peaks: pk,
      dominant: pk[0] ?? null,
      periodogram: {
        frequency: Array.from(g.frequency),
        period: Array.from(g.frequency, (x) => 1 / x),
        power: Array.from(power),
      },
      false_alarm: {
        method: p.false_alarm,
        independent_frequencies: analytic ? m : null,
        independent_frequencies_source: "Horne & Baliunas 1986: M = -6.362 + 1.193 N + " +
          "0.00098 N^2",
        replicates: maxima ? p.replicates : null,
        monte_carlo_tests: maxima
          ? "false_alarm_monte_carlo: the grid's largest replicate power against the peak " +
            "(family-wise over every period searched); p_local_monte_carlo: the replicate power " +
            "at the peak's own period (one period tested)"
          : null,
        seed: maxima ? p.seed : null,
        null_hypothesis: {
          analytic: "white noise",
          monte_carlo: maxima
            ? (p.monte_carlo_null === "ar1"
              ? `red noise: AR(1) with persistence ${
                ar1Persistence(time, value).toPrecision(4)
              } yr and the series' variance`
              : "white noise: values permuted over the sampling times")
            : null,
        },
        levels: [levels(0.01), levels(0.05)],
      },
      warnings,
      cautions,
    };
  },
};

function peakJson(
  q: ReturnType<typeof findSpectralPeaks>[number],
  fapAnalytic: number | null,
  fapMc: number | null,
) {
  return {
    period: q.period,
    frequency: q.frequency,
    power: q.power,
    period_uncertainty: num(q.periodUncertainty),
    period_interval: q.periodInterval.map(num),
    half_width_frequency: num(q.halfWidth),
    false_alarm_analytic: fapAnalytic,
    false_alarm_monte_carlo: fapMc,
  };
}
