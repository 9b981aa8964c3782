/**
 * `POST /v1/irradiance/models`: calibrate a proxy-regression TSI model against a measured TSI
 * record, with optional sunspot-number → proxy mappings for back-extension. The result is a
 * stored model that reconstructions cite by run id.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { LegacyResult } from "./legacy_result.ts";
import { InputProblem, type RunKind } from "../runs/kind.ts";
import { refId, SeriesRef } from "../schemas/series_ref.ts";
import type { StoredSeries } from "../store/types.ts";
import {
  calibrateProxyModel,
  cellBounds,
  cellMeans,
  type CellResolution,
  CollinearProxiesError,
  evaluateSunspotMapping,
  fitSunspotMapping,
  type ProxyTerm,
  type SunspotMappingChoice,
  tsiCycleAmplitude,
  valuesAtKeys,
} from "../../core/irradiance/mod.ts";
import { tQuantile } from "../../core/stats/distributions.ts";
import { residualLag1 } from "../../core/stats/residual_lag1.ts";
import {
  cellDays,
  cycleAmplitudeWarning,
  IRRADIANCE_CAUTIONS,
  nullable,
  parsePeriod,
  PeriodInput,
  quietSunWarning,
  requireSunspotVersion,
  seriesResolution,
  snakeKeys,
} from "./irradiance_common.ts";

const Term = z.object({
  name: z.string().regex(/^[a-z][a-z0-9_]{0,39}$/, "lower-case letters, digits and _").openapi({
    example: "mg_ii",
  }),
  series: SeriesRef,
  role: z.enum(["facular", "sunspot_darkening", "other"]).openapi({
    description: "facular: a brightening index F entering as a·(F − F_Q); sunspot_darkening: " +
      "a PSI series entering as −b·S_ref·PSI; other: any further proxy, entering like a " +
      "facular term",
  }),
  quiet_level: z.number().optional().openapi({
    description: "Quiet-Sun level F_Q of the term (ignored for sunspot_darkening). Default: " +
      "the 1st percentile of the term over the calibration points",
  }),
}).openapi("ProxyTerm");

const Request = z.object({
  tsi: SeriesRef.openapi({ description: "Measured TSI record (quantity tsi, W m-2)" }),
  terms: z.array(Term).min(1).max(6),
  sunspot_number: SeriesRef.optional().openapi({
    description: "Sunspot-number series (with a declared version) for fitting the " +
      "sunspot → proxy mappings that back-extension needs",
  }),
  mapping_form: z.enum(["auto", "linear", "saturating"]).default("auto").openapi({
    description: "Form of the sunspot → proxy mappings; auto chooses by AIC",
  }),
  method: z.enum(["prais_winsten", "ols"]).default("prais_winsten").openapi({
    description: "prais_winsten: regression with AR(1) errors (honest intervals for serially " +
      "correlated residuals); ols: ordinary least squares",
  }),
  folds: z.number().int().min(0).max(20).default(5).openapi({
    description: "Folds of the time-blocked cross-validation (contiguous blocks); 0 = none",
  }),
  period: PeriodInput.optional().openapi({ description: "Restrict calibration to this period" }),
  psi_reference: z.number().min(1300).max(1400).default(1360.8).openapi({
    description: "S_ref in the darkening regressor −S_ref·PSI, W m-2",
  }),
}).superRefine((v, ctx) => {
  const names = new Set<string>();
  v.terms.forEach((t, i) => {
    if (names.has(t.name)) {
      ctx.addIssue({ code: "custom", path: ["terms", i, "name"], message: "duplicate term name" });
    }
    names.add(t.name);
  });
}).openapi("ModelRequest");

/** The stored model, as reconstructions read it from `result.model` (snake_case JSON). */
export interface StoredModel {
  method: "ols" | "prais_winsten";
  names: string[];
  terms: {
    name: string;
    role: "facular" | "sunspot_darkening" | "other";
    quiet_level: number;
    min: number;
    max: number;
    series: string;
    quantity: string;
    units: string;
  }[];
  psi_reference: number;
  coefficients: number[];
  covariance: number[][];
  df_residual: number;
  residual_sd: number;
  rho: number;
  step_days: number;
  resolution: CellResolution;
  calibration_period: { start: number; end: number };
  t_quantile975: number;
  quiet_sun: { value: number; se: number; lower: number; upper: number };
}

