/**
 * Adapter of the "irradiance-models" analysis: the TSI record and proxies averaged on the TSI
 * record's calendar cells (core/series), the calibration and its comparison fit
 * (core/irradiance/proxy_model.ts), the sunspot → proxy mappings and the back-extension
 * residual process (sunspot_proxy_mapping.ts, back_extension.ts), and the result.
 *
 * @module
 */
import type { RunContext } from "../../runs/kind.ts";
import { InputProblem } from "../../runs/kind.ts";
import { refId } from "../../schemas/series_ref.ts";
import type { StoredSeries } from "../../store/types.ts";
import {
  backExtensionResiduals,
  calibrateProxyModel,
  CollinearProxiesError,
  evaluateSunspotMapping,
  fitSunspotMapping,
  fittedValueBand,
  predictionQuantile,
  type ProxyModelFit,
  type ProxyTerm,
  type SunspotMappingChoice,
  tsiCycleAmplitude,
} from "../../../core/irradiance/mod.ts";
import {
  meanPeriodDays,
  type PeriodMeansByKey,
  periodOfKey,
  resampledAtPeriodKeys,
} from "../../../core/series/mod.ts";
import { cellMeansWithin, proxiesAtCells } from "../common/proxy_cells.ts";
import type { CalendarResolution } from "../../../core/time/mod.ts";
import { InputError } from "../../../core/errors.ts";
import { parsePeriod, type YearSpan } from "../common/time_period.ts";
import { inputProblem } from "../common/input_problem.ts";
import {
  calendarResolutionOf,
  requireQuantity,
  requireSunspotVersion,
} from "../common/sunspot_series.ts";
import {
  ASSESSMENT_CAUTION,
  cycleAmplitudeWarning,
  quietSunWarning,
} from "../common/irradiance_notes.ts";
import type { ModelParams } from "./request.ts";
import type { IrradianceModelJson, ModelResultIn, SunspotMappingsJson } from "./result.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import { mappingChoiceJson } from "./mapping_json.ts";
import { cycleAmplitudeJson } from "../common/tsi_cycle_amplitude.ts";

/** Quantities a facular term's series normally has. */
const FACULAR_QUANTITIES = ["facular_index", "radio_flux", "other"];

/** TSI and proxies on the calibration cells: cells where TSI and every proxy have a value. */
interface CalibrationCells {
  tsi: StoredSeries;
  termSeries: StoredSeries[];
  resolution: CalendarResolution;
  keys: Int32Array;
  y: Float64Array;
  terms: ProxyTerm[];
}

/** Calibrate the model, fit the mappings and build the result. */
export function computeModel(params: ModelParams, ctx: RunContext): ModelResultIn {
  const cells = calibrationCells(params, ctx);
  const fit = calibrate(cells, params);
  const alternative = comparisonFit(cells, params);
  const model = storedModel(fit, cells);
  const mappings = params.sunspot_number === undefined
    ? null
    : sunspotMappings(params, ctx, cells, fit, model.calibration_period);
  const band = fittedValueBand(fit.fitted, fit.residualSd, fit.dfResidual);
  const fittedTime = Array.from(cells.keys, (k) => periodOfKey(k, cells.resolution).middle);
  const amplitude = tsiCycleAmplitude(fittedTime, fit.fitted);
  return {
    model,
    fit: fitJson(fit),
    alternative: alternative ? alternativeJson(alternative, params.method) : null,
    mappings,
    cycle_amplitude: cycleAmplitudeJson(amplitude),
    outputs: {
      fitted: {
        name: "Fitted TSI",
        quantity: "tsi",
        units: "W m-2",
        time: fittedTime,
        value: Array.from(fit.fitted),
        lower: Array.from(band.lower),
        upper: Array.from(band.upper),
        interval: "95 % band of a new measurement from the residual spread: fitted value ± " +
          "t(0.975, df)·residual SD",
      },
      residuals: {
        name: "Calibration residuals",
        quantity: "other",
        units: "W m-2",
        time: fittedTime,
        value: Array.from(fit.residuals),
      },
    },
    warnings: [
      ...modelWarnings(params, cells, fit),
      ...cycleAmplitudeWarning(amplitude.median),
    ],
    cautions: [
      "Proxy coefficients depend on the TSI instrument and on cycle phase; they are not universal constants.",
      ASSESSMENT_CAUTION,
    ],
  };
}

