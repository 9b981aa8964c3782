/**
 * Result of the "irradiance-models" analysis: the stored model that reconstructions cite, the
 * fit statistics, the other estimator for comparison, the sunspot → proxy mappings with the
 * residual process of the sunspot-only model, and the fitted TSI.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import {
  cautions,
  inherited,
  nums,
  numsOrNull,
  OutputSeriesSchema,
  warnings,
} from "../common/result_parts.ts";
import { TsiCycleAmplitudeSchema } from "../common/tsi_cycle_amplitude.ts";
import { ProxyRoleSchema } from "./request.ts";

const CellResolution = z.enum(["daily", "monthly", "annual"]);

/** A statistic that is null when not finite (an exact fit has AIC and BIC of −∞). */
const statOrNull = z.number().nullable();

/** The calibrated model, as reconstructions read it. */
export const IrradianceModel = z.object({
  method: z.enum(["ols", "prais_winsten"]),
  names: z.array(z.string()).openapi({ description: '"intercept" then the term names' }),
  terms: z.array(z.object({
    name: z.string(),
    role: ProxyRoleSchema,
    quiet_level: z.number().openapi({ description: "F_Q (0 for the darkening term)" }),
    min: z.number().openapi({ description: "Smallest value at the calibration points" }),
    max: z.number().openapi({ description: "Largest value at the calibration points" }),
    series: z.string().openapi({ description: "Id of the term's series" }),
    quantity: z.string(),
    units: z.string(),
  })),
  psi_reference: z.number().openapi({ description: "S_ref of the darkening regressor, W m-2" }),
  coefficients: nums.openapi({ description: "S_Q (W m-2), then one coefficient per term" }),
  covariance: z.array(nums).openapi({ description: "Coefficient covariance" }),
  df_residual: z.number().int(),
  residual_sd: z.number().openapi({
    description: "Marginal SD of the residual process, W m-2",
  }),
  rho: z.number().openapi({ description: "Lag-1 autocorrelation of the residual process" }),
  step_days: z.number().openapi({ description: "Mean cell length of the calibration, days" }),
  resolution: CellResolution,
  calibration_period: z.object({ start: z.number(), end: z.number() }).openapi({
    description: "From the start of the first to the end of the last calibration cell, " +
      "decimal years, end exclusive",
  }),
  t_quantile975: z.number().openapi({ description: "t(0.975, df_residual)" }),
  quiet_sun: z.object({
    value: z.number(),
    se: z.number(),
    lower: z.number(),
    upper: z.number(),
  }).openapi({ description: "Quiet-Sun TSI S_Q (the intercept), W m-2, with its 95 % interval" }),
}).openapi("IrradianceModel");

/** A fitted sunspot-number → proxy mapping. */
export const SunspotMapping = z.object({
  form: z.enum(["linear", "saturating"]).openapi({
    description: "linear: F = c0 + c1·R; saturating: F = c0 + c1·R0·(1 − exp(−R/R0))",
  }),
  names: z.array(z.string()),
  coefficients: nums,
  covariance: z.array(numsOrNull).openapi({
    description: "Parameter covariance; null entries where R0 is not identified (infinite)",
  }),
  standard_errors: numsOrNull.openapi({ description: "null where not identified (infinite)" }),
  n: z.number().int(),
  sigma: z.number().openapi({ description: "Residual standard error, proxy units" }),
  residual_rms: z.number(),
  r_squared: z.number(),
  aic: statOrNull,
  bic: statOrNull,
  residual_lag1: z.number(),
  sunspot_min: z.number().openapi({ description: "Smallest sunspot number in the fit" }),
  sunspot_max: z.number().openapi({ description: "Largest sunspot number in the fit" }),
}).openapi("SunspotMapping");

const MappingChoice = z.object({
  chosen: SunspotMapping,
  linear: SunspotMapping,
  saturating: SunspotMapping.nullable().openapi({ description: "null when it cannot be fitted" }),
  reason: z.string().openapi({ description: "Why the chosen form was chosen" }),
});

/** The mappings and the residual process of the sunspot-only model. */
export const SunspotMappings = z.object({
  sunspot_series: z.string(),
  sunspot_version: z.string(),
  resolution: CellResolution,
  step_days: z.number(),
  terms: z.record(z.string(), MappingChoice).openapi({ description: "By term name" }),
  back_extension: z.object({
    residual_sd: z.number().openapi({
      description: "Marginal SD of TSI minus the model fed with mapped proxies, W m-2",
    }),
    rho: z.number().openapi({ description: "Its lag-1 autocorrelation, clamped to ±0.999" }),
    step_days: z.number(),
    n: z.number().int().openapi({ description: "Overlap cells used" }),
  }),
}).openapi("SunspotMappings");

export const ModelResult = z.object({
  model: IrradianceModel,
  fit: z.object({
    n: z.number().int(),
    standard_errors: nums,
    lower: nums.openapi({ description: "95 % lower bounds of the coefficients" }),
    upper: nums,
    r_squared: z.number(),
    adj_r_squared: z.number(),
    residual_rms: z.number(),
    aic: statOrNull,
    bic: statOrNull,
    residual_lag1: z.number(),
    rho: z.number(),
    converged: z.boolean(),
    iterations: z.number().int(),
    collinearity_condition_number: z.number(),
    cross_validation: z.object({
      folds: z.number().int(),
      rmse: z.number().openapi({ description: "Over all held-out points, W m-2" }),
      fold_rmse: nums,
      blocks: z.array(z.tuple([z.number().int(), z.number().int()])).openapi({
        description: "First and last calibration index of each block",
      }),
    }).nullable().openapi({ description: "null when folds = 0 or too few points" }),
    darkening_scale: z.string().nullable(),
  }),
  alternative: z.object({
    method: z.enum(["ols", "prais_winsten"]),
    note: z.string(),
    coefficients: nums,
    standard_errors: nums,
    lower: nums,
    upper: nums,
    residual_rms: z.number(),
    aic: statOrNull,
    bic: statOrNull,
    rho: z.number(),
  }).nullable().openapi({
    description: "The same model with the other estimator, for comparison; null when it fails",
  }),
  mappings: SunspotMappings.nullable().openapi({
    description: "null without a sunspot_number series",
  }),
  cycle_amplitude: TsiCycleAmplitudeSchema,
  outputs: z.object({ fitted: OutputSeriesSchema, residuals: OutputSeriesSchema }),
  warnings,
  cautions,
  inherited,
}).openapi("ModelResult");

/** The result as `compute` builds it. */
export type ModelResultIn = z.input<typeof ModelResult>;
/** The result as stored and read back. */
export type ModelResultOut = z.output<typeof ModelResult>;
export type IrradianceModelJson = z.output<typeof IrradianceModel>;
export type SunspotMappingJson = z.output<typeof SunspotMapping>;
export type SunspotMappingsJson = z.output<typeof SunspotMappings>;
