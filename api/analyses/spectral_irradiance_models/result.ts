/**
 * Result of the "spectral-irradiance-models" analysis: one calibrated proxy model per
 * wavelength band (sensitivities with uncertainties, variance explained, cross-validation and
 * diagnostics, back-extension residual process, cycle variability), the cross-band residual
 * correlation that integrals over bands need, the integral over the covered range compared
 * with the TSI model (the integral check), integrated ranges, and the TSI model's parts that
 * spectral reconstructions reuse.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { cautions, inherited, nums, OutputSeriesSchema, warnings } from "../common/result_parts.ts";
import { IrradianceModel, SunspotMappings } from "../irradiance_models/result.ts";
import { BandBounds } from "../common/spectrum_block.ts";

const CellResolution = z.enum(["daily", "monthly", "annual"]);
const statOrNull = z.number().nullable();
const matrix = z.array(nums);

/** A coefficient vector with its standard errors and 95 % interval. */
const Estimates = {
  coefficients: nums.openapi({
    description: "Quiet-Sun level (the intercept), then one coefficient per term, in band " +
      "units (the facular coefficient per unit of the proxy, b dimensionless as for TSI)",
  }),
  standard_errors: nums,
  lower: nums.openapi({ description: "95 % lower bounds" }),
  upper: nums.openapi({ description: "95 % upper bounds" }),
};

/** The cycle variability of a band (or a range) between the calibration's cycle extrema. */
export const CycleVariability = z.object({
  amplitude: z.number().openapi({
    description: "Mean over the cycles of the fitted annual mean at the maximum minus that at " +
      "the preceding minimum, band units; negative when the band falls as activity rises",
  }),
  amplitude_sd: z.number().openapi({
    description: "Its standard deviation from the coefficient covariance (delta method)",
  }),
  level: z.number().openapi({ description: "Mean of the fitted annual means at the extrema" }),
  relative: z.number().openapi({ description: "amplitude / level" }),
  relative_sd: z.number(),
}).openapi("BandCycleVariability");

/** One band's calibrated model. */
export const BandModelJson = z.object({
  band: BandBounds,
  series: z.string().openapi({ description: "Id of the band's record" }),
  units: z.string().openapi({ description: "Units of the band's values and coefficients" }),
  n: z.number().int().openapi({ description: "Calibration cells of this band" }),
  ...Estimates,
  covariance: matrix.openapi({ description: "Coefficient covariance" }),
  df_residual: z.number().int(),
  residual_sd: z.number().openapi({ description: "Marginal SD of the residual process" }),
  rho: z.number().openapi({ description: "AR(1) coefficient of the residual process" }),
  r_squared: z.number().openapi({
    description: "Fraction of the band's variance over its calibration cells that the model " +
      "explains (R², original scale)",
  }),
  adj_r_squared: z.number(),
  residual_rms: z.number(),
  residual_lag1: z.number(),
  aic: statOrNull,
  bic: statOrNull,
  converged: z.boolean(),
  iterations: z.number().int(),
  cross_validation: z.object({
    folds: z.number().int(),
    rmse: z.number().openapi({ description: "Over all held-out cells, band units" }),
    variance_explained: z.number().openapi({
      description: "1 − (held-out MSE) / (variance of the band): out-of-sample skill",
    }),
    fold_rmse: nums,
  }).nullable(),
  back_extension: z.object({
    residual_sd: z.number().openapi({
      description: "Marginal SD of the band minus its model fed with mapped proxies",
    }),
    rho: z.number(),
    step_days: z.number(),
    n: z.number().int(),
  }).nullable().openapi({ description: "null without a sunspot_number series" }),
  cycle: CycleVariability.nullable().openapi({
    description: "null when the calibration period holds no complete cycle",
  }),
}).openapi("SpectralBandModel");

/** An integrated range's model. */
export const RangeModel = z.object({
  range: BandBounds.openapi({ description: "The range, nm" }),
  bands: z.number().int().openapi({ description: "Bands that contribute" }),
  covered_nm: z.number().openapi({ description: "Width of the range covered by bands, nm" }),
  missing: z.array(z.tuple([z.number(), z.number()])).openapi({
    description: "Parts of the range no band covers, nm: not included and not invented",
  }),
  ...Estimates,
  residual_sd: z.number().openapi({ description: "Of the range's residual process, W m-2" }),
  rho: z.number(),
  cycle: CycleVariability.nullable(),
}).openapi("SpectralRangeModel");

