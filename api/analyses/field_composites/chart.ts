/**
 * Chart of the "field-composites" analysis: the composite map on a diverging scale, cells
 * significant by the false discovery rate stippled, field significance and notes under it.
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import { mapChartOf } from "../common/map_result.ts";
import type { FieldCompositeResultOut } from "./result.ts";

export const fieldCompositeChart: KindChart<FieldCompositeResultOut> = {
  build(run, r) {
    const fs = r.field_significance;
    const mc = fs.monte_carlo;
    const two = r.contrast_used.length > 0;
    const summary =
      `${r.epochs_used.length} epochs${
        two ? ` against ${r.contrast_used.length}` : ""
      }, window steps ${r.window.from}..${r.window.to} (${r.offset_unit}). Field significance: ` +
      `${fs.fdr.cells_significant} of ${fs.fdr.cells_tested} cells pass the false discovery ` +
      `rate at ${fs.fdr.alpha_fdr}` +
      (mc
        ? `; Monte Carlo (${mc.random_sets} random epoch sets): ${
          (100 * mc.observed_fraction).toFixed(1)
        } % of the area locally significant, p_field = ${mc.p_field.toPrecision(2)}.`
        : "; no Monte Carlo test.");
    return mapChartOf(
      r.map,
      `Composite of ${r.field.name}${two ? " (first set − second set)" : ""}`,
      `Superposed-epoch composite map, ${r.preprocess} trend removed${
        r.deseasonalised ? ", deseasonalised" : ""
      }.`,
      [summary, ...r.warnings, ...r.cautions],
      run,
    );
  },
};