/** A sunspot → proxy mapping as stored: the core's {@link SunspotMappingChoice} with
 * snake_case keys (`chosen.sunspot_max`, `chosen.standard_errors`, ...). */
export interface StoredMappingChoice {
  chosen: Record<string, unknown> & { form: string; sunspot_max: number };
  linear: Record<string, unknown>;
  saturating: Record<string, unknown> | null;
  reason: string;
}

/** Mappings as stored in `result.mappings`. */
export interface StoredMappings {
  sunspot_series: string;
  sunspot_version: string;
  resolution: CellResolution;
  step_days: number;
  terms: Record<string, StoredMappingChoice>;
  back_extension: { residual_sd: number; rho: number; step_days: number; n: number };
}

function keysOf(s: StoredSeries, r: CellResolution, period: { start: number; end: number }) {
  const c = cellMeans(
    s.time.filter((t) => t >= period.start && t < period.end),
    s.value.filter((_, i) => s.time[i] >= period.start && s.time[i] < period.end),
    r,
  );
  return c;
}

export const irradianceModels: RunKind<typeof Request> = {
  kind: "irradiance-models",
  path: "/v1/irradiance/models",
  algorithmVersion: "3",
  tag: "Irradiance",
  summary: "Calibrate a proxy-regression TSI model against a measured TSI record",
  description: "Fits TSI(t) = S_Q + Σ a_k·(F_k(t) − F_k,Q) − b·S_ref·PSI(t) (Foukal & Lean " +
    "1988; Lean 2000; Fröhlich & Lean 2004) by ordinary least squares or by regression with " +
    "AR(1) errors (Prais–Winsten), on the calendar cells of the TSI record where every proxy " +
    "has a value. Reports coefficients with covariance and 95 % intervals, the quiet-Sun " +
    "level S_Q with its interval, residual RMS, R², adjusted R², AIC/BIC, residual lag-1 " +
    "autocorrelation and time-blocked k-fold cross-validation RMSE. With a sunspot-number " +
    "series, also fits linear and saturating sunspot → proxy mappings in the overlap era and " +
    "the residual process of the sunspot-only model, which reconstructions use to back-extend " +
    "with honest uncertainty.",
  request: Request,
  result: LegacyResult,
  estimateSeconds: () => 0.2,
  compute(params, ctx) {
    const tsiS = ctx.series(refId(params.tsi));
    if (tsiS.quantity !== "tsi") {
      throw new InputProblem(
        "/tsi",
        `series ${tsiS.id} has quantity ${tsiS.quantity}; a tsi series is needed`,
      );
    }
    const res = seriesResolution(tsiS, "/tsi");
    const period = params.period
      ? parsePeriod(params.period, "/period")
      : { start: -Infinity, end: Infinity };
    const tsiCells = keysOf(tsiS, res, period);
    const termSeries = params.terms.map((t) => ctx.series(refId(t.series)));
    const termAtTsi = termSeries.map((s) =>
      valuesAtKeys(cellMeans(s.time, s.value, res), tsiCells.keys)
    );
    const use: number[] = [];
    for (let i = 0; i < tsiCells.keys.length; i++) {
      if (termAtTsi.every((v) => Number.isFinite(v[i]))) use.push(i);
    }
    if (use.length === 0) {
      throw new InputProblem(
        "/terms",
        `no overlap between the proxies and the TSI record${
          params.period ? " in the requested period" : ""
        }: no ${res} cell has a TSI value and a value of every proxy`,
      );
    }
    const p = params.terms.length + 1;
    if (use.length < p + 2) {
      throw new InputProblem(
        "/tsi",
        `only ${use.length} ${res} points where TSI and every proxy overlap; the model has ${p} coefficients and needs at least ${
          p + 2
        }`,
      );
    }
    const y = Float64Array.from(use, (i) => tsiCells.mean[i]);
    const keys = Int32Array.from(use, (i) => tsiCells.keys[i]);
    const terms: ProxyTerm[] = params.terms.map((t, k) => ({
      name: t.name,
      role: t.role,
      values: Float64Array.from(use, (i) => termAtTsi[k][i]),
      quietLevel: t.quiet_level,
    }));
    let fit;
    try {
      fit = calibrateProxyModel(y, terms, {
        method: params.method,
        folds: params.folds,
        psiReference: params.psi_reference,
      });
    } catch (e) {
      if (e instanceof CollinearProxiesError) {
        throw new InputProblem("/terms", e.message, {
          condition_number: Number.isFinite(e.conditionNumber) ? e.conditionNumber : null,
        });
      }
      if (e instanceof RangeError) throw new InputProblem("/terms", e.message);
      throw e;
    }
    // the other estimator, for comparison (no cross-validation)
    const otherMethod = params.method === "ols" ? "prais_winsten" : "ols";
    let other: ReturnType<typeof calibrateProxyModel> | null = null;
    try {
      other = calibrateProxyModel(y, terms, {
        method: otherMethod,
        folds: 0,
        psiReference: params.psi_reference,
      });
    } catch {
      other = null; // the comparison is optional; the requested fit succeeded
    }
    const warnings: string[] = [...quietSunWarning(fit.quietSun.value)];
    // A term whose quantity does not fit its role is allowed (the user may know better) but
    // never silent.
    const FACULAR_QUANTITIES = ["facular_index", "radio_flux", "other"];
    params.terms.forEach((t, k) => {
      const q = termSeries[k].quantity;
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
    const span = keys[keys.length - 1] - keys[0] + 1;
    if (span > keys.length) {
      warnings.push(
        `${span - keys.length} ${res} cells inside the calibration span lack TSI or a proxy; ${
          params.method === "prais_winsten"
            ? "the AR(1) transformation treats the remaining points as consecutive"
            : "they are skipped"
        }.`,
      );
    }
    const first = cellBounds(keys[0], res), last = cellBounds(keys[keys.length - 1], res);
    const stepDays = cellDays(res);
    const model: StoredModel = {
      method: fit.method,
      names: fit.names,
      terms: fit.terms.map((t, k) => ({
        name: t.name,
        role: t.role,
        quiet_level: t.quietLevel,
        min: t.min,
        max: t.max,
        series: termSeries[k].id,
        quantity: termSeries[k].quantity,
        units: termSeries[k].units,
      })),
      psi_reference: fit.psiReference,
      coefficients: fit.coefficients,
      covariance: fit.covariance,
      df_residual: fit.dfResidual,
      residual_sd: fit.residualSd,
      rho: fit.rho,
      step_days: stepDays,
      resolution: res,
      calibration_period: { start: first.start, end: last.end },
      t_quantile975: tQuantile(0.975, fit.dfResidual),
      quiet_sun: fit.quietSun,
    };
    // sunspot → proxy mappings and the sunspot-only residual process
    let mappings: StoredMappings | null = null;
    if (params.sunspot_number !== undefined) {
      const ss = ctx.series(refId(params.sunspot_number));
      const version = requireSunspotVersion(ss, "/sunspot_number");
      const sres = seriesResolution(ss, "/sunspot_number");
      const calPeriod = model.calibration_period;
      const sc = keysOf(ss, sres, calPeriod);
      const choices: Record<string, SunspotMappingChoice> = {};
      const mappedAtS: Float64Array[] = [];
      for (let k = 0; k < termSeries.length; k++) {
        const fv = valuesAtKeys(cellMeans(termSeries[k].time, termSeries[k].value, sres), sc.keys);
        const rr: number[] = [], ff: number[] = [];
        for (let i = 0; i < sc.keys.length; i++) {
          if (Number.isFinite(fv[i]) && Number.isFinite(sc.mean[i])) {
            rr.push(sc.mean[i]), ff.push(fv[i]);
          }
        }
        try {
          choices[params.terms[k].name] = fitSunspotMapping(rr, ff, params.mapping_form);
        } catch (e) {
          throw new InputProblem(
            "/sunspot_number",
            `cannot map sunspot number to term ${params.terms[k].name}: ${(e as Error).message}`,
          );
        }
        const v = new Float64Array(sc.keys.length), pv = new Float64Array(sc.keys.length);
        evaluateSunspotMapping(choices[params.terms[k].name].chosen, sc.mean, v, pv);
        mappedAtS.push(v);
      }
      // TSI − model(mapped proxies) at the sunspot cells
      const ts = valuesAtKeys(cellMeans(tsiS.time, tsiS.value, sres), sc.keys);
      const resid: number[] = [];
      const beta = fit.coefficients;
      for (let i = 0; i < sc.keys.length; i++) {
        if (!Number.isFinite(ts[i])) continue;
        let yhat = beta[0];
        fit.terms.forEach((t, k) => {
          const x = t.role === "sunspot_darkening"
            ? -fit.psiReference * mappedAtS[k][i]
            : mappedAtS[k][i] - t.quietLevel;
          yhat += beta[k + 1] * x;
        });
        resid.push(ts[i] - yhat);
      }
      if (resid.length < 4) {
        throw new InputProblem(
          "/sunspot_number",
          `the sunspot series overlaps the TSI record in only ${resid.length} ${sres} cells; at least 4 are needed for the mappings`,
        );
      }
      const r = Float64Array.from(resid);
      let ss2 = 0;
      for (const v of r) ss2 += v * v;
      mappings = {
        sunspot_series: ss.id,
        sunspot_version: version,
        resolution: sres,
        step_days: cellDays(sres),
        terms: snakeKeys(choices) as Record<string, StoredMappingChoice>,
        back_extension: {
          residual_sd: Math.sqrt(ss2 / r.length),
          rho: Math.max(-0.999, Math.min(0.999, residualLag1(r))),
          step_days: cellDays(sres),
          n: r.length,
        },
      };
    }
    const tcrit = model.t_quantile975;
    const fittedTime = [...keys].map((k) => cellBounds(k, res).middle);
    const fitted = new Float64Array(y.length);
    for (let i = 0; i < y.length; i++) fitted[i] = y[i] - fit.residuals[i];
    const amplitude = tsiCycleAmplitude(fittedTime, fitted);
    warnings.push(...cycleAmplitudeWarning(amplitude.median));
    const predSd = fit.residualSd;
    return {
      model: snakeKeys(model),
      fit: snakeKeys({
        n: fit.n,
        standard_errors: fit.standardErrors,
        lower: fit.lower,
        upper: fit.upper,
        r_squared: fit.rSquared,
        adj_r_squared: fit.adjRSquared,
        residual_rms: fit.residualRms,
        aic: fit.aic,
        bic: fit.bic,
        residual_lag1: fit.residualLag1,
        rho: fit.rho,
        converged: fit.converged,
        iterations: fit.iterations,
        collinearity_condition_number: fit.collinearity,
        cross_validation: fit.crossValidation,
        darkening_scale: fit.terms.some((t) => t.role === "sunspot_darkening")
          ? "b is the coefficient of −S_ref·PSI; b·S_ref is the darkening in W m-2 per unit PSI"
          : null,
      }),
      alternative: other
        ? snakeKeys({
          method: otherMethod,
          note: "The same model fitted with the other estimator, for comparison; the stored " +
            `model uses ${params.method}.`,
          coefficients: other.coefficients,
          standard_errors: other.standardErrors,
          lower: other.lower,
          upper: other.upper,
          residual_rms: other.residualRms,
          aic: other.aic,
          bic: other.bic,
          rho: other.rho,
        })
        : null,
      mappings: snakeKeys(mappings),
      cycle_amplitude: snakeKeys(amplitude),
      outputs: {
        fitted: {
          name: "Fitted TSI",
          quantity: "tsi",
          units: "W m-2",
          time: fittedTime,
          value: nullable(fitted),
          lower: nullable(fitted.map((v) => v - tcrit * predSd)),
          upper: nullable(fitted.map((v) => v + tcrit * predSd)),
          interval: "fitted value ± t(0.975, df)·residual SD",
        },
        residuals: {
          name: "Calibration residuals",
          quantity: "other",
          units: "W m-2",
          time: fittedTime,
          value: nullable(fit.residuals),
        },
      },
      warnings,
      cautions: [
        "Proxy coefficients depend on the TSI instrument and on cycle phase; they are not universal constants.",
        ...IRRADIANCE_CAUTIONS.slice(1),
      ],
    };
  },
};
