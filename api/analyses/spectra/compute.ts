/**
 * Adapter of the "spectra" analysis: the samples of the series, the period grid, the
 * periodogram (in parallel chunks for large grids), its peaks and their false-alarm tests
 * (core/spectral/); or the tapered FFT periodogram of a gap-free monthly or annual series.
 *
 * @module
 */
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import type { StoredSeries } from "../../store/types.ts";
import {
  ar1Persistence,
  combineMonteCarloNull,
  defaultGridCount,
  defaultPeriodRange,
  falseAlarmProbability,
  fftPeriodogram,
  findSpectralPeaks,
  hornBaliunasFrequencies,
  lombScargle,
  type LombScargleChunkInput,
  monteCarloFalseAlarm,
  type MonteCarloMaximaInput,
  type MonteCarloNull,
  type MonteCarloPeakTests,
  monteCarloPowerLevel,
  periodBand,
  periodGrid,
  powerAtFalseAlarm,
  type SpectralPeak,
} from "../../../core/spectral/mod.ts";
import { activityGrid } from "../common/activity_grid.ts";
import { parallelInRounds } from "../common/parallel_rounds.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import { MAX_GRID, type SpectraParams } from "./request.ts";
import type { PeakIn, SpectraResultIn } from "./result.ts";

/** Points × frequencies above which the periodogram is computed in parallel chunks. */
const PARALLEL_WORK = 4_000_000;
/** Frequencies per parallel chunk (fixed: results must not depend on the worker count). */
const LS_CHUNK = 1024;
/** Most Monte Carlo replicates per parallel chunk. */
const MC_CHUNK = 25;
/**
 * Points × frequencies × replicates of one Monte Carlo chunk at most (about 0.1 s on one core;
 * one replicate at least): a worker is free for other runs that often. Each replicate draws
 * from its own stream and the chunks' maxima are joined in order, so the split does not change
 * the numbers.
 */
const MC_CHUNK_WORK = 3e7;

const CAUTIONS = [
  "The analytic (Horne & Baliunas) and permutation false-alarm probabilities test against " +
  "white noise: in a red (autocorrelated) series, such as monthly sunspot numbers, " +
  "long-period peaks then look more significant than they are; the Monte Carlo AR(1) null " +
  "allows for that persistence.",
  "A periodogram peak describes the record analysed; it is not by itself a physical period.",
];

/** The periodogram the request asks for. */
export async function computeSpectra(p: SpectraParams, ctx: RunContext): Promise<SpectraResultIn> {
  const s = ctx.series(refId(p.series));
  return p.method === "fft" ? fftSpectrum(p, s) : await lombScargleSpectrum(p, s, ctx);
}

function peakJson(q: SpectralPeak, fapAnalytic: number | null, fapMc: number | null): PeakIn {
  return {
    period: q.period,
    frequency: q.frequency,
    power: q.power,
    period_uncertainty: undefinedAsNull(q.periodUncertainty),
    period_interval: [undefinedAsNull(q.periodInterval[0]), undefinedAsNull(q.periodInterval[1])],
    half_width_frequency: undefinedAsNull(q.halfWidth),
    false_alarm_analytic: fapAnalytic,
    false_alarm_monte_carlo: fapMc,
  };
}

/** Refuse an empty period range. */
function checkRange(lo: number, hi: number) {
  if (!(lo < hi)) {
    throw new InputProblem(
      "/periods",
      `the period grid is empty: min (${lo}) must be below max (${hi}) years`,
    );
  }
}

/** The tapered FFT periodogram of a gap-free monthly or annual series, in the period range. */
function fftSpectrum(p: SpectraParams, s: StoredSeries): SpectraResultIn {
  const grid = activityGrid(s);
  const gaps = grid.value.reduce((c, v) => c + (Number.isNaN(v) ? 1 : 0), 0);
  if (gaps > 0) {
    throw new InputProblem(
      "/method",
      `the FFT periodogram needs a gap-free series; this one has ${gaps} missing ` +
        `${grid.resolution === "monthly" ? "months" : "years"}: use lomb_scargle`,
      { missing: gaps },
    );
  }
  if (grid.value.length < 8) {
    throw new InputProblem("/series", "series too short: the FFT periodogram needs 8 points", {
      points: grid.value.length,
    });
  }
  const pg = fftPeriodogram(grid.value, grid.step, {
    taper: p.taper,
    tukeyFraction: p.tukey_fraction,
    detrend: p.detrend,
  });
  // default range: the Nyquist period 2Δt to the record length NΔt
  const lo = p.periods.min ?? 2 * grid.step;
  const hi = p.periods.max ?? grid.value.length * grid.step;
  checkRange(lo, hi);
  const { frequency: f, power: pw } = periodBand(pg.frequency, pg.power, lo, hi);
  if (f.length < 2) {
    throw new InputProblem(
      "/periods",
      `the period grid is empty: fewer than 2 FFT frequencies k/(N·Δt) fall between ${lo} ` +
        `and ${hi} years`,
    );
  }
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
    warnings: [],
    cautions: CAUTIONS,
  };
}

