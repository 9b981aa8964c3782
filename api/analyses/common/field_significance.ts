/**
 * The field-significance parts of a gridded result, as the result schemas publish them: the
 * false discovery rate over a map (core/field/false_discovery_rate.ts) and the summary of a
 * Monte Carlo null distribution (core/field/field_monte_carlo_summary.ts), in the API's
 * snake_case with null where the method leaves a number undefined.
 *
 * @module
 */
import type { FieldFdrResult, FieldNullSummary } from "../../../core/field/mod.ts";

/** The FDR part of a result; `pUsed` says which per-cell p entered the procedure. */
export function fdrPart(fdr: FieldFdrResult, pUsed: string) {
  return {
    alpha_global: fdr.alphaGlobal,
    alpha_fdr: fdr.alphaFdr,
    p_used: pUsed,
    p_threshold: fdr.pThreshold,
    cells_tested: fdr.tested,
    cells_significant: fdr.count,
    area_fraction: fdr.areaFraction,
    field_significant: fdr.fieldSignificant,
  };
}

/** The null-distribution part of a Monte Carlo result (bimodality null when undefined). */
export function nullPart(n: FieldNullSummary) {
  return {
    mean: n.mean,
    sd: n.sd,
    q50: n.q50,
    q90: n.q90,
    q95: n.q95,
    q99: n.q99,
    max: n.max,
    zero_fraction: n.zeroFraction,
    histogram: n.histogram,
    bimodality: Number.isFinite(n.bimodality) ? n.bimodality : null,
  };
}
