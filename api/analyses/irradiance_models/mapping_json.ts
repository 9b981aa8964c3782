/**
 * Sunspot → proxy mappings between core (`SunspotProxyMapping`, camelCase, infinite variance
 * where R0 is not identified) and the stored result (snake_case JSON, null for an infinite or
 * undefined number), both ways.
 *
 * @module
 */
import type { SunspotMappingChoice, SunspotProxyMapping } from "../../../core/irradiance/mod.ts";
import type { SunspotMappingJson } from "./result.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";

/** A core mapping as stored. */
export function mappingJson(m: SunspotProxyMapping): SunspotMappingJson {
  return {
    form: m.form,
    names: m.names,
    coefficients: m.coefficients,
    covariance: m.covariance.map((row) => row.map((x) => undefinedAsNull(x))),
    standard_errors: undefinedAsNull(m.standardErrors),
    n: m.n,
    sigma: m.sigma,
    residual_rms: m.residualRms,
    r_squared: m.rSquared,
    aic: undefinedAsNull(m.aic),
    bic: undefinedAsNull(m.bic),
    residual_lag1: m.residualLag1,
    sunspot_min: m.sunspotMin,
    sunspot_max: m.sunspotMax,
  };
}

/** Both fits and the choice, as stored. */
export function mappingChoiceJson(c: SunspotMappingChoice) {
  return {
    chosen: mappingJson(c.chosen),
    linear: mappingJson(c.linear),
    saturating: c.saturating ? mappingJson(c.saturating) : null,
    reason: c.reason,
  };
}

/** A stored mapping back in core's form (null variances are infinite). */
export function mappingFromJson(m: SunspotMappingJson): SunspotProxyMapping {
  const inf = (x: number | null) => x ?? Infinity;
  return {
    form: m.form,
    names: m.names,
    coefficients: m.coefficients,
    covariance: m.covariance.map((row) => row.map(inf)),
    standardErrors: m.standard_errors.map(inf),
    n: m.n,
    sigma: m.sigma,
    residualRms: m.residual_rms,
    rSquared: m.r_squared,
    aic: m.aic ?? -Infinity,
    bic: m.bic ?? -Infinity,
    residualLag1: m.residual_lag1,
    sunspotMin: m.sunspot_min,
    sunspotMax: m.sunspot_max,
  };
}