/** The finite samples of the series, refused when too few or constant. */
function samples(s: StoredSeries) {
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
      { values: tt.length },
    );
  }
  const time = Float64Array.from(tt), value = Float64Array.from(yy);
  if (value.every((v) => v === value[0])) {
    throw new InputProblem("/series", "the series is constant: it has no periodogram");
  }
  return { time, value };
}

/** The frequency grid of a Lomb–Scargle request (cycles per year), or a 422. */
function lombScargleGrid(p: SpectraParams, time: Float64Array) {
  if (p.period_list) {
    if (p.period_list.length === 0) {
      throw new InputProblem("/period_list", "the period grid is empty: give at least one period");
    }
    const f = Float64Array.from(p.period_list, (x) => 1 / x).sort();
    return { frequency: f, min: 1 / f[f.length - 1], max: 1 / f[0], spacing: "list" as const };
  }
  const span = time[time.length - 1] - time[0];
  const range = defaultPeriodRange(time);
  const lo = p.periods.min ?? range.min;
  const hi = p.periods.max ?? range.max;
  checkRange(lo, hi);
  const count = p.periods.count ?? Math.min(MAX_GRID, defaultGridCount(span, lo, hi));
  if (count < 1) {
    throw new InputProblem("/periods/count", "the period grid is empty: count must be at least 1");
  }
  const frequency = periodGrid({ minPeriod: lo, maxPeriod: hi, count, spacing: p.periods.spacing });
  return { frequency, min: lo, max: hi, spacing: p.periods.spacing };
}

/**
 * The size of a Lomb–Scargle request's work (for its cost model): finite samples, grid points,
 * and whether the grid is even in frequency (the periodogram's fast path); a 422 as the
 * computation would give one.
 */
export function lombScargleWork(p: SpectraParams, s: StoredSeries) {
  const { time } = samples(s);
  const g = lombScargleGrid(p, time);
  return {
    points: time.length,
    grid: g.frequency.length,
    even: p.period_list === undefined && p.periods.spacing === "frequency",
  };
}

/** Warnings on periods the sampling does not resolve. */
function gridWarnings(g: { min: number; max: number }, time: Float64Array): string[] {
  const warnings: string[] = [];
  const span = time[time.length - 1] - time[0];
  if (g.max > span) {
    warnings.push(`periods longer than the series' span (${span.toFixed(1)} yr) are not resolved`);
  }
  const nyquistPeriod = defaultPeriodRange(time).min;
  if (g.min < nyquistPeriod * (1 - 1e-9)) {
    warnings.push(
      `periods shorter than twice the median sampling interval (${
        nyquistPeriod.toPrecision(3)
      } yr) can be aliases of longer ones`,
    );
  }
  return warnings;
}

/**
 * The Lomb–Scargle power on the grid; large grids are split into fixed chunks of frequencies
 * (the same split whatever the number of workers, so the numbers do not depend on it) and
 * computed in parallel, in rounds (a cancel is seen between them, and inside a chunk).
 */
async function periodogram(
  p: SpectraParams,
  time: Float64Array,
  value: Float64Array,
  frequency: Float64Array,
  ctx: RunContext,
): Promise<Float64Array> {
  const K = frequency.length;
  if (time.length * K < PARALLEL_WORK) {
    return lombScargle(time, value, frequency, {
      normalization: p.normalization,
      shouldStop: ctx.cancelled,
    });
  }
  const chunks: LombScargleChunkInput[] = [];
  for (let k0 = 0; k0 < K; k0 += LS_CHUNK) {
    chunks.push({
      time,
      value,
      frequency: frequency.slice(k0, Math.min(K, k0 + LS_CHUNK)),
      normalization: p.normalization,
    });
  }
  const parts = await parallelInRounds<LombScargleChunkInput, Float64Array>(
    ctx,
    "spectral.lomb_scargle_chunk",
    chunks,
    { progress: [0, 0.1] },
  );
  const power = new Float64Array(K);
  let o = 0;
  for (const part of parts) {
    power.set(part, o);
    o += part.length;
  }
  return power;
}