/** The fit statistics as stored. */
function fitJson(fit: ProxyModelFit): ModelResultIn["fit"] {
  const cv = fit.crossValidation;
  return {
    n: fit.n,
    standard_errors: fit.standardErrors,
    lower: fit.lower,
    upper: fit.upper,
    r_squared: fit.rSquared,
    adj_r_squared: fit.adjRSquared,
    residual_rms: fit.residualRms,
    aic: undefinedAsNull(fit.aic),
    bic: undefinedAsNull(fit.bic),
    residual_lag1: fit.residualLag1,
    rho: fit.rho,
    converged: fit.converged,
    iterations: fit.iterations,
    collinearity_condition_number: fit.collinearity,
    cross_validation: cv
      ? { folds: cv.folds, rmse: cv.rmse, fold_rmse: cv.foldRmse, blocks: cv.blocks }
      : null,
    darkening_scale: fit.terms.some((t) => t.role === "sunspot_darkening")
      ? "b is the coefficient of −S_ref·PSI; b·S_ref is the darkening in W m-2 per unit PSI"
      : null,
  };
}

/** The comparison fit as stored. */
function alternativeJson(
  alt: ProxyModelFit,
  requested: ModelParams["method"],
): NonNullable<ModelResultIn["alternative"]> {
  return {
    method: alt.method,
    note: "The same model fitted with the other estimator, for comparison; the stored " +
      `model uses ${requested}.`,
    coefficients: alt.coefficients,
    standard_errors: alt.standardErrors,
    lower: alt.lower,
    upper: alt.upper,
    residual_rms: alt.residualRms,
    aic: undefinedAsNull(alt.aic),
    bic: undefinedAsNull(alt.bic),
    rho: alt.rho,
  };
}

/** The cells of the TSI record (in the requested period) where every proxy has a value. */
function calibrationCells(params: ModelParams, ctx: RunContext): CalibrationCells {
  const tsi = requireQuantity(ctx.series(refId(params.tsi)), "tsi", "/tsi");
  const resolution = calendarResolutionOf(tsi, "/tsi");
  const span = params.period
    ? parsePeriod(params.period, "/period")
    : { start: -Infinity, end: Infinity };
  const tsiCells = cellMeansWithin(tsi, resolution, span);
  const termSeries = params.terms.map((t) => ctx.series(refId(t.series)));
  const { values: termAtTsi, complete: use } = proxiesAtCells(
    termSeries,
    resolution,
    tsiCells.keys,
  );
  if (use.length === 0) {
    throw new InputProblem(
      "/terms",
      `no overlap between the proxies and the TSI record${
        params.period ? " in the requested period" : ""
      }: no ${resolution} cell has a TSI value and a value of every proxy`,
      { reason: "no_overlap" },
    );
  }
  return {
    tsi,
    termSeries,
    resolution,
    keys: Int32Array.from(use, (i) => tsiCells.keys[i]),
    y: Float64Array.from(use, (i) => tsiCells.mean[i]),
    terms: params.terms.map((t, k) => ({
      name: t.name,
      role: t.role,
      values: Float64Array.from(use, (i) => termAtTsi[k][i]),
      quietLevel: t.quiet_level,
    })),
  };
}

