/**
 * The parts of the "spectral-irradiance-models" result built from the band models: each
 * band's model as stored, the cross-band correlation, the integral over the covered range and
 * its check against the TSI model, integrated ranges, cycle variability, the integral as
 * output series, and the warnings.
 *
 * @module
 */
import {
  type BandBackExtension,
  bandCycleVariability,
  bandIrradianceFactor,
  type BandModels,
  blackbodyBandFraction,
  evaluateProxyModel,
  fittedValueBand,
  integrateBandModels,
  predictionQuantile,
  proxyRegressor,
  type ReconstructionModel,
  SOLAR_EFFECTIVE_TEMPERATURE_K,
  spectralCoverage,
  type WavelengthBand,
} from "../../../core/irradiance/mod.ts";
import { InputProblem } from "../../runs/kind.ts";
import type { ModelResultOut } from "../irradiance_models/result.ts";
import { rangeWeightsAt } from "../common/wavelength_bands.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import type { SpectralModelParams } from "./request.ts";
import type { SpectralModelResultIn } from "./result.ts";
import type { BandRecord, CalibrationAxis } from "./compute.ts";

type Result = SpectralModelResultIn;
type RangeJson = NonNullable<Result["integral"]>;
type CycleJson = NonNullable<Result["bands"][number]["cycle"]>;

/** Share of a 5772 K blackbody the bands must cover for the integral to count as TSI. */
export const FULL_COVERAGE = 0.99;

/** Back-extension per band with its cell length. */
type BackExtension = (BandBackExtension & { stepDays: number }) | null;

/** What {@link integralParts} builds. */
export interface IntegralParts {
  correlation: Result["correlation"];
  integral: Result["integral"];
  check: Result["integral_check"];
  range(r: WavelengthBand, pointer: string): RangeJson;
  cycles: Result["cycles"];
  cycleByBand: (CycleJson | null)[];
  outputs: Result["outputs"];
}

/** Build the integrals, their check against TSI, the cycle variability and the outputs. */
export function integralParts(
  record: BandRecord,
  axis: CalibrationAxis,
  fits: BandModels,
  models: ReconstructionModel[],
  be: BackExtension,
  tsi: ModelResultOut,
): IntegralParts {
  const corr = fits.correlation;
  const beCorr = be?.correlation ?? null;
  const correlations = corr
    ? {
      residual: { lag0: corr.lag0, lag1: corr.lag1 },
      backExtension: beCorr ? { lag0: beCorr.lag0, lag1: beCorr.lag1 } : null,
    }
    : null;
  const minDf = Math.min(...fits.fits.map((f) => f.dfResidual));
  const t975 = predictionQuantile(0.95, minDf);
  const cycle = cycleOf(axis, tsi);
  const rangeJson = (r: WavelengthBand, pointer: string): RangeJson => {
    const w = rangeWeightsAt(record.bounds, r, record.kind, pointer);
    if (!correlations) {
      throw new InputProblem(
        pointer,
        `the bands share fewer than 10 calibration cells, so the correlation of their errors (which an integral needs) cannot be estimated`,
        { reason: "no_common_cells" },
      );
    }
    const m = integrateBandModels(models, w.weights, correlations);
    const se = m.coefficients.map((_, k) => Math.sqrt(Math.max(0, m.covariance[k][k])));
    return {
      range: { lower: r.lower, upper: r.upper },
      bands: w.bands.length,
      covered_nm: w.coveredWidth,
      missing: w.missing,
      coefficients: m.coefficients,
      standard_errors: se,
      lower: m.coefficients.map((c, k) => c - t975 * se[k]),
      upper: m.coefficients.map((c, k) => c + t975 * se[k]),
      residual_sd: m.residualSd,
      rho: m.rho,
      cycle: cycle.of(m.coefficients, m.covariance),
    };
  };
  const cover = spectralCoverage(record.bounds);
  const integral = correlations
    ? rangeJson({ lower: cover.lower, upper: cover.upper }, "/bands")
    : null;
  return {
    correlation: corr
      ? {
        cells: corr.n,
        residual_lag0: corr.lag0,
        residual_lag1: corr.lag1,
        back_extension_lag0: beCorr?.lag0 ?? null,
        back_extension_lag1: beCorr?.lag1 ?? null,
      }
      : null,
    integral,
    check: integral ? integralCheck(record, integral, tsi) : null,
    range: rangeJson,
    cycles: cycle.cycles,
    cycleByBand: models.map((m) => cycle.of(m.coefficients, m.covariance)),
    outputs: integralOutputs(record, axis, fits, integral?.residual_sd ?? null, minDf),
  };
}