const CoefficientCheck = z.object({
  name: z.string(),
  integral: z.number().openapi({ description: "Σ over bands of weight × band coefficient" }),
  integral_se: z.number(),
  tsi: z.number().openapi({ description: "The TSI model's coefficient" }),
  tsi_se: z.number(),
  difference: z.number().openapi({ description: "integral − tsi" }),
  difference_se: z.number().openapi({
    description: "√(integral_se² + tsi_se²): the records taken as independent",
  }),
  z: z.number(),
  ratio: z.number().nullable().openapi({ description: "integral / tsi; null when tsi is 0" }),
});

/** What the bands cover of the solar spectrum. */
export const SpectralCoverageJson = z.object({
  lower: z.number().openapi({ description: "Shortest wavelength covered, nm" }),
  upper: z.number().openapi({ description: "Longest wavelength covered, nm" }),
  intervals: z.array(z.tuple([z.number(), z.number()])),
  gaps: z.array(z.tuple([z.number(), z.number()])).openapi({
    description: "Wavelengths between lower and upper that no band covers, nm",
  }),
  width_nm: z.number(),
  blackbody_fraction: z.number().openapi({
    description: "Share of a blackbody's exitance at blackbody_temperature in the covered " +
      "intervals (Planck's law): a rough measure of the share of TSI the bands can hold",
  }),
  blackbody_temperature: z.number().openapi({ description: "K (the nominal solar 5772 K)" }),
  quiet_level_ratio: z.number().openapi({
    description: "Integrated quiet-Sun level of the bands over the TSI model's S_Q: the " +
      "measured share of TSI in the covered range",
  }),
}).openapi("SpectralCoverage");

/** The integral check: the covered range integrated against the TSI model. */
export const IntegralCheck = z.object({
  coverage: SpectralCoverageJson,
  full_coverage: z.boolean().openapi({
    description: "True when the covered intervals hold at least 99 % of a 5772 K blackbody: " +
      "only then must the integral agree with TSI",
  }),
  coefficients: z.array(CoefficientCheck),
  agrees: z.boolean().nullable().openapi({
    description: "With full coverage: every |z| ≤ 1.96. null with partial coverage (the " +
      "integral is not TSI)",
  }),
  verdict: z.string().openapi({ description: "The check in words" }),
}).openapi("SpectralIntegralCheck");

export const SpectralModelResult = z.object({
  tsi_model: z.object({
    run: z.string().openapi({ description: "Id of the TSI model run" }),
    model: IrradianceModel,
    mappings: SunspotMappings.nullable(),
  }).openapi({ description: "The TSI model this spectral model is built on (copied)" }),
  quantity: z.enum(["spectral_irradiance", "band_irradiance"]),
  units: z.string(),
  value_kind: z.enum(["per_nm", "per_band"]).openapi({
    description: "per_nm: band values are W m-2 nm-1 (irradiance = value × width); " +
      "per_band: W m-2 over the band",
  }),
  method: z.enum(["ols", "prais_winsten"]),
  names: z.array(z.string()).openapi({ description: '"intercept" then the term names' }),
  resolution: CellResolution,
  step_days: z.number(),
  calibration_period: z.object({ start: z.number(), end: z.number() }),
  cells: z.number().int().openapi({ description: "Cells where some band and every proxy exist" }),
  bands: z.array(BandModelJson),
  correlation: z.object({
    cells: z.number().int().openapi({ description: "Cells common to every band" }),
    residual_lag0: matrix,
    residual_lag1: matrix,
    back_extension_lag0: matrix.nullable(),
    back_extension_lag1: matrix.nullable(),
  }).nullable().openapi({
    description: "Cross-band correlation of the residual processes (lag 0 and the symmetric " +
      "lag-1 part), which integrals over bands use; null when the bands share fewer than 10 " +
      "cells (no integrals then)",
  }),
  integral: RangeModel.nullable().openapi({ description: "The whole covered range" }),
  integral_check: IntegralCheck.nullable(),
  ranges: z.array(RangeModel),
  cycles: z.array(z.object({ minimum_year: z.number().int(), maximum_year: z.number().int() }))
    .openapi({ description: "Cycles of the fitted integral in the calibration period" }),
  outputs: z.object({
    integral_measured: OutputSeriesSchema,
    integral_fitted: OutputSeriesSchema,
  }),
  warnings,
  cautions,
  inherited,
}).openapi("SpectralModelResult");

/** The result as `compute` builds it. */
export type SpectralModelResultIn = z.input<typeof SpectralModelResult>;
/** The result as stored and read back. */
export type SpectralModelResultOut = z.output<typeof SpectralModelResult>;
export type BandModelJsonOut = z.output<typeof BandModelJson>;