/** The requested fit; refused inputs become problems at the field they concern. */
function calibrate(cells: CalibrationCells, params: ModelParams): ProxyModelFit {
  const p = params.terms.length + 1;
  if (cells.y.length < p + 2) {
    throw new InputProblem(
      "/tsi",
      `only ${cells.y.length} ${cells.resolution} points where TSI and every proxy overlap; the model has ${p} coefficients and needs at least ${
        p + 2
      }`,
      { reason: "too_few_points", points: cells.y.length, needed: p + 2 },
    );
  }
  try {
    return calibrateProxyModel(cells.y, cells.terms, {
      method: params.method,
      folds: params.folds,
      psiReference: params.psi_reference,
    });
  } catch (e) {
    if (e instanceof CollinearProxiesError) {
      throw new InputProblem("/terms", e.message, {
        reason: "collinear",
        condition_number: undefinedAsNull(e.conditionNumber),
      });
    }
    if (e instanceof InputError) throw inputProblem(e, { tsi: "/tsi", "*": "/terms" });
    // the regression itself refused the design (e.g. a constant proxy)
    if (e instanceof RangeError) throw new InputProblem("/terms", e.message);
    throw e;
  }
}

/** The other estimator, without cross-validation, for comparison (null when it fails). */
function comparisonFit(cells: CalibrationCells, params: ModelParams): ProxyModelFit | null {
  try {
    return calibrateProxyModel(cells.y, cells.terms, {
      method: params.method === "ols" ? "prais_winsten" : "ols",
      folds: 0,
      psiReference: params.psi_reference,
    });
  } catch {
    return null; // the comparison is optional; the requested fit succeeded
  }
}

/** The model as reconstructions read it. */
function storedModel(fit: ProxyModelFit, cells: CalibrationCells): IrradianceModelJson {
  const { keys, resolution } = cells;
  return {
    method: fit.method,
    names: fit.names,
    terms: fit.terms.map((t, k) => ({
      name: t.name,
      role: t.role,
      quiet_level: t.quietLevel,
      min: t.min,
      max: t.max,
      series: cells.termSeries[k].id,
      quantity: cells.termSeries[k].quantity,
      units: cells.termSeries[k].units,
    })),
    psi_reference: fit.psiReference,
    coefficients: fit.coefficients,
    covariance: fit.covariance,
    df_residual: fit.dfResidual,
    residual_sd: fit.residualSd,
    rho: fit.rho,
    step_days: meanPeriodDays(resolution),
    resolution,
    calibration_period: {
      start: periodOfKey(keys[0], resolution).start,
      end: periodOfKey(keys[keys.length - 1], resolution).end,
    },
    t_quantile975: predictionQuantile(0.95, fit.dfResidual),
    quiet_sun: fit.quietSun,
  };
}

/**
 * Sunspot → proxy mappings fitted on the sunspot series' cells of the calibration period, and
 * the residual process of the model fed with the mapped proxies there.
 */
function sunspotMappings(
  params: ModelParams,
  ctx: RunContext,
  cells: CalibrationCells,
  fit: ProxyModelFit,
  calibration: YearSpan,
): SunspotMappingsJson {
  const ss = ctx.series(refId(params.sunspot_number!));
  const version = requireSunspotVersion(ss, "/sunspot_number");
  const res = calendarResolutionOf(ss, "/sunspot_number");
  const sc = cellMeansWithin(ss, res, calibration);
  const { choices, mapped } = fitMappings(params, cells.termSeries, res, sc);
  const tsiAtS = resampledAtPeriodKeys(cells.tsi, cells.tsi.resolution, res, sc.keys);
  let be;
  try {
    be = backExtensionResiduals(tsiAtS, mapped, fit);
  } catch (e) {
    if (!(e instanceof InputError && e.field === "tsi")) throw e;
    throw new InputProblem(
      "/sunspot_number",
      `the sunspot series overlaps the TSI record in only ${e.value} ${res} cells; at least 4 are needed for the mappings`,
      { reason: e.reason, cells: e.value },
    );
  }
  return {
    sunspot_series: ss.id,
    sunspot_version: version,
    resolution: res,
    step_days: meanPeriodDays(res),
    terms: Object.fromEntries(
      Object.entries(choices).map(([name, c]) => [name, mappingChoiceJson(c)]),
    ),
    back_extension: {
      residual_sd: be.residualSd,
      rho: be.rho,
      step_days: meanPeriodDays(res),
      n: be.n,
    },
  };
}