/**
 * The cycle variability of a model (band or range) between the cycle extrema of the TSI
 * model's prediction from the proxies over the calibration span (every cell from the first to
 * the last of the axis): amplitude β·Δx with Δx the regressors' mean
 * change from minimum to maximum, level β₀ + β·x̄, SD √(Δxᵀ S Δx) (delta method).
 */
function cycleOf(axis: CalibrationAxis, tsi: ModelResultOut) {
  const m = tsi.model;
  const span = axis.span_cells;
  const regressors = axis.terms.map((t, k) =>
    span.values[k].map((v) => proxyRegressor(t.role, t.quietLevel!, m.psi_reference, v))
  );
  const reference = evaluateProxyModel(
    {
      coefficients: m.coefficients,
      terms: m.terms.map((t) => ({ role: t.role, quietLevel: t.quiet_level })),
      psiReference: m.psi_reference,
    },
    span.values,
  );
  const v = bandCycleVariability(span.time, regressors, reference);
  const dx = v.bands.map((b) => b.amplitude), xbar = v.bands.map((b) => b.level);
  const ok = v.cycles.length > 0 && dx.every((x) => x !== null) && xbar.every((x) => x !== null);
  return {
    cycles: v.cycles.map((c) => ({ minimum_year: c.minimumYear, maximum_year: c.maximumYear })),
    of(beta: number[], cov: number[][]): CycleJson | null {
      if (!ok) return null;
      let amplitude = 0, level = beta[0], variance = 0;
      dx.forEach((d, k) => {
        amplitude += beta[k + 1] * d!;
        level += beta[k + 1] * xbar[k]!;
        dx.forEach((e, j) => (variance += d! * cov[k + 1][j + 1] * e!));
      });
      const sd = Math.sqrt(Math.max(0, variance));
      if (level === 0) return null;
      return {
        amplitude,
        amplitude_sd: sd,
        level,
        relative: amplitude / level,
        relative_sd: sd / Math.abs(level),
      };
    },
  };
}

/** The integral over the covered range against the TSI model, and the coverage statement. */
function integralCheck(
  record: BandRecord,
  integral: RangeJson,
  tsi: ModelResultOut,
): NonNullable<Result["integral_check"]> {
  const cover = spectralCoverage(record.bounds);
  const blackbody = cover.intervals.reduce((s, [a, b]) => s + blackbodyBandFraction(a, b), 0);
  const m = tsi.model;
  const coefficients = m.names.map((name, k) => {
    const d = integral.coefficients[k] - m.coefficients[k];
    const tsiSe = Math.sqrt(Math.max(0, m.covariance[k][k]));
    const se = Math.hypot(integral.standard_errors[k], tsiSe);
    return {
      name,
      integral: integral.coefficients[k],
      integral_se: integral.standard_errors[k],
      tsi: m.coefficients[k],
      tsi_se: tsiSe,
      difference: d,
      difference_se: se,
      z: se > 0 ? d / se : 0,
      ratio: m.coefficients[k] !== 0 ? integral.coefficients[k] / m.coefficients[k] : null,
    };
  });
  const full = blackbody >= FULL_COVERAGE;
  const agrees = full ? coefficients.every((c) => Math.abs(c.z) <= 1.96) : null;
  const quietRatio = integral.coefficients[0] / m.coefficients[0];
  return {
    coverage: {
      lower: cover.lower,
      upper: cover.upper,
      intervals: cover.intervals,
      gaps: cover.gaps,
      width_nm: cover.width,
      blackbody_fraction: blackbody,
      blackbody_temperature: SOLAR_EFFECTIVE_TEMPERATURE_K,
      quiet_level_ratio: quietRatio,
    },
    full_coverage: full,
    coefficients,
    agrees,
    verdict: verdict(cover, blackbody, quietRatio, coefficients, agrees),
  };
}

