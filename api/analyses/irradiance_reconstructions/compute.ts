/**
 * Adapter of the "irradiance-reconstructions" analysis: the target cells of the period
 * (core/series), the proxies and sunspot numbers averaged into them, the back-extension
 * mappings, the reconstruction with prediction intervals
 * (core/irradiance/proxy_reconstruction.ts), the optional background scenario
 * (secular_background.ts), the plausibility checks, and the result.
 *
 * @module
 */
import type { RunContext } from "../../runs/kind.ts";
import { InputProblem } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import {
  countBeyondMappingRange,
  countFarOutsideRange,
  evaluateSunspotMapping,
  predictionQuantile,
  reconstructFromProxies,
  type Reconstruction,
  type ReconstructionCells,
  reconstructionCoverage,
  type ReconstructionModel,
  secularBackground,
  SOURCE_BACK_EXTENDED,
  tsiCycleAmplitude,
  withSecularBackground,
} from "../../../core/irradiance/mod.ts";
import {
  convertSunspotNumberVersion,
  periodKeyRange,
  periodSequence,
  resampledAtPeriodKeys,
} from "../../../core/series/mod.ts";
import { normalQuantile } from "../../../core/stats/distributions.ts";
import type { CalendarResolution, TimeResolution } from "../../../core/time/mod.ts";
import { parsePeriod, type YearSpan } from "../common/time_period.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { requireSunspotVersion } from "../common/sunspot_series.ts";
import {
  ASSESSMENT_CAUTION,
  PRE_SATELLITE_CAUTION,
  quietSunWarning,
} from "../common/irradiance_notes.ts";
import { applySunspotConversion } from "../../schemas/sunspot_conversion.ts";
import { cycleAmplitudeCheck } from "./amplitude_check.ts";
import { irradianceModels } from "../irradiance_models/mod.ts";
import type { ModelResultOut } from "../irradiance_models/result.ts";
import { mappingFromJson } from "../irradiance_models/mapping_json.ts";
import { cycleAmplitudeJson } from "../common/tsi_cycle_amplitude.ts";
import type { ReconstructionParams } from "./request.ts";
import type { ReconstructionResultIn } from "./result.ts";

/** Most cells a reconstruction may have. */
const MAX_CELLS = 400_000;

const RANK: Record<TimeResolution, number> = { daily: 0, monthly: 1, annual: 2, irregular: 3 };

/** The target cells: keys, middles and lengths. */
interface TargetCells {
  span: YearSpan;
  resolution: CalendarResolution;
  keys: Int32Array;
  time: Float64Array;
  days: Float64Array;
}

/** The sunspot series on the model's version, averaged into the cells. */
interface SunspotInput {
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
}

