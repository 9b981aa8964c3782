/**
 * The inputs of a proxy reconstruction, shared by the TSI and the spectral reconstructions:
 * the target cells of the period, each model term's direct proxy averaged into them, the
 * sunspot series on the model's version and the terms mapped from it, the stored model as
 * core reads it, and the warnings about coverage and extrapolation.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import {
  countBeyondMappingRange,
  countFarOutsideRange,
  type Reconstruction,
  type ReconstructionCells,
  type ReconstructionCoverage,
  type ReconstructionModel,
  SOURCE_BACK_EXTENDED,
  SUNSPOT_SCALE_CORRELATION_YEARS,
} from "../../../core/irradiance/mod.ts";
import { type SunspotErrors, sunspotErrors, SunspotUncertaintyRequest } from "./sunspot_errors.ts";
import {
  convertSunspotNumberVersion,
  periodKeyRange,
  periodSequence,
  resampledAtPeriodKeys,
} from "../../../core/series/mod.ts";
import type { CalendarResolution, TimeResolution } from "../../../core/time/mod.ts";
import type { RunContext } from "../../runs/kind.ts";
import { InputProblem } from "../../runs/kind.ts";
import { refId, SeriesRef } from "../../schemas/series_ref.ts";
import { parsePeriod, PeriodInput, type YearSpan } from "./time_period.ts";
import { withInputPointers } from "./input_problem.ts";
import { requireSunspotVersion } from "./sunspot_series.ts";
import type { IrradianceModelJson, SunspotMappingsJson } from "../irradiance_models/result.ts";
import { mappingFromJson } from "../irradiance_models/mapping_json.ts";
import { applySunspotConversion, SunspotConversion } from "../../schemas/sunspot_conversion.ts";

/** The request fields every proxy reconstruction takes (spread into its request schema). */
export const ReconstructionInputFields = {
  proxies: z.array(z.object({
    term: z.string().min(1).max(40).openapi({ description: "A term name of the model" }),
    series: SeriesRef,
  })).max(6).default([]).openapi({
    description: "Direct proxy series per model term; where a term has no value the " +
      "reconstruction back-extends from sunspot_number",
  }),
  sunspot_number: SeriesRef.optional().openapi({
    description: "Sunspot-number series for back-extension; its version must match the " +
      "model's unless `sunspot_conversion` is given",
  }),
  sunspot_conversion: SunspotConversion.optional().openapi({
    description: "How to put the sunspot series on the model's version: " +
      '`{"method": "published"}` (the time-dependent conversion between versions 1 and 2) ' +
      'or a constant `{"factor": f}` (warned about when the series crosses 1849, 1868 or ' +
      "1947, where the ratio of the versions changes)",
  }),
  period: PeriodInput.openapi({
    description: "The cells are every day, month or year from the one holding the start to " +
      "the one holding the last instant before the end: ISO bounds name whole periods, so " +
      '"2001-01" to "2001-12" is 12 months and "2001-01-01" to "2001-01-31" is 31 days',
  }),
  resolution: z.enum(["daily", "monthly", "annual"]).default("monthly"),
  level: z.number().min(0.5).max(0.999).default(0.95).openapi({
    description: "Level of the prediction intervals",
  }),
  sunspot_uncertainty: SunspotUncertaintyRequest.default({
    source: "auto",
    multiplier: 1,
    correlation_years: SUNSPOT_SCALE_CORRELATION_YEARS,
  }),
};

/** The parsed reconstruction input fields. */
export interface ReconstructionInputParams {
  proxies: { term: string; series: SeriesRef }[];
  sunspot_number?: SeriesRef;
  sunspot_conversion?: SunspotConversion;
  period: z.output<typeof PeriodInput>;
  resolution: CalendarResolution;
  level: number;
  sunspot_uncertainty: z.output<typeof SunspotUncertaintyRequest>;
}

/** A duplicate term among the proxies: an issue at /proxies/i/term (for a superRefine). */
export function duplicateProxyTerms(
  proxies: { term: string }[],
  addIssue: (issue: { code: "custom"; path: (string | number)[]; message: string }) => void,
): void {
  const seen = new Set<string>();
  proxies.forEach((p, i) => {
    if (seen.has(p.term)) {
      addIssue({ code: "custom", path: ["proxies", i, "term"], message: "duplicate term" });
    }
    seen.add(p.term);
  });
}

