/**
 * Back-extension of a proxy TSI model to the era with sunspot numbers only: each proxy is
 * replaced by its empirical sunspot-number mapping (core/irradiance/sunspot_proxy_mapping.ts),
 * and the errors of the model fed with mapped proxies are described by their own residual
 * process, estimated in the overlap era where TSI was measured (the approach of proxy
 * reconstructions that calibrate on the satellite era and extend with sunspot-based proxies:
 * Lean 2000, GRL 27, 2425; Fröhlich & Lean 2004, Astron. Astrophys. Rev. 12, 273). The
 * residual process enters the reconstruction's prediction intervals through
 * core/irradiance/proxy_reconstruction.ts; {@link drawMappedProxy} draws one realisation of a
 * mapped proxy for ensembles.
 *
 * @module
 */
import { sum } from "d3-array";
import { InputError } from "../errors.ts";
import type { RandomStream } from "../random/mod.ts";
import { residualLag1 } from "../stats/residual_lag1.ts";
import { evaluateProxyModel, type ProxyModelTerms } from "./proxy_model_evaluation.ts";
import { choleskyLower, drawMultivariateNormal } from "../stats/multivariate_normal.ts";
import { sunspotMappingValues, type SunspotProxyMapping } from "./sunspot_proxy_mapping.ts";

/** Fewest overlap cells the residual process is estimated from. */
export const MIN_BACK_EXTENSION_CELLS = 4;

/** Largest |ρ| kept for the residual process (the AR(1) variance factor needs |ρ| < 1). */
export const MAX_RESIDUAL_RHO = 0.999;

/** The residual process of the sunspot-only model (result of {@link backExtensionResiduals}). */
export interface BackExtensionResiduals {
  /** TSI − ŷ(mapped proxies) at the cells used, in time order, W m-2. */
  residuals: Float64Array;
  /** Marginal SD of the process, √(Σr²/n), W m-2 (about zero: a bias of the mapped model counts). */
  residualSd: number;
  /** Lag-1 autocorrelation ρ̂ = Σ r_t r_{t−1} / Σ r_t² (Cochrane–Orcutt), clamped to ±0.999. */
  rho: number;
  /** Cells used. */
  n: number;
}

/**
 * The residual process of the model fed with proxies mapped from sunspot number: at each
 * overlap cell with a measured TSI and every mapped proxy, r = TSI − ŷ(mapped), ŷ the
 * calibrated model ({@link evaluateProxyModel}). Its marginal SD √(Σr²/n) and lag-1
 * autocorrelation ρ̂ (cells with a missing value are skipped, so the cells on either side count
 * as neighbours) describe the errors of back-extended values; the reconstruction treats them
 * as an AR(1) process at the sunspot series' spacing.
 *
 * @param tsi measured TSI per overlap cell, W m-2 (NaN where missing)
 * @param mapped per model term, the proxy mapped from the cell's sunspot number (same length)
 * @param model the calibrated model's coefficients and terms
 * @returns {@link BackExtensionResiduals}
 * @throws {InputError} (field `tsi`, reason `too_few_points`) with fewer than
 *   {@link MIN_BACK_EXTENSION_CELLS} usable cells; as {@link evaluateProxyModel}
 * @example
 * ```ts
 * import { backExtensionResiduals } from "./back_extension.ts";
 * import assert from "node:assert/strict";
 * const model = { coefficients: [1360, 100], terms: [{ role: "facular" as const, quietLevel: 0 }], psiReference: 1360.8 };
 * const f = [0.01, 0.02, 0.03, 0.04, 0.05];
 * const r = backExtensionResiduals([1361.1, 1361.9, 1363.1, 1363.9, NaN], [f], model);
 * assert.equal(r.n, 4);
 * assert.ok(Math.abs(r.residualSd - 0.1) < 1e-9); // residuals ±0.1
 * assert.ok(Math.abs(r.rho + 0.75) < 1e-9); // (−0.01·3)/0.04
 * ```
 */
export function backExtensionResiduals(
  tsi: ArrayLike<number>,
  mapped: readonly ArrayLike<number>[],
  model: ProxyModelTerms,
): BackExtensionResiduals {
  for (let k = 0; k < mapped.length; k++) {
    if (mapped[k].length !== tsi.length) {
      throw new InputError(
        `Cannot estimate the back-extension residuals: mapped proxy ${k} has ${
          mapped[k].length
        } cells but TSI has ${tsi.length}`,
        { field: "mapped", reason: "length_mismatch", index: k, value: mapped[k].length },
      );
    }
  }
  const yhat = evaluateProxyModel(model, mapped);
  const r: number[] = [];
  for (let i = 0; i < tsi.length; i++) {
    if (Number.isFinite(tsi[i]) && Number.isFinite(yhat[i])) r.push(tsi[i] - yhat[i]);
  }
  if (r.length < MIN_BACK_EXTENSION_CELLS) {
    throw new InputError(
      `Cannot estimate the back-extension residuals: needs at least ${MIN_BACK_EXTENSION_CELLS} cells with TSI and every mapped proxy, got ${r.length}`,
      { field: "tsi", reason: "too_few_points", value: r.length },
    );
  }
  const residuals = Float64Array.from(r);
  const rho = residualLag1(residuals);
  return {
    residuals,
    residualSd: Math.sqrt(sum(residuals, (v) => v * v) / residuals.length),
    rho: Math.max(-MAX_RESIDUAL_RHO, Math.min(MAX_RESIDUAL_RHO, rho)),
    n: residuals.length,
  };
}

/** Options of {@link drawMappedProxy}. */
export interface DrawMappedProxyOptions {
  /** Redraws allowed when a saturating mapping's R0 comes out ≤ 0. @default 100 */
  maxRedraws?: number;
}