/** Reconstruct TSI over the period from the model run and the proxies. */
export function computeReconstruction(
  params: ReconstructionParams,
  ctx: RunContext,
): ReconstructionResultIn {
  const stored = ctx.resultOf(irradianceModels, params.model, "/model");
  const cells = targetCells(params);
  const direct = directProxies(params, ctx, stored, cells);
  const sunspot = params.sunspot_number === undefined
    ? null
    : sunspotInput(params, ctx, stored, cells);
  const mapped = mappedProxies(stored, sunspot?.atCells ?? null, cells.keys.length);
  if (!direct.some((d) => d.some(Number.isFinite)) && !sunspot?.atCells.some(Number.isFinite)) {
    throw new InputProblem(
      "/period",
      `the period [${cells.span.start.toFixed(3)}, ${
        cells.span.end.toFixed(3)
      }) is outside the coverage of every proxy and of the sunspot series`,
      { reason: "no_overlap" },
    );
  }
  const z = predictionQuantile(params.level, stored.model.df_residual);
  const proxyOnly = reconstructFromProxies(
    reconstructionModel(stored),
    { days: cells.days, direct, mapped },
    z,
  );
  const { rec, scenario } = background(params, stored, sunspot, cells, proxyOnly);
  const coverage = reconstructionCoverage(rec, cells.time);
  if (coverage.direct.cells + coverage.backExtended.cells === 0) {
    throw new InputProblem(
      "/period",
      "no cell of the period has every model proxy (directly or mapped from sunspot number)",
      { reason: "no_overlap" },
    );
  }
  const amp = tsiCycleAmplitude(cells.time, rec.value);
  const check = cycleAmplitudeCheck(
    cells.time,
    proxyOnly.value,
    proxyOnly.source,
    amp,
    sunspot && {
      value: reconstructFromProxies(reconstructionModel(stored), {
        days: cells.days,
        direct: direct.map(() => new Float64Array(cells.keys.length).fill(NaN)),
        mapped: mappedProxies(stored, sunspot.reference.atCells, cells.keys.length),
      }, z).value,
      conversion: sunspot.reference.conversion,
    },
  );
  const warnings = [
    ...(sunspot?.warnings ?? []),
    ...coverageWarnings(coverage.missing, cells, sunspot),
    ...extrapolationWarnings(stored, direct, sunspot, rec),
    ...check.warnings,
    ...quietSunWarning(stored.model.quiet_sun.value),
  ];
  return {
    model: params.model,
    resolution: cells.resolution,
    period: cells.span,
    level: params.level,
    interval_quantile: z,
    normal_quantile: normalQuantile(1 - (1 - params.level) / 2),
    scenario,
    sunspot_conversion: sunspot?.conversion ?? null,
    coverage: {
      cells: coverage.cells,
      direct: coverage.direct,
      back_extended: coverage.backExtended,
      missing: coverage.missing,
    },
    source_segments: coverage.segments,
    cycle_amplitude: cycleAmplitudeJson(amp),
    cycle_amplitude_check: check.json,
    outputs: { tsi: tsiOutput(params, cells, rec, scenario.label) },
    warnings,
    cautions: [...RECONSTRUCTION_CAUTIONS, `Background scenario: ${scenario.label}`],
  };
}

/** Cautions every reconstruction carries, before its background label. */
const RECONSTRUCTION_CAUTIONS = [
  PRE_SATELLITE_CAUTION,
  ASSESSMENT_CAUTION,
  "Intervals of monthly and annual means assume AR(1) residuals; residuals with longer memory (instrument drifts, slow facular changes) would make them wider.",
];

/** Each model term mapped from the cells' sunspot numbers (null without a sunspot series). */
function mappedProxies(
  stored: ModelResultOut,
  sunspotAtCells: Float64Array | null,
  n: number,
): ReconstructionCells["mapped"] {
  return stored.model.terms.map((t) => {
    if (!sunspotAtCells || !stored.mappings) return null;
    const value = new Float64Array(n), paramVariance = new Float64Array(n);
    const m = mappingFromJson(stored.mappings.terms[t.name].chosen);
    evaluateSunspotMapping(m, sunspotAtCells, value, paramVariance);
    return { value, paramVariance };
  });
}

/** The reconstructed TSI as a series-like output, rounded to 1e-6 W m-2. */
function tsiOutput(
  params: ReconstructionParams,
  cells: TargetCells,
  rec: Reconstruction,
  scenarioLabel: string,
): ReconstructionResultIn["outputs"]["tsi"] {
  const level = params.level === 0.95 ? "95 %" : `${(params.level * 100).toFixed(1)} %`;
  return {
    name: "Reconstructed TSI",
    quantity: "tsi",
    units: "W m-2",
    time: Array.from(cells.time),
    value: micro(rec.value),
    uncertainty: micro(rec.sd),
    lower: micro(rec.lower),
    upper: micro(rec.upper),
    interval: `${level} prediction interval`,
    description:
      `Model run ${params.model}, ${cells.resolution} means, values rounded to 1e-6 W m-2; ${scenarioLabel}`,
  };
}

/** The cells of the period: from the one holding its start to the one before its end. */
function targetCells(params: ReconstructionParams): TargetCells {
  const span = parsePeriod(params.period, "/period");
  const resolution = params.resolution;
  const range = withInputPointers(
    { start: "/period/start", end: "/period/end", "*": "/period" },
    () => periodKeyRange(span.start, span.end, resolution),
  );
  if (range.count > MAX_CELLS) {
    throw new InputProblem(
      "/period",
      `the period has ${range.count} ${resolution} cells; at most ${MAX_CELLS}`,
      { cells: range.count },
    );
  }
  const keys = new Int32Array(range.count);
  for (let i = 0; i < range.count; i++) keys[i] = range.first + i;
  const seq = periodSequence(range.first, range.last, resolution);
  return { span, resolution, keys, time: seq.middle, days: seq.days };
}