/** The stored proxy model a reconstruction applies (a TSI model's `model` and `mappings`). */
export interface StoredProxyModel {
  model: IrradianceModelJson;
  mappings: SunspotMappingsJson | null;
}

const RANK: Record<TimeResolution, number> = { daily: 0, monthly: 1, annual: 2, irregular: 3 };

/** The target cells: keys, middles and lengths. */
export interface TargetCells {
  span: YearSpan;
  resolution: CalendarResolution;
  keys: Int32Array;
  time: Float64Array;
  days: Float64Array;
}

/** The sunspot series on the model's version, averaged into the cells. */
export interface SunspotInput {
  series: { time: Float64Array; value: ArrayLike<number> };
  atCells: Float64Array;
  resolution: TimeResolution;
  conversion: string | null;
  /**
   * The yardstick of the amplitude check: the series on the model's version by the published
   * time-dependent conversion (as given when the versions match), in the cells.
   */
  reference: { atCells: Float64Array; conversion: string };
  warnings: string[];
  /** Its own error, as propagated. */
  errors: SunspotErrors;
}

/**
 * The cells of the period: from the one holding its start to the one before its end; a 422 at
 * /period when there are more than `maxCells`.
 */
export function targetCells(params: ReconstructionInputParams, maxCells: number): TargetCells {
  const span = parsePeriod(params.period, "/period");
  const resolution = params.resolution;
  const range = withInputPointers(
    { start: "/period/start", end: "/period/end", "*": "/period" },
    () => periodKeyRange(span.start, span.end, resolution),
  );
  if (range.count > maxCells) {
    throw new InputProblem(
      "/period",
      `the period has ${range.count} ${resolution} cells; at most ${maxCells}`,
      { cells: range.count, max_cells: maxCells },
    );
  }
  const keys = new Int32Array(range.count);
  for (let i = 0; i < range.count; i++) keys[i] = range.first + i;
  const seq = periodSequence(range.first, range.last, resolution);
  return { span, resolution, keys, time: seq.middle, days: seq.days };
}

/** Each model term's direct proxy averaged into the cells (NaN where it has no value). */
export function directProxies(
  params: ReconstructionInputParams,
  ctx: RunContext,
  stored: StoredProxyModel,
  cells: TargetCells,
): Float64Array[] {
  const names = stored.model.terms.map((t) => t.name);
  params.proxies.forEach((p, i) => {
    if (!names.includes(p.term)) {
      throw new InputProblem(
        `/proxies/${i}/term`,
        `the model has no term "${p.term}"; its terms are ${names.join(", ")}`,
        { terms: names },
      );
    }
  });
  return stored.model.terms.map((t) => {
    const p = params.proxies.find((q) => q.term === t.name);
    if (!p) return new Float64Array(cells.keys.length).fill(NaN);
    const s = ctx.series(refId(p.series));
    return cellMeans(s, s.resolution, cells);
  });
}

/**
 * The sunspot series: version check against the model's mappings (`modelLabel` names the
 * model in messages), optional conversion (the published time-dependent one, or a constant
 * factor), cell means, and the amplitude check's yardstick.
 */