/** The integral check in words. */
function verdict(
  cover: ReturnType<typeof spectralCoverage>,
  blackbody: number,
  quietRatio: number,
  rows: {
    name: string;
    difference: number;
    difference_se: number;
    z: number;
    ratio: number | null;
  }[],
  agrees: boolean | null,
): string {
  const pct = (x: number) => `${(100 * x).toFixed(1)} %`;
  const where = `The bands cover ${cover.lower}–${cover.upper} nm${
    cover.gaps.length ? ` with ${cover.gaps.length} gap(s)` : ""
  }: ${pct(blackbody)} of a ${SOLAR_EFFECTIVE_TEMPERATURE_K} K blackbody and ${
    pct(quietRatio)
  } of the TSI model's quiet-Sun level.`;
  const worst = rows.reduce((a, b) => (Math.abs(b.z) > Math.abs(a.z) ? b : a));
  const fmt = (r: typeof worst) =>
    `${r.name}: ${r.difference.toPrecision(3)} ± ${r.difference_se.toPrecision(2)} (z = ${
      r.z.toFixed(2)
    })`;
  if (agrees === null) {
    const shares = rows.slice(1).map((r) => `${r.name} ${r.ratio === null ? "—" : pct(r.ratio)}`)
      .join(", ");
    return `${where} Their integral is therefore not TSI and is not required to agree with the TSI model; it holds these shares of the TSI model's coefficients: ${shares}. Irradiance outside the covered bands is not invented; the difference from TSI is its contribution plus error.`;
  }
  if (agrees) {
    return `${where} The integral over the bands agrees with the TSI model within its uncertainty: every coefficient lies within 1.96 standard errors of the difference (largest: ${
      fmt(worst)
    }).`;
  }
  const bad = rows.filter((r) => Math.abs(r.z) > 1.96).map(fmt).join("; ");
  return `${where} The integral over the bands does NOT agree with the TSI model: ${bad}. The spectral and TSI records (or their calibrations) disagree by that much.`;
}

/** The measured and fitted integral over every band at the cells where all bands exist. */
function integralOutputs(
  record: BandRecord,
  axis: CalibrationAxis,
  fits: BandModels,
  residualSd: number | null,
  df: number,
): Result["outputs"] {
  const n = axis.keys.length;
  const w = record.bounds.map((b) => bandIrradianceFactor(b, record.kind));
  const measured = new Float64Array(n).fill(NaN), fitted = new Float64Array(n).fill(NaN);
  const fittedOnAxis = fits.fits.map((f, b) => {
    const out = new Float64Array(n).fill(NaN);
    fits.cells[b].forEach((i, j) => (out[i] = f.fitted[j]));
    return out;
  });
  for (let i = 0; i < n; i++) {
    let s = 0, sf = 0;
    for (let b = 0; b < w.length; b++) {
      s += w[b] * axis.bands[b][i];
      sf += w[b] * fittedOnAxis[b][i];
    }
    measured[i] = s;
    fitted[i] = sf;
  }
  const cover = spectralCoverage(record.bounds);
  const band = residualSd === null ? null : fittedValueBand(fitted, residualSd, df);
  const name = `${cover.lower}–${cover.upper} nm`;
  return {
    integral_measured: {
      name: `Measured irradiance integrated over ${name}`,
      quantity: "band_irradiance",
      units: "W m-2",
      time: Array.from(axis.time),
      value: undefinedAsNull(measured),
      description: "Sum over bands of value × width (W m-2 nm-1) or value (W m-2), at the " +
        "cells where every band has a value; null elsewhere",
    },
    integral_fitted: {
      name: `Fitted irradiance integrated over ${name}`,
      quantity: "band_irradiance",
      units: "W m-2",
      time: Array.from(axis.time),
      value: undefinedAsNull(fitted),
      ...(band
        ? {
          lower: undefinedAsNull(band.lower),
          upper: undefinedAsNull(band.upper),
          interval: "fitted value ± t(0.975, df)·residual SD of the integral",
        }
        : {}),
      description: "Sum over bands of the fitted band values at the cells where every band " +
        "has a value; null elsewhere",
    },
  };
}

