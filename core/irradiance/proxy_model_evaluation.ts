/**
 * Evaluation of a proxy-regression TSI model (Foukal & Lean 1988, ApJ 328, 347; Lean 2000,
 * GRL 27, 2425; Fröhlich & Lean 2004, Astron. Astrophys. Rev. 12, 273):
 *
 *   TSI(t) = S_Q + Σ_k a_k·(F_k(t) − F_k,Q) − b·S_ref·PSI(t)
 *
 * written once: the regressor of each term (F_k − F_k,Q for a facular or other term,
 * −S_ref·PSI for the darkening term) and ŷ = β₀ + Σ_k β_k·x_k. Calibration builds its design
 * columns with {@link proxyRegressor}, reconstruction its regressor vectors, and the
 * back-extension residual process evaluates the model with {@link evaluateProxyModel}.
 *
 * @module
 */
import { InputError } from "../errors.ts";

/** Role of a model term. */
export type ProxyRole = "facular" | "sunspot_darkening" | "other";

/** What evaluating a model needs: coefficients [S_Q, β₁…β_K] and each term's role and level. */
export interface ProxyModelTerms {
  coefficients: readonly number[];
  terms: readonly { role: ProxyRole; quietLevel: number }[];
  /** S_ref of the darkening regressor, W m-2. */
  psiReference: number;
}

/**
 * The regressor of one term at one value: F − F_Q for a facular or other term (F_Q its
 * quiet-Sun level), −S_ref·PSI for the sunspot-darkening term (whose quiet level is 0).
 *
 * @param role the term's role
 * @param quietLevel F_Q (ignored for the darkening term)
 * @param psiReference S_ref, W m-2
 * @param value the proxy value (F, or the PSI as a fraction)
 * @returns the regressor x
 * @example
 * ```ts
 * import { proxyRegressor } from "./proxy_model_evaluation.ts";
 * import assert from "node:assert/strict";
 * assert.equal(proxyRegressor("facular", 0.15, 1360.8, 0.16), 0.16 - 0.15);
 * assert.equal(proxyRegressor("sunspot_darkening", 0, 1360.8, 1e-3), -1.3608);
 * ```
 */
export function proxyRegressor(
  role: ProxyRole,
  quietLevel: number,
  psiReference: number,
  value: number,
): number {
  return role === "sunspot_darkening" ? -psiReference * value : value - quietLevel;
}

/**
 * {@link proxyRegressor} over a whole column of proxy values (one term, many cells), the role
 * decided once: the same numbers as calling it per value.
 *
 * @param role the term's role
 * @param quietLevel F_Q (ignored for the darkening term)
 * @param psiReference S_ref, W m-2
 * @param values the proxy values (NaN stays NaN)
 * @param out where to write the regressors (length ≥ values.length) @default a new array
 * @returns `out`: the regressors, one per value
 * @example
 * ```ts
 * import { proxyRegressorColumn } from "./proxy_model_evaluation.ts";
 * import assert from "node:assert/strict";
 * const x = proxyRegressorColumn("sunspot_darkening", 0, 1360.8, Float64Array.of(1e-3, NaN));
 * assert.equal(x[0], -1.3608);
 * assert.ok(Number.isNaN(x[1]));
 * ```
 */
export function proxyRegressorColumn(
  role: ProxyRole,
  quietLevel: number,
  psiReference: number,
  values: ArrayLike<number>,
  out: Float64Array = new Float64Array(values.length),
): Float64Array {
  const n = values.length;
  if (role === "sunspot_darkening") {
    const s = -psiReference;
    for (let i = 0; i < n; i++) out[i] = s * values[i];
  } else for (let i = 0; i < n; i++) out[i] = values[i] - quietLevel;
  return out;
}

/**
 * dx/dF of a term's regressor: 1 for a facular or other term, −S_ref for the darkening term
 * (the factor that carries a proxy's variance into the regressor's).
 *
 * @param role the term's role
 * @param psiReference S_ref, W m-2
 * @returns the derivative of {@link proxyRegressor} in the proxy value
 * @example
 * ```ts
 * import { proxyRegressorScale } from "./proxy_model_evaluation.ts";
 * import assert from "node:assert/strict";
 * assert.equal(proxyRegressorScale("other", 1360.8), 1);
 * assert.equal(proxyRegressorScale("sunspot_darkening", 1360.8), -1360.8);
 * ```
 */
export function proxyRegressorScale(role: ProxyRole, psiReference: number): number {
  return role === "sunspot_darkening" ? -psiReference : 1;
}

/**
 * Evaluate the model at each point: ŷ = β₀ + Σ_k β_k·x_k with x_k = {@link proxyRegressor} of
 * term k; NaN where a proxy value is missing (NaN).
 *
 * @param model coefficients, terms and S_ref ({@link ProxyModelTerms})
 * @param values one array per term, all of the same length (proxy values, NaN for missing)
 * @returns ŷ per point, W m-2
 * @throws {InputError} (field `values`) when the number of arrays differs from the terms or the
 *   arrays differ in length; (field `coefficients`) when there are not K + 1 coefficients
 * @example
 * ```ts
 * import { evaluateProxyModel } from "./proxy_model_evaluation.ts";
 * import assert from "node:assert/strict";
 * const y = evaluateProxyModel({
 *   coefficients: [1360.8, 135, 0.96],
 *   terms: [{ role: "facular", quietLevel: 0.15 }, { role: "sunspot_darkening", quietLevel: 0 }],
 *   psiReference: 1360.8,
 * }, [[0.16], [1e-4]]);
 * assert.ok(Math.abs(y[0] - (1360.8 + 1.35 - 0.96 * 0.13608)) < 1e-9);
 * ```
 */
export function evaluateProxyModel(
  model: ProxyModelTerms,
  values: readonly ArrayLike<number>[],
): Float64Array {
  const K = model.terms.length;
  if (values.length !== K) {
    throw new InputError(
      `Cannot evaluate proxy model: it has ${K} terms but ${values.length} value arrays were given`,
      { field: "values", reason: "length_mismatch", value: values.length },
    );
  }
  if (model.coefficients.length !== K + 1) {
    throw new InputError(
      `Cannot evaluate proxy model: ${K} terms need ${
        K + 1
      } coefficients, got ${model.coefficients.length}`,
      { field: "coefficients", reason: "length_mismatch", value: model.coefficients.length },
    );
  }
  const n = K === 0 ? 0 : values[0].length;
  for (let k = 1; k < K; k++) {
    if (values[k].length !== n) {
      throw new InputError(
        `Cannot evaluate proxy model: value array ${k} has ${values[k].length} points, not ${n}`,
        { field: "values", reason: "length_mismatch", index: k, value: values[k].length },
      );
    }
  }
  const beta = model.coefficients, out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let y = beta[0];
    for (let k = 0; k < K; k++) {
      const t = model.terms[k];
      y += beta[k + 1] * proxyRegressor(t.role, t.quietLevel, model.psiReference, values[k][i]);
    }
    out[i] = y;
  }
  return out;
}
