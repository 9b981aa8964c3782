/**
 * Pieces shared by the solar–climate run kinds (lag correlations, attributions, composites,
 * energy balance): request fragments, bringing several series onto one gap-free calendar
 * axis, and the cautions every such result carries.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { InputProblem, type OutputSeries, type RunContext } from "../runs/kind.ts";
import type { StoredSeries } from "../store/types.ts";
import { alignSeries } from "../../core/series/mod.ts";
import { formatIsoTime, inferResolution } from "../../core/time/mod.ts";

/** A run id (UUIDv7). */
export const RUN_ID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;

/** Outputs a solar input may be taken from, in order of preference. */
const SOLAR_OUTPUTS = ["tsi", "forcing"];

/**
 * A solar series taken from another run's output: a TSI reconstruction (`tsi`) or a forcing
 * run (`forcing`), as a series-like object for the alignment (null values become gaps).
 *
 * @param ctx the run context (the run must be listed by the kind's runRefs)
 * @param id run id
 * @param pointer JSON Pointer of the field, for problems
 */
export function seriesFromRun(ctx: RunContext, id: string, pointer: string): StoredSeries {
  const run = ctx.run(id);
  const outputs = run.result?.outputs as Record<string, OutputSeries> | undefined;
  const name = SOLAR_OUTPUTS.find((k) => outputs?.[k]);
  if (!outputs || !name) {
    throw new InputProblem(
      pointer,
      `run ${id} (${run.kind}) has no ${
        SOLAR_OUTPUTS.join(" or ")
      } output to use as a solar series`,
    );
  }
  const o = outputs[name];
  if (o.time.length < 2) {
    throw new InputProblem(pointer, `output ${name} of run ${id} is too short`);
  }
  const time = Float64Array.from(o.time);
  const value = Float64Array.from(o.value, (v) => (v === null ? NaN : v));
  return {
    id: `run:${id}/${name}`,
    name: o.name,
    quantity: o.quantity,
    units: o.units,
    description: o.description ?? null,
    source: `output ${name} of run ${id}`,
    version: null,
    resolution: inferResolution(time),
    n: time.length,
    start: time[0],
    end: time[time.length - 1],
    derived_from: id,
    created_at: run.created_at,
    time,
    value,
    uncertainty: null,
  };
}

/** Resolution of the common axis of a solar–climate analysis. */
export const AnalysisResolution = z.enum(["monthly", "annual"]).optional().openapi({
  description: "Common time axis: calendar-month or calendar-year means (default: the " +
    "coarsest input resolution). Finer inputs are averaged with the coverage rules below.",
  example: "monthly",
});

/** Coverage rules passed to the alignment (the same defaults as resampling). */
export const CoverageFields = {
  min_days_per_month: z.number().int().min(1).max(31).default(20).openapi({
    description: "Daily values a month needs for a monthly mean (daily inputs)",
  }),
  min_months_per_year: z.number().int().min(1).max(12).default(10).openapi({
    description: "Monthly values a year needs for an annual mean",
  }),
};

/** Preprocessing applied to observations and surrogates alike. */
export const PreprocessField = z.enum(["mean", "linear", "quadratic", "high_pass"]).openapi({
  description: "Removed from every series before the analysis (and from every surrogate): " +
    "the mean, a linear or quadratic trend in time, or variations slower than " +
    "`high_pass_cutoff_years` (Gaussian high-pass, half power at the cutoff).",
});

export const CAUTION_CORRELATION =
  "Correlation is not attribution: a statistical association with the solar series does not " +
  "show that the Sun caused the variation, and other forcings with similar timing can alias " +
  "into it.";
export const CAUTION_REVIEW =
  "These results do not replace peer-reviewed assessment of solar influence on climate.";
export const CAUTION_PRE_SATELLITE =
  "Solar irradiance before the satellite era (before 1978) is a reconstruction and is " +
  "model-dependent; results that rely on it inherit that dependence.";

/** Cautions for a set of solar inputs: the pre-satellite caution when a TSI or forcing
 * series reaches back before 1978. */