/** The Monte Carlo null in chunks of replicates, probed at the peaks, combined. */
async function monteCarlo(
  p: SpectraParams,
  data: { time: Float64Array; value: Float64Array; frequency: Float64Array },
  peaks: SpectralPeak[],
  ctx: RunContext,
): Promise<MonteCarloPeakTests> {
  const probe = peaks.map((q) => q.index);
  const perReplicate = data.time.length * data.frequency.length;
  const per = Math.max(1, Math.min(MC_CHUNK, Math.floor(MC_CHUNK_WORK / perReplicate)));
  const inputs: MonteCarloMaximaInput[] = [];
  for (let r0 = 0; r0 < p.replicates; r0 += per) {
    inputs.push({
      ...data,
      seed: p.seed,
      replicates: Math.min(per, p.replicates - r0),
      firstReplicate: r0,
      normalization: p.normalization,
      null: p.monte_carlo_null,
      probe,
    });
  }
  const outs = await parallelInRounds<MonteCarloMaximaInput, MonteCarloNull>(
    ctx,
    "spectral.monte_carlo_maxima",
    inputs,
    { progress: [0.1, 0.95] },
  );
  return combineMonteCarloNull(outs, peaks.map((q) => q.power));
}

/** How the peaks were tested, and the power of the 1 % and 5 % false-alarm levels. */
function falseAlarmJson(
  p: SpectraParams,
  data: { time: Float64Array; value: Float64Array },
  m: number,
  analytic: boolean,
  mc: MonteCarloPeakTests | null,
) {
  const level = (fap: number) => ({
    fap,
    analytic: analytic ? powerAtFalseAlarm(fap, m) : null,
    monte_carlo: mc ? monteCarloPowerLevel(fap, mc.maxima) : null,
  });
  return {
    method: p.false_alarm,
    independent_frequencies: analytic ? m : null,
    independent_frequencies_source: "Horne & Baliunas 1986: M = -6.362 + 1.193 N + " +
      "0.00098 N^2",
    replicates: mc ? p.replicates : null,
    monte_carlo_tests: mc
      ? "false_alarm_monte_carlo: the grid's largest replicate power against the peak " +
        "(family-wise over every period searched); p_local_monte_carlo: the replicate power " +
        "at the peak's own period (one period tested)"
      : null,
    seed: mc ? p.seed : null,
    null_hypothesis: {
      analytic: "white noise",
      monte_carlo: mc
        ? (p.monte_carlo_null === "ar1"
          ? `red noise: AR(1) with persistence ${
            ar1Persistence(data.time, data.value).toPrecision(4)
          } yr and the series' variance`
          : "white noise: values permuted over the sampling times")
        : null,
    },
    levels: [level(0.01), level(0.05)],
  };
}

/** Lomb–Scargle periodogram on the requested grid, its peaks and their false-alarm tests. */
async function lombScargleSpectrum(
  p: SpectraParams,
  s: StoredSeries,
  ctx: RunContext,
): Promise<SpectraResultIn> {
  const { time, value } = samples(s);
  const g = lombScargleGrid(p, time);
  const warnings = gridWarnings(g, time);
  const power = await periodogram(p, time, value, g.frequency, ctx);
  ctx.progress(0.1);
  const peaks = findSpectralPeaks(g.frequency, power, { maxPeaks: p.max_peaks });
  const m = hornBaliunasFrequencies(time.length);
  const analytic = p.false_alarm !== "monte_carlo" && p.normalization === "horne_baliunas";
  if (p.false_alarm !== "monte_carlo" && !analytic) {
    warnings.push(
      "analytic false-alarm probabilities need normalization horne_baliunas; none reported",
    );
  }
  const mc = p.false_alarm === "horne_baliunas"
    ? null
    : await monteCarlo(p, { time, value, frequency: g.frequency }, peaks, ctx);
  const pk = peaks.map((q, j) => ({
    ...peakJson(
      q,
      analytic ? falseAlarmProbability(q.power, m) : null,
      mc ? monteCarloFalseAlarm(q.power, mc.maxima) : null,
    ),
    p_local_monte_carlo: mc?.localP[j] ?? null,
  }));
  return {
    input: { id: s.id, name: s.name, quantity: s.quantity, n: time.length },
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
    false_alarm: falseAlarmJson(p, { time, value }, m, analytic, mc),
    warnings,
    cautions: CAUTIONS,
  };
}