/**
 * The lower Cholesky factor of a mapping's parameter covariance, for
 * {@link drawSunspotMappingCoefficients} (computed once, used for every member).
 *
 * @param mapping the fitted mapping
 * @returns L with Σ = LLᵀ
 * @throws {InputError} (field `mapping`) when the covariance is not finite (an unidentified R0)
 *   or not positive definite
 * @example
 * ```ts
 * import { mappingCholesky } from "./back_extension.ts";
 * import { fitLinearSunspotMapping } from "./sunspot_proxy_mapping.ts";
 * import assert from "node:assert/strict";
 * const m = fitLinearSunspotMapping([0, 50, 100, 150], [0.15, 0.1551, 0.1599, 0.165]);
 * const L = mappingCholesky(m);
 * assert.ok(Math.abs(L[0][0] ** 2 - m.covariance[0][0]) < 1e-18);
 * ```
 */
export function mappingCholesky(mapping: SunspotProxyMapping): number[][] {
  const S = mapping.covariance, p = mapping.coefficients.length;
  if (!S.every((row) => row.length === p && row.every(Number.isFinite))) {
    throw new InputError(
      "Cannot draw a mapped proxy: the mapping's parameter covariance is not finite (an unidentified R0?)",
      { field: "mapping", reason: "invalid" },
    );
  }
  try {
    return choleskyLower(S);
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    throw new InputError(
      "Cannot draw a mapped proxy: the mapping's parameter covariance is not positive definite",
      { field: "mapping", reason: "invalid" },
    );
  }
}

/**
 * One draw of a mapping's parameters from their normal approximation N(ĉ, Σ) (the
 * Gauss–Newton covariance; Bates & Watts 1988, Nonlinear Regression Analysis, §2.3):
 * c = ĉ + Lz ({@link drawMultivariateNormal}); a saturating draw with R0 ≤ 0 (no such mapping)
 * is redrawn.
 *
 * @param mapping the fitted mapping
 * @param lower its factor from {@link mappingCholesky}
 * @param stream a seeded random stream (p normal draws per attempt)
 * @param maxRedraws redraws allowed @default 100
 * @returns the drawn coefficients
 * @throws {InputError} (field `mapping`) when no admissible R0 was drawn
 * @example
 * ```ts
 * import { drawSunspotMappingCoefficients, mappingCholesky } from "./back_extension.ts";
 * import { fitLinearSunspotMapping } from "./sunspot_proxy_mapping.ts";
 * import { randomStream } from "../random/mod.ts";
 * import assert from "node:assert/strict";
 * const m = fitLinearSunspotMapping([0, 50, 100, 150], [0.15, 0.1551, 0.1599, 0.165]);
 * const c = drawSunspotMappingCoefficients(m, mappingCholesky(m), randomStream(1));
 * assert.ok(Math.abs(c[1] - m.coefficients[1]) < 10 * m.standardErrors[1]);
 * ```
 */
export function drawSunspotMappingCoefficients(
  mapping: SunspotProxyMapping,
  lower: readonly (readonly number[])[],
  stream: RandomStream,
  maxRedraws = 100,
): number[] {
  for (let attempt = 0; attempt <= maxRedraws; attempt++) {
    const drawn = drawMultivariateNormal(mapping.coefficients, lower, stream);
    if (mapping.form === "saturating" && !(drawn[2] > 0)) continue;
    return drawn;
  }
  throw new InputError(
    `Cannot draw a mapped proxy: no draw with R0 > 0 in ${maxRedraws + 1} attempts`,
    { field: "mapping", reason: "invalid" },
  );
}

/**
 * One realisation of a proxy back-extended from sunspot number, for ensembles: the mapping's
 * parameters are drawn once ({@link drawSunspotMappingCoefficients}) and the mapping is
 * evaluated at every cell with them ({@link sunspotMappingValues}), so a member's error is
 * shared by all its cells as the mapping error is. Over many members the mean and variance of
 * each cell approach the mapped value and its delta-method variance (`evaluateSunspotMapping`
 * in ./sunspot_proxy_mapping.ts); exactly so for the linear form. Call it once per member
 * with that member's seeded stream.
 *
 * @param mapping the fitted mapping
 * @param sunspot sunspot number per cell (NaN gives NaN)
 * @param stream a seeded random stream (core/random)
 * @param options redraw limit
 * @returns the mapped proxy per cell for this draw
 * @throws {InputError} (field `mapping`) when the covariance is not finite or not positive
 *   definite, or no admissible R0 was drawn
 * @example
 * ```ts
 * import { drawMappedProxy } from "./back_extension.ts";
 * import { fitLinearSunspotMapping } from "./sunspot_proxy_mapping.ts";
 * import { randomStream } from "../random/mod.ts";
 * import assert from "node:assert/strict";
 * const m = fitLinearSunspotMapping([0, 50, 100, 150], [0.15, 0.1551, 0.1599, 0.165]);
 * const a = drawMappedProxy(m, [75], randomStream(1, 0));
 * const b = drawMappedProxy(m, [75], randomStream(1, 0));
 * assert.equal(a[0], b[0]); // same stream, same draw
 * assert.ok(Math.abs(a[0] - 0.1575) < 0.01);
 * ```
 */
export function drawMappedProxy(
  mapping: SunspotProxyMapping,
  sunspot: ArrayLike<number>,
  stream: RandomStream,
  options: DrawMappedProxyOptions = {},
): Float64Array {
  const c = drawSunspotMappingCoefficients(
    mapping,
    mappingCholesky(mapping),
    stream,
    options.maxRedraws ?? 100,
  );
  return sunspotMappingValues(mapping.form, c, sunspot, new Float64Array(sunspot.length));
}
