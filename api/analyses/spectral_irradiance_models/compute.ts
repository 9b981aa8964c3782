/**
 * Adapter of the "spectral-irradiance-models" analysis: the TSI model it builds on, the proxy
 * series and the band records on one axis of calendar cells (core/series), one proxy model
 * per band (core/irradiance/spectral_band_models.ts, in parallel chunks of bands), the bands'
 * back-extension residual processes with the TSI model's sunspot → proxy mappings, the
 * cross-band residual correlation, and the integrals (integral.ts).
 *
 * @module
 */
import { CancelledError, InputProblem, type RunContext } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import type { StoredSeries } from "../../store/types.ts";
import {
  type BandBackExtension,
  bandBackExtension,
  type BandModels,
  CollinearProxiesError,
  evaluateSunspotMapping,
  type ProxyTerm,
  type ReconstructionModel,
  type WavelengthBand,
} from "../../../core/irradiance/mod.ts";
import { residualCrossCorrelation } from "../../../core/stats/mod.ts";
import {
  meanPeriodDays,
  meansAtPeriodKeys,
  type PeriodMeansByKey,
  periodOfKey,
  seriesAtPeriodKeys,
} from "../../../core/series/mod.ts";
import type { CalendarResolution } from "../../../core/time/mod.ts";
import { InputError } from "../../../core/errors.ts";
import { parsePeriod, type YearSpan } from "../common/time_period.ts";
import { calendarResolutionOf, requireSunspotVersion } from "../common/sunspot_series.ts";
import { cellMeansWithin, proxiesAtCells } from "../common/proxy_cells.ts";
import { bandValueKind } from "../common/wavelength_bands.ts";
import { irradianceModels } from "../irradiance_models/mod.ts";
import type { ModelResultOut } from "../irradiance_models/result.ts";
import { mappingFromJson } from "../irradiance_models/mapping_json.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import type { SpectralModelParams } from "./request.ts";
import type { SpectralModelResultIn } from "./result.ts";
import { BAND_FITS_CHUNK, type BandFitsChunk } from "./tasks.ts";
import { bandModelsJson, integralParts, spectralModelWarnings } from "./integral.ts";
import { ASSESSMENT_CAUTION } from "../common/irradiance_notes.ts";

/** Bands per parallel chunk (fixed, so results never depend on the pool size). */
const BANDS_PER_CHUNK = 8;

/** The band records: their series, bounds, value kind and resolution. */
export interface BandRecord {
  series: StoredSeries[];
  bounds: WavelengthBand[];
  kind: "per_nm" | "per_band";
  quantity: "spectral_irradiance" | "band_irradiance";
  units: string;
  resolution: CalendarResolution;
}

/** The calibration axis: cells where some band and every proxy have a value. */
export interface CalibrationAxis {
  keys: Int32Array;
  time: Float64Array;
  span: YearSpan;
  /** Per band, its cell mean at each axis cell (NaN where missing). */
  bands: Float64Array[];
  /** The proxy terms on the axis, with the TSI model's quiet levels. */
  terms: ProxyTerm[];
  /**
   * Every cell from the first to the last of the axis (gaps of the band records included),
   * with each proxy there (NaN where it has none): the cells whose cycles the variability is
   * measured over, so a month missing from every band does not cut a year out of the proxies.
   */
  span_cells: { time: Float64Array; values: Float64Array[] };
}