/**
 * For each term, the sunspot → proxy mapping fitted on the cells where the sunspot series and
 * the term both have a value, and the term mapped from sunspot number at every sunspot cell.
 */
function fitMappings(
  params: ModelParams,
  termSeries: StoredSeries[],
  res: CalendarResolution,
  sc: PeriodMeansByKey,
): { choices: Record<string, SunspotMappingChoice>; mapped: Float64Array[] } {
  const choices: Record<string, SunspotMappingChoice> = {};
  const mapped = termSeries.map((s, k) => {
    const name = params.terms[k].name;
    const f = resampledAtPeriodKeys(s, s.resolution, res, sc.keys);
    const rr: number[] = [], ff: number[] = [];
    for (let i = 0; i < sc.keys.length; i++) {
      if (Number.isFinite(f[i]) && Number.isFinite(sc.mean[i])) rr.push(sc.mean[i]), ff.push(f[i]);
    }
    try {
      choices[name] = fitSunspotMapping(rr, ff, params.mapping_form);
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      throw new InputProblem(
        "/sunspot_number",
        `cannot map sunspot number to term ${name}: ${e.message}`,
        { term: name, field: e.field, reason: e.reason },
      );
    }
    const v = new Float64Array(sc.keys.length), pv = new Float64Array(sc.keys.length);
    evaluateSunspotMapping(choices[name].chosen, sc.mean, v, pv);
    return v;
  });
  return { choices, mapped };
}

/** Warnings about the inputs and the fit (never silent). */
function modelWarnings(params: ModelParams, cells: CalibrationCells, fit: ProxyModelFit): string[] {
  const warnings: string[] = [...quietSunWarning(fit.quietSun.value)];
  // A term whose quantity does not fit its role is allowed (the user may know better).
  params.terms.forEach((t, k) => {
    const q = cells.termSeries[k].quantity;
    if (t.role === "facular" && !FACULAR_QUANTITIES.includes(q)) {
      warnings.push(
        `term "${t.name}" has role facular but its series has quantity ${q}; a facular ` +
          "brightening term is normally a facular index or radio flux",
      );
    }
    if (t.role === "sunspot_darkening" && q !== "other") {
      warnings.push(
        `term "${t.name}" has role sunspot_darkening but its series has quantity ${q}; ` +
          "the darkening regressor is a Photometric Sunspot Index series (from /v1/irradiance/darkening)",
      );
    }
  });
  if (!fit.converged) {
    warnings.push(
      `The Prais–Winsten iteration did not converge in ${fit.iterations} steps; ρ = ${
        fit.rho.toFixed(4)
      } is the last value.`,
    );
  }
  if (params.method === "ols" && fit.residualLag1 > 0.3) {
    warnings.push(
      `The residual lag-1 autocorrelation is ${
        fit.residualLag1.toFixed(2)
      }: OLS standard errors and intervals are too narrow for serially correlated residuals; use method "prais_winsten".`,
    );
  }
  if (fit.collinearity > 30) {
    warnings.push(
      `The proxies are strongly collinear (condition number ${
        fit.collinearity.toFixed(1)
      } > 30; Belsley, Kuh & Welsch 1980): individual coefficients are poorly determined.`,
    );
  }
  const keys = cells.keys;
  const missing = keys[keys.length - 1] - keys[0] + 1 - keys.length;
  if (missing > 0) {
    warnings.push(
      `${missing} ${cells.resolution} cells inside the calibration span lack TSI or a proxy; ${
        params.method === "prais_winsten"
          ? "the AR(1) transformation treats the remaining points as consecutive"
          : "they are skipped"
      }.`,
    );
  }
  return warnings;
}