/** Each model term's direct proxy averaged into the cells (NaN where it has no value). */
function directProxies(
  params: ReconstructionParams,
  ctx: RunContext,
  stored: ModelResultOut,
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

/** The sunspot series: version check, optional conversion, cell means. */
function sunspotInput(
  params: ReconstructionParams,
  ctx: RunContext,
  stored: ModelResultOut,
  cells: TargetCells,
): SunspotInput {
  const ss = ctx.series(refId(params.sunspot_number!));
  const version = requireSunspotVersion(ss, "/sunspot_number");
  const mappings = stored.mappings;
  if (!mappings) {
    throw new InputProblem(
      "/sunspot_number",
      `model run ${params.model} was calibrated without a sunspot series, so it has no sunspot → proxy mappings; calibrate with sunspot_number to back-extend`,
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
  return {
    series,
    atCells,
    resolution: ss.resolution,
    conversion,
    reference: referenceSunspots(ss, version, target, conversion, atCells, cells),
    warnings,
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
function cellMeans(
  series: { time: ArrayLike<number>; value: ArrayLike<number> },
  from: TimeResolution,
  cells: TargetCells,
): Float64Array {
  return resampledAtPeriodKeys(series, from, cells.resolution, cells.keys);
}

/** The stored model (and its back-extension residual process) as core reads it. */
function reconstructionModel(stored: ModelResultOut): ReconstructionModel {
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

type Scenario = ReconstructionResultIn["scenario"];

/** The optional secular background scenario, added to the reconstruction and labelled. */
function background(
  params: ReconstructionParams,
  stored: ModelResultOut,
  sunspot: SunspotInput | null,
  cells: TargetCells,
  rec: Reconstruction,
): { rec: Reconstruction; scenario: Scenario } {
  const bg = params.background;
  if (bg.kind === "none") {
    return {
      rec,
      scenario: {
        kind: "none",
        label:
          "No secular background: the reconstruction contains only the proxy-driven variability.",
      },
    };
  }
  if (!sunspot) {
    throw new InputProblem(
      "/background",
      "the sunspot_running_mean background needs a sunspot_number series",
      { reason: "needs_sunspot_number" },
    );
  }
  const referenceMinimum = parsePeriod(bg.reference_minimum, "/background/reference_minimum");
  const laterPeriod = parsePeriod(bg.later_period, "/background/later_period");
  const b = withInputPointers({
    referenceMinimum: "/background/reference_minimum",
    laterPeriod: "/background/later_period",
    windowYears: "/background/window_years",
    "*": "/background",
  }, () =>
    secularBackground(sunspot.series.time, sunspot.series.value, {
      windowYears: bg.window_years,
      referenceMinimum,
      laterPeriod,
      deltaTsi: bg.delta_tsi,
      calibrationPeriod: stored.model.calibration_period,
    }));
  const atCells = cellMeans(
    { time: sunspot.series.time, value: b.value },
    sunspot.resolution,
    cells,
  );
  return {
    rec: withSecularBackground(rec, atCells),
    scenario: {
      kind: "sunspot_running_mean",
      label:
        `SCENARIO: secular background proportional to the ${bg.window_years}-year running mean of sunspot number, ΔTSI = ${bg.delta_tsi} W m-2 from the reference minimum to the later period; the band does not include the (large) uncertainty of this choice`,
      scale: b.scale,
      reference_mean: b.referenceMean,
      later_mean: b.laterMean,
      calibration_mean: b.calibrationMean,
    },
  };
}

/** Cells without a value, and why a coarse sunspot series leaves some. */
function coverageWarnings(
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
function extrapolationWarnings(
  stored: ModelResultOut,
  direct: Float64Array[],
  sunspot: SunspotInput | null,
  rec: Reconstruction,
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

/** Round to 1e-6 W m-2 (far below any interval width, and a third shorter in JSON); null where
 * the cell has no value. */
function micro(x: ArrayLike<number>): (number | null)[] {
  const out = new Array<number | null>(x.length);
  for (let i = 0; i < x.length; i++) {
    out[i] = Number.isNaN(x[i]) ? null : Math.round(x[i] * 1e6) / 1e6;
  }
  return out;
}