/** Calibrate the band models and build the result. */
export async function computeSpectralModel(
  params: SpectralModelParams,
  ctx: RunContext,
): Promise<SpectralModelResultIn> {
  const tsi = ctx.resultOf(irradianceModels, params.tsi_model, "/tsi_model");
  const proxies = proxySeries(params, ctx, tsi);
  const record = bandRecord(params, ctx);
  const axis = calibrationAxis(params, record, proxies.series, tsi);
  ctx.progress(0.05);
  const fits = await calibrate(params, ctx, tsi, axis, record.bounds);
  const be = params.sunspot_number === undefined
    ? null
    : backExtension(params, ctx, tsi, record, axis, fits);
  const models = reconstructionModels(fits, tsi, be, record.resolution);
  const parts = integralParts(record, axis, fits, models, be, tsi);
  ctx.progress(0.95);
  return {
    tsi_model: { run: params.tsi_model, model: tsi.model, mappings: tsi.mappings },
    quantity: record.quantity,
    units: record.units,
    value_kind: record.kind,
    method: params.method,
    names: tsi.model.names,
    resolution: record.resolution,
    step_days: meanPeriodDays(record.resolution),
    calibration_period: axis.span,
    cells: axis.keys.length,
    bands: bandModelsJson(record, fits, be, parts.cycleByBand),
    correlation: parts.correlation,
    integral: parts.integral,
    integral_check: parts.check,
    ranges: params.ranges.map((r, i) => parts.range(r, `/ranges/${i}`)),
    cycles: parts.cycles,
    outputs: parts.outputs,
    warnings: [...proxies.warnings, ...spectralModelWarnings(params, record, axis, fits, parts)],
    cautions: [
      "Band sensitivities depend on the spectral instrument, its degradation corrections and the cycle phase; they are not universal constants.",
      "An integral over bands is not TSI unless the bands cover the whole spectrum; irradiance outside the covered bands is never invented.",
      ASSESSMENT_CAUTION,
    ],
  };
}

/** The proxy series in the TSI model's term order, and warnings where they differ from it. */
function proxySeries(
  params: SpectralModelParams,
  ctx: RunContext,
  tsi: ModelResultOut,
): { series: StoredSeries[]; warnings: string[] } {
  const names = tsi.model.terms.map((t) => t.name);
  params.proxies.forEach((p, i) => {
    if (!names.includes(p.term)) {
      throw new InputProblem(
        `/proxies/${i}/term`,
        `the TSI model has no term "${p.term}"; its terms are ${names.join(", ")}`,
        { terms: names },
      );
    }
  });
  const warnings: string[] = [];
  const series = tsi.model.terms.map((t) => {
    const p = params.proxies.find((q) => q.term === t.name);
    if (!p) {
      throw new InputProblem(
        "/proxies",
        `term "${t.name}" of the TSI model has no proxy series; give one for each of ${
          names.join(", ")
        }`,
        { reason: "missing_term", term: t.name },
      );
    }
    const id = refId(p.series);
    if (id !== t.series) {
      warnings.push(
        `Term ${t.name}: series ${id} is not the one the TSI model was calibrated with (${t.series}); the integral check then compares models built on different proxies.`,
      );
    }
    return ctx.series(id);
  });
  return { series, warnings };
}

/** The band series, checked: spectral irradiance of one quantity, one calendar resolution. */
function bandRecord(params: SpectralModelParams, ctx: RunContext): BandRecord {
  const series = params.bands.map((b) => ctx.series(refId(b.series)));
  const { kind, quantity, units } = bandValueKind(series, (i) => `/bands/${i}/series`);
  const resolution = calendarResolutionOf(series[0], "/bands/0/series");
  series.forEach((s, i) => {
    const r = calendarResolutionOf(s, `/bands/${i}/series`);
    if (r !== resolution) {
      throw new InputProblem(
        `/bands/${i}/series`,
        `band ${i}: series ${s.id} is ${r} but band 0 is ${resolution}; every band must have one resolution`,
        { reason: "mixed_resolution", band: i, resolution: r },
      );
    }
  });
  return {
    series,
    bounds: params.bands.map((b) => ({ lower: b.lower, upper: b.upper })),
    kind,
    quantity: quantity as BandRecord["quantity"],
    units,
    resolution,
  };
}

/**
 * The cells of the band records (inside the requested period) where every proxy has a value,
 * and each band's mean at those cells.
 */