export function sunspotInput(
  params: ReconstructionInputParams,
  ctx: RunContext,
  stored: StoredProxyModel,
  cells: TargetCells,
  modelLabel: string,
): SunspotInput {
  const ss = ctx.series(refId(params.sunspot_number!));
  const version = requireSunspotVersion(ss, "/sunspot_number");
  const mappings = stored.mappings;
  if (!mappings) {
    throw new InputProblem(
      "/sunspot_number",
      `${modelLabel} was calibrated without a sunspot series, so it has no sunspot → proxy mappings; calibrate with sunspot_number to back-extend`,
      { reason: "no_mappings" },
    );
  }
  const target = mappings.sunspot_version;
  let value: ArrayLike<number> = ss.value;
  let conversion: string | null = null;
  const warnings: string[] = [];
  if (version !== target) {
    if (!params.sunspot_conversion) {
      throw new InputProblem(
        "/sunspot_number",
        `the sunspot series is version "${version}" but the model was calibrated with version "${target}"; supply the matching version, or sunspot_conversion {"method": "published"} for the published time-dependent conversion between versions 1 and 2 (Clette et al. 2014; V2 ≈ V1/0.6 before 1947 and V1/(0.6 × 1.18) after), or a constant {"factor": f}`,
        { reason: "version_mismatch", version, model_version: target },
      );
    }
    const c = applySunspotConversion(
      ss,
      version,
      target,
      params.sunspot_conversion,
      "/sunspot_conversion",
    );
    value = c.value;
    conversion = c.label;
    warnings.push(...c.warnings);
  } else if (params.sunspot_conversion) {
    warnings.push(
      `sunspot_conversion was ignored: the series is already version ${version}, as the model.`,
    );
  }
  const series = { time: ss.time, value };
  const atCells = cellMeans(series, ss.resolution, cells);
  // the series' own σ on the model's version: the conversion is a factor at each time
  const ownSd = ss.uncertainty && version !== target
    ? applySunspotConversion(
      { time: ss.time, value: ss.uncertainty },
      version,
      target,
      params.sunspot_conversion!,
      "/sunspot_conversion",
    ).value
    : ss.uncertainty;
  return {
    series,
    atCells,
    resolution: ss.resolution,
    conversion,
    reference: referenceSunspots(ss, version, target, conversion, atCells, cells),
    warnings,
    errors: sunspotErrors(params, ss, value, ownSd, cells.resolution, cells.keys),
  };
}

/**
 * The sunspot series of the amplitude check's yardstick: on the model's version by the
 * published time-dependent conversion, whatever the request chose; as given when the versions
 * match; the request's own conversion between versions the published one does not cover.
 */
function referenceSunspots(
  ss: { time: Float64Array; value: Float64Array; resolution: TimeResolution },
  version: string,
  target: string,
  requested: string | null,
  atCells: Float64Array,
  cells: TargetCells,
): SunspotInput["reference"] {
  if (version === target) {
    return { atCells, conversion: `as given (version ${version}, as the model)` };
  }
  const v12 = (v: string): v is "1" | "2" => v === "1" || v === "2";
  if (!v12(version) || !v12(target)) {
    return {
      atCells,
      conversion: `by the request's conversion (${requested}); no published conversion ` +
        `between versions "${version}" and "${target}", so a wrong factor is not detected`,
    };
  }
  const value = convertSunspotNumberVersion(ss.time, ss.value, version, target);
  return {
    atCells: cellMeans({ time: ss.time, value }, ss.resolution, cells),
    conversion: `put on version ${target} by the published time-dependent conversion ` +
      "(Clette et al. 2014; Clette & Lefèvre 2016)",
  };
}

/**
 * A series averaged into the cells with the coverage rule of core/series (a monthly cell from
 * daily values needs 20 of them, an annual cell 10 covered months; a partial year at an end is
 * no cell).
 */
export function cellMeans(
  series: { time: ArrayLike<number>; value: ArrayLike<number> },
  from: TimeResolution,
  cells: TargetCells,
): Float64Array {
  return resampledAtPeriodKeys(series, from, cells.resolution, cells.keys);
}

/** Each model term's sunspot → proxy mapping (null without a sunspot series). */
export function termMappings(
  stored: StoredProxyModel,
  sunspot: unknown | null,
): ReconstructionCells["mappings"] {
  return stored.model.terms.map((t) =>
    sunspot && stored.mappings ? mappingFromJson(stored.mappings.terms[t.name].chosen) : null
  );
}

/** The cells as core reconstructs them: direct proxies, mappings, sunspot numbers and their error. */
export function reconstructionCells(
  stored: StoredProxyModel,
  cells: TargetCells,
  direct: Float64Array[],
  sunspot: SunspotInput | null,
): ReconstructionCells {
  return {
    days: cells.days,
    direct,
    mappings: termMappings(stored, sunspot),
    sunspot: sunspot?.atCells ?? null,
    sunspotUncertainty: sunspot?.errors.cells ?? null,
  };
}