/** Each band's model as stored. */
export function bandModelsJson(
  record: BandRecord,
  fits: BandModels,
  be: BackExtension,
  cycles: (CycleJson | null)[],
): Result["bands"] {
  return fits.fits.map((f, b) => {
    const y = Float64Array.from(fits.cells[b], (i) => i); // indices only, for n
    const cv = f.crossValidation;
    const variance = bandVariance(f.fitted, f.residuals);
    return {
      band: record.bounds[b],
      series: record.series[b].id,
      units: record.units,
      n: y.length,
      coefficients: f.coefficients,
      standard_errors: f.standardErrors,
      lower: f.lower,
      upper: f.upper,
      covariance: f.covariance,
      df_residual: f.dfResidual,
      residual_sd: f.residualSd,
      rho: f.rho,
      r_squared: f.rSquared,
      adj_r_squared: f.adjRSquared,
      residual_rms: f.residualRms,
      residual_lag1: f.residualLag1,
      aic: undefinedAsNull(f.aic),
      bic: undefinedAsNull(f.bic),
      converged: f.converged,
      iterations: f.iterations,
      cross_validation: cv
        ? {
          folds: cv.folds,
          rmse: cv.rmse,
          variance_explained: variance > 0 ? 1 - (cv.rmse * cv.rmse) / variance : 0,
          fold_rmse: cv.foldRmse,
        }
        : null,
      back_extension: be
        ? {
          residual_sd: be.perBand[b].residualSd,
          rho: be.perBand[b].rho,
          step_days: be.stepDays,
          n: be.perBand[b].n,
        }
        : null,
      cycle: cycles[b],
    };
  });
}

/** Variance (divisor n) of a band's values, from its fitted values and residuals. */
function bandVariance(fitted: Float64Array, residuals: Float64Array): number {
  const n = fitted.length;
  let m = 0;
  for (let i = 0; i < n; i++) m += fitted[i] + residuals[i];
  m /= n;
  let s = 0;
  for (let i = 0; i < n; i++) s += (fitted[i] + residuals[i] - m) ** 2;
  return s / n;
}

/** Warnings about the bands, their fits and the integrals (never silent). */
export function spectralModelWarnings(
  params: SpectralModelParams,
  record: BandRecord,
  axis: CalibrationAxis,
  fits: BandModels,
  parts: IntegralParts,
): string[] {
  const out: string[] = [];
  const list = (idx: number[]) =>
    idx.slice(0, 8).map((b) => `${record.bounds[b].lower}–${record.bounds[b].upper} nm`).join(
      ", ",
    ) + (idx.length > 8 ? ` and ${idx.length - 8} more` : "");
  const where = (f: (b: number) => boolean) => fits.fits.map((_, b) => b).filter(f);
  const gappy = where((b) => fits.cells[b].length < axis.keys.length);
  if (gappy.length) {
    out.push(
      `${gappy.length} band(s) lack values at some of the ${axis.keys.length} calibration cells (${
        list(gappy)
      }); each is fitted on its own cells${
        params.method === "prais_winsten"
          ? ", the AR(1) transformation treating the remaining cells as consecutive"
          : ""
      }.`,
    );
  }
  const unconverged = where((b) => !fits.fits[b].converged);
  if (unconverged.length) {
    out.push(`The Prais–Winsten iteration did not converge for ${list(unconverged)}.`);
  }
  if (params.method === "ols") {
    const correlated = where((b) => fits.fits[b].residualLag1 > 0.3);
    if (correlated.length) {
      out.push(
        `Residual lag-1 autocorrelation above 0.3 in ${
          list(correlated)
        }: OLS intervals are too narrow there; use method "prais_winsten".`,
      );
    }
  }
  const weak = where((b) => fits.fits[b].rSquared < 0.2);
  if (weak.length) {
    out.push(
      `The proxies explain less than 20 % of the variance of ${
        list(weak)
      }: their sensitivities are poorly determined (noise, or variability the proxies do not carry).`,
    );
  }
  if (!parts.correlation) {
    out.push(
      "The bands share fewer than 10 calibration cells: the correlation of their errors cannot be estimated, so no integral, integral check or integrated range is computed.",
    );
  }
  const cover = spectralCoverage(record.bounds);
  if (cover.gaps.length) {
    out.push(
      `No band covers ${
        cover.gaps.map(([a, b]) => `${a}–${b} nm`).join(", ")
      }: integrals leave these wavelengths out (nothing is interpolated).`,
    );
  }
  if (parts.check && parts.check.agrees === false) out.push(parts.check.verdict);
  if (parts.cycles.length === 0) {
    out.push(
      "The calibration period holds no complete solar cycle (a minimum followed by a maximum, each the extreme annual mean within 3 years either side): cycle variability is not computed.",
    );
  }
  return out;
}