function calibrationAxis(
  params: SpectralModelParams,
  record: BandRecord,
  proxies: StoredSeries[],
  tsi: ModelResultOut,
): CalibrationAxis {
  const res = record.resolution;
  const span = params.period
    ? parsePeriod(params.period, "/period")
    : { start: -Infinity, end: Infinity };
  const means: PeriodMeansByKey[] = record.series.map((s) => cellMeansWithin(s, res, span));
  const all = new Set<number>();
  for (const m of means) for (const k of m.keys) all.add(k);
  const union = Int32Array.from([...all].sort((a, b) => a - b));
  const { values, complete } = proxiesAtCells(proxies, res, union);
  if (complete.length === 0) {
    throw new InputProblem(
      "/bands",
      `no overlap between the proxies and the band records${
        params.period ? " in the requested period" : ""
      }: no ${res} cell has a band value and a value of every proxy`,
      { reason: "no_overlap" },
    );
  }
  const keys = Int32Array.from(complete, (i) => union[i]);
  const spanKeys = Int32Array.from(
    { length: keys[keys.length - 1] - keys[0] + 1 },
    (_, i) => keys[0] + i,
  );
  return {
    span_cells: {
      time: Float64Array.from(spanKeys, (k) => periodOfKey(k, res).middle),
      values: proxiesAtCells(proxies, res, spanKeys).values,
    },
    keys,
    time: Float64Array.from(keys, (k) => periodOfKey(k, res).middle),
    span: {
      start: periodOfKey(keys[0], res).start,
      end: periodOfKey(keys[keys.length - 1], res).end,
    },
    bands: means.map((m) => meansAtPeriodKeys(m, keys)),
    terms: tsi.model.terms.map((t, k) => ({
      name: t.name,
      role: t.role,
      values: Float64Array.from(complete, (i) => values[k][i]),
      quietLevel: t.quiet_level,
    })),
  };
}

/** Every band's model, in parallel chunks of bands, and the cross-band residual correlation. */
async function calibrate(
  params: SpectralModelParams,
  ctx: RunContext,
  tsi: ModelResultOut,
  axis: CalibrationAxis,
  bounds: WavelengthBand[],
): Promise<BandModels> {
  const options = {
    method: params.method,
    folds: params.folds,
    psiReference: tsi.model.psi_reference,
  };
  const chunks: BandFitsChunk[] = [];
  for (let b = 0; b < axis.bands.length; b += BANDS_PER_CHUNK) {
    chunks.push({
      offset: b,
      bands: axis.bands.slice(b, b + BANDS_PER_CHUNK),
      terms: axis.terms,
      options,
    });
  }
  let parts: BandModels[];
  try {
    parts = await ctx.parallel<BandFitsChunk, BandModels>(BAND_FITS_CHUNK, chunks);
  } catch (e) {
    throw calibrationProblem(e, bounds);
  }
  if (ctx.cancelled()) throw new CancelledError();
  ctx.progress(0.8);
  const fits = parts.flatMap((p) => p.fits);
  const residuals = parts.flatMap((p) => p.residuals);
  return {
    fits,
    cells: parts.flatMap((p) => p.cells),
    residuals,
    correlation: residualCrossCorrelation(residuals, 10),
    quietLevels: parts[0].quietLevels,
  };
}

/** A calibration error as a problem at the field it concerns, naming the band. */
function calibrationProblem(e: unknown, bounds: WavelengthBand[]): unknown {
  if (e instanceof CollinearProxiesError || (e instanceof InputError && e.reason === "collinear")) {
    return new InputProblem("/proxies", (e as Error).message, {
      reason: "collinear",
      condition_number: typeof (e as InputError).value === "number"
        ? undefinedAsNull((e as InputError).value as number)
        : null,
    });
  }
  if (e instanceof InputError && e.field === "bands" && e.index !== undefined) {
    const b = bounds[e.index];
    const what = `band ${e.index} (${b.lower}–${b.upper} nm)`;
    const message = e.reason === "no_overlap"
      ? `${what} does not overlap the proxies in time: its record has no cell where every proxy has a value`
      : `${what}: ${e.message.replace(/^Cannot calibrate band models: band \d+ /, "")}`;
    return new InputProblem(`/bands/${e.index}/series`, message, {
      field: "series",
      reason: e.reason,
      band: e.index,
    });
  }
  if (e instanceof InputError) {
    return new InputProblem("/proxies", e.message, { field: e.field, reason: e.reason });
  }
  return e;
}

