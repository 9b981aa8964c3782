/**
 * What a reported uncertainty band contains and what it leaves out, said once for the
 * reconstruction and passed on, unchanged, to every run built on it (forcing, energy balance,
 * lag correlations, attributions): a schema, the standard lists with their sources, and the
 * caution line results and charts print.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import { ERROR_SOURCES, type ErrorSource } from "../../../core/irradiance/mod.ts";

/** Description of each source of uncertainty a band may include. */
export const SOURCE_DESCRIPTIONS: Record<ErrorSource, string> = {
  calibration: "the calibration coefficients of the proxy model (their covariance)",
  residual: "the residual noise of the model (AR(1) processes of the model with observed " +
    "proxies and of the model with proxies mapped from sunspot number)",
  mapping: "the parameters of the sunspot-number → proxy mappings of the back-extension",
  input: "the sunspot number's own error (its stated or modelled uncertainty)",
};

/** Sources no band of a proxy reconstruction contains, with their published scale. */
export const SOURCES_NEVER_INCLUDED = [
  "the spread between published reconstruction methods (other proxies, models and " +
  "sunspot-number series give pre-satellite TSI histories that differ by more than this band)",
  "an unknown secular trend of quiet-Sun irradiance (long-term; published Maunder Minimum " +
  "deficits span −0.75 to +6.3 W m-2, Yeo et al. 2020, GRL)",
  "the absolute scale of the TSI record the model was calibrated on (1360.8 ± 0.5 W m-2 at " +
  "the 2008 minimum; Kopp & Lean 2011, GRL 38, L01706)",
  "changes of the proxy relations outside the calibration era (the mappings are assumed to " +
  "hold back in time)",
];

/** The band part of a result. */
export const UncertaintyBandSchema = z.object({
  method: z.enum(["ensemble_quantiles", "ensemble_sd", "analytic", "independent_points", "none"])
    .openapi({
      description: "How the reported interval was made: quantiles of the ensemble members " +
        "(`ensemble_quantiles`, 100 members or more), ± the normal quantile × the ensemble SD " +
        "(`ensemble_sd`, fewer members), ± the quantile × the analytic SD of the linearised " +
        "error model (`analytic`), from a series' own point uncertainties taken as independent " +
        "(`independent_points`), or no interval (`none`)",
    }),
  included: z.array(z.object({
    source: z.enum(ERROR_SOURCES),
    description: z.string(),
  })).openapi({ description: "The sources of uncertainty the interval contains" }),
  not_included: z.array(z.string()).openapi({
    description: "Sources of uncertainty the interval does not contain",
  }),
}).openapi("UncertaintyBand");

/** The band part as `compute` builds it. */
export type UncertaintyBand = z.input<typeof UncertaintyBandSchema>;

/**
 * A band with the given method and included sources, the standard exclusions and any extra
 * ones.
 */
export function uncertaintyBand(
  method: UncertaintyBand["method"],
  included: readonly ErrorSource[],
  extraNotIncluded: readonly string[] = [],
): UncertaintyBand {
  return {
    method,
    included: ERROR_SOURCES.filter((s) => included.includes(s)).map((source) => ({
      source,
      description: SOURCE_DESCRIPTIONS[source],
    })),
    not_included: [...SOURCES_NEVER_INCLUDED, ...extraNotIncluded],
  };
}

/** The caution line of a band: what its interval contains and what it does not. */
export function bandCaution(band: UncertaintyBand, what = "The uncertainty band"): string {
  const inc = band.included.length
    ? `includes ${band.included.map((s) => s.source).join(", ")} uncertainty`
    : "includes no source of uncertainty";
  return `${what} (${band.method.replaceAll("_", " ")}) ${inc}; it does not include ${
    band.not_included.join("; ")
  }.`;
}

/**
 * The band statement of a stored result as global attributes of a NetCDF file: the method, the
 * sources included and those not included (one per line); none when the result states no band.
 *
 * @param result a stored run result
 */
export function bandAttributes(result: unknown): [string, string][] {
  const parsed = z.object({ band: UncertaintyBandSchema.nullable().optional() }).safeParse(result);
  const band = parsed.success ? parsed.data.band : null;
  if (!band) return [];
  return [
    ["uncertainty_band_method", band.method],
    [
      "uncertainty_sources_included",
      band.included.map((s) => `${s.source}: ${s.description}`).join("\n") || "none",
    ],
    ["uncertainty_sources_not_included", band.not_included.join("\n")],
  ];
}

/**
 * The band of a proxy reconstruction (TSI or spectral): calibration and residual always, the
 * mappings where some cell was back-extended, the sunspot number's own error where it was
 * propagated; the method from the number of members (quantiles from
 * `minMembersForQuantiles`, ± z·SD below, analytic without members).
 *
 * @param realizations ensemble members (0 = analytic)
 * @param backExtended some cell was back-extended
 * @param inputErrors the sunspot number's own error was propagated
 * @param minMembersForQuantiles members from which the band is the members' quantiles
 * @param extraNotIncluded sources the band leaves out besides the standard ones
 */
export function proxyReconstructionBand(
  realizations: number,
  backExtended: boolean,
  inputErrors: boolean,
  minMembersForQuantiles: number,
  extraNotIncluded: readonly string[] = [],
): UncertaintyBand {
  const included: ErrorSource[] = ["calibration", "residual"];
  if (backExtended) included.push("mapping");
  if (backExtended && inputErrors) included.push("input");
  const method = realizations >= minMembersForQuantiles
    ? "ensemble_quantiles"
    : realizations > 0
    ? "ensemble_sd"
    : "analytic";
  return uncertaintyBand(method, included, extraNotIncluded);
}