export function solarCautions(solar: StoredSeries[]): string[] {
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

const RANK = { daily: 0, monthly: 1, annual: 2 } as const;

/** Series on one gap-free calendar axis. */
export interface AnalysisAxis {
  resolution: "monthly" | "annual";
  /** Sampling step in years (1/12 or 1). */
  step: number;
  /** Unit of lags and windows in samples. */
  lagUnit: "months" | "years";
  /** Period middles, decimal years. */
  time: Float64Array;
  /** One array per input, no gaps. */
  values: Float64Array[];
  start_period: string;
  end_period: string;
  warnings: string[];
}

/**
 * Align `inputs` on one monthly or annual axis (same-period means with coverage rules), then
 * keep the longest stretch of consecutive periods where every series has a value. Gaps are
 * never filled; what is dropped is reported in `warnings`.
 *
 * @param inputs the stored series
 * @param pointers JSON Pointer of each input in the request (for problems)
 * @param requested requested resolution, or undefined for the coarsest input resolution
 * @param coverage coverage thresholds
 * @param minPoints fewest common periods accepted
 */
export function analysisAxis(
  inputs: StoredSeries[],
  pointers: string[],
  requested: "monthly" | "annual" | undefined,
  coverage: { min_days_per_month: number; min_months_per_year: number },
  minPoints = 10,
): AnalysisAxis {
  let to = requested;
  if (to === undefined) {
    to = "monthly";
    for (const s of inputs) if (s.resolution === "annual") to = "annual";
  }
  inputs.forEach((s, k) => {
    if (s.resolution !== "irregular" && RANK[s.resolution] > RANK[to!]) {
      throw new InputProblem(
        pointers[k],
        `series "${s.name}" is ${s.resolution}, coarser than the requested ${to} axis; ` +
          "the analysis only averages, it never interpolates",
      );
    }
  });
  let aligned;
  try {
    aligned = alignSeries(inputs, to, {
      rule: "common_span",
      minDaysPerMonth: coverage.min_days_per_month,
      minMonthsPerYear: coverage.min_months_per_year,
    });
  } catch (e) {
    if (e instanceof RangeError) {
      throw new InputProblem(
        pointers[1] ?? pointers[0],
        `no overlap at ${to} resolution: ${e.message}`,
      );
    }
    throw e;
  }
  const n = aligned.time.length;
  // longest run of consecutive periods where every series is finite
  let bestStart = 0, bestLen = 0, runStart = 0;
  for (let i = 0; i <= n; i++) {
    const ok = i < n && aligned.values.every((v) => Number.isFinite(v[i]));
    if (!ok) {
      if (i - runStart > bestLen) {
        bestLen = i - runStart;
        bestStart = runStart;
      }
      runStart = i + 1;
    }
  }
  if (bestLen < minPoints) {
    throw new InputProblem(
      pointers[1] ?? pointers[0],
      `the series overlap in only ${bestLen} consecutive ${to} period(s) with values; ` +
        `the analysis needs at least ${minPoints}`,
    );
  }
  const warnings: string[] = [];
  if (bestLen < n) {
    warnings.push(
      `${n - bestLen} ${to} period(s) of the common span were left out: gaps are not filled, ` +
        `so the analysis uses the longest gap-free stretch (${bestLen} periods)`,
    );
  }
  const time = aligned.time.slice(bestStart, bestStart + bestLen);
  return {
    resolution: to,
    step: to === "monthly" ? 1 / 12 : 1,
    lagUnit: to === "monthly" ? "months" : "years",
    time,
    values: aligned.values.map((v) => v.slice(bestStart, bestStart + bestLen)),
    start_period: formatIsoTime(time[0], to),
    end_period: formatIsoTime(time[time.length - 1], to),
    warnings,
  };
}

/** Typed array → JSON array (non-finite → null). */
export function jsonArray(a: ArrayLike<number>): (number | null)[] {
  return Array.from(a, (x) => (Number.isFinite(x) ? x : null));
}

/** A number or null for JSON. */
export function jsonNumber(x: number | null | undefined): number | null {
  return x === null || x === undefined || !Number.isFinite(x) ? null : x;
}