/** The stored model (and its back-extension residual process) as core reads it. */
export function reconstructionModel(stored: StoredProxyModel): ReconstructionModel {
  const m = stored.model, be = stored.mappings?.back_extension;
  return {
    coefficients: m.coefficients,
    covariance: m.covariance,
    terms: m.terms.map((t) => ({ role: t.role, quietLevel: t.quiet_level })),
    psiReference: m.psi_reference,
    residualSd: m.residual_sd,
    rho: m.rho,
    stepDays: m.step_days,
    backExtension: be ? { residualSd: be.residual_sd, rho: be.rho, stepDays: be.step_days } : null,
  };
}

/** Where a reconstruction's values come from, as results store it. */
export function coverageJson(c: ReconstructionCoverage) {
  return {
    cells: c.cells,
    direct: c.direct,
    back_extended: c.backExtended,
    missing: c.missing,
  };
}

/** Cells without a value, and why a coarse sunspot series leaves some. */
export function coverageWarnings(
  missing: number,
  cells: TargetCells,
  sunspot: SunspotInput | null,
): string[] {
  if (missing === 0) return [];
  const res = cells.resolution;
  const coarse = sunspot && RANK[sunspot.resolution] > RANK[res]
    ? ` The sunspot series is ${sunspot.resolution}, coarser than the requested ${res} cells, so back-extension fills only the cells that hold one of its points; request ${sunspot.resolution} or coarser resolution for the sunspot-only era.`
    : "";
  return [
    `${missing} of ${cells.keys.length} ${res} cells have no value (a proxy and the sunspot series are both missing there).${coarse}`,
  ];
}

/** Proxies far outside their calibration range, and sunspot numbers beyond the mappings'. */
export function extrapolationWarnings(
  stored: StoredProxyModel,
  direct: Float64Array[],
  sunspot: SunspotInput | null,
  rec: Pick<Reconstruction, "source">,
): string[] {
  const warnings: string[] = [];
  stored.model.terms.forEach((t, k) => {
    const c = countFarOutsideRange(direct[k], t.min, t.max);
    if (c > 0) {
      warnings.push(
        `Term ${t.name}: ${c} cells lie far outside the calibration range [${t.min}, ${t.max}] (by more than a quarter of the range); the linear model is extrapolated there.`,
      );
    }
  });
  const mappings = stored.mappings;
  if (sunspot && mappings) {
    const m = Object.values(mappings.terms)[0].chosen;
    const back = rec.source.map((s) => (s === SOURCE_BACK_EXTENDED ? 1 : 0));
    const c = countBeyondMappingRange(sunspot.atCells, back, m.sunspot_max);
    if (c > 0) {
      warnings.push(
        `${c} back-extended cells have sunspot numbers above 1.25 × the largest in the mapping fit (${
          m.sunspot_max.toFixed(1)
        }); the mappings are extrapolated there.`,
      );
    }
  }
  return warnings;
}

/**
 * The time axis, values, uncertainty and interval of a reconstruction as an output series
 * holds them (rounded to 1e-6 by {@link micro}), with the interval's level in words; an
 * ensemble's band, when given, replaces the analytic one (a cell without a central value has
 * no band either).
 */
export function reconstructionOutputParts(
  cells: TargetCells,
  rec: Reconstruction,
  level: number,
  members: { sd: Float64Array; lower: Float64Array; upper: Float64Array; interval: string } | null =
    null,
) {
  const pct = level === 0.95 ? "95 %" : `${(level * 100).toFixed(1)} %`;
  return {
    time: Array.from(cells.time),
    value: micro(rec.value),
    uncertainty: micro(members?.sd ?? rec.sd, rec.value),
    lower: micro(members?.lower ?? rec.lower, rec.value),
    upper: micro(members?.upper ?? rec.upper, rec.value),
    interval: members?.interval ?? `${pct} prediction interval`,
  };
}

/**
 * Round to 1e-6 (W m-2 for irradiance: far below any interval width, and a third shorter in
 * JSON); null where the cell has no value (NaN in `x`, or, given `gaps`, not finite there).
 * One loop, no intermediate array: a daily reconstruction has hundreds of thousands of cells.
 */
export function micro(x: ArrayLike<number>, gaps?: ArrayLike<number>): (number | null)[] {
  const out = new Array<number | null>(x.length);
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    out[i] = Number.isNaN(v) || (gaps !== undefined && !Number.isFinite(gaps[i]))
      ? null
      : Math.round(v * 1e6) / 1e6;
  }
  return out;
}