/**
 * Each band's back-extension residual process: the band's cell means at the sunspot series'
 * cells of the calibration period, minus its model fed with the proxies the TSI model's
 * mappings give for those cells' sunspot numbers.
 */
function backExtension(
  params: SpectralModelParams,
  ctx: RunContext,
  tsi: ModelResultOut,
  record: BandRecord,
  axis: CalibrationAxis,
  fits: BandModels,
): BandBackExtension & { stepDays: number } {
  const ss = ctx.series(refId(params.sunspot_number!));
  const version = requireSunspotVersion(ss, "/sunspot_number");
  const mappings = tsi.mappings;
  if (!mappings) {
    throw new InputProblem(
      "/sunspot_number",
      `TSI model run ${params.tsi_model} was calibrated without a sunspot series, so it has no sunspot → proxy mappings to back-extend the bands with`,
      { reason: "no_mappings" },
    );
  }
  if (version !== mappings.sunspot_version) {
    throw new InputProblem(
      "/sunspot_number",
      `the sunspot series is version "${version}" but the TSI model's mappings use version "${mappings.sunspot_version}"`,
      { reason: "version_mismatch", version, model_version: mappings.sunspot_version },
    );
  }
  const res = calendarResolutionOf(ss, "/sunspot_number");
  const sc = cellMeansWithin(ss, res, axis.span);
  const mapped = tsi.model.terms.map((t) => {
    const v = new Float64Array(sc.keys.length), pv = new Float64Array(sc.keys.length);
    evaluateSunspotMapping(mappingFromJson(mappings.terms[t.name].chosen), sc.mean, v, pv);
    return v;
  });
  const bands = record.series.map((s) =>
    seriesAtPeriodKeys(
      { time: s.time, value: s.value.map((v, i) => (inside(s.time[i], axis.span) ? v : NaN)) },
      res,
      sc.keys,
    )
  );
  try {
    return {
      ...bandBackExtension(bands, mapped, fits.fits, 10),
      stepDays: meanPeriodDays(res),
    };
  } catch (e) {
    if (!(e instanceof InputError && e.field === "bands")) throw e;
    throw new InputProblem(
      "/sunspot_number",
      `band ${e.index} overlaps the sunspot series in only ${e.value} ${res} cells; at least 4 are needed for its back-extension residual process`,
      { reason: e.reason, band: e.index, cells: e.value },
    );
  }
}

/** Whether t lies in [start, end). */
function inside(t: number, span: YearSpan): boolean {
  return t >= span.start && t < span.end;
}

/** Each band's model as reconstruction and integration read it. */
function reconstructionModels(
  fits: BandModels,
  tsi: ModelResultOut,
  be: (BandBackExtension & { stepDays: number }) | null,
  resolution: CalendarResolution,
): ReconstructionModel[] {
  return fits.fits.map((f, b) => ({
    coefficients: f.coefficients,
    covariance: f.covariance,
    terms: tsi.model.terms.map((t) => ({ role: t.role, quietLevel: t.quiet_level })),
    psiReference: tsi.model.psi_reference,
    residualSd: f.residualSd,
    rho: f.rho,
    stepDays: meanPeriodDays(resolution),
    backExtension: be
      ? { residualSd: be.perBand[b].residualSd, rho: be.perBand[b].rho, stepDays: be.stepDays }
      : null,
  }));
}
