/**
 * Chart of the "solar-signal-maps" analysis: the slope at each cell's best lag on a diverging
 * scale, cells significant by the false discovery rate stippled, with the field significance,
 * the warnings and the cautions under the map.
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import { mapChartOf } from "../common/map_result.ts";
import type { SolarSignalMapResultOut } from "./result.ts";

export const solarSignalMapChart: KindChart<SolarSignalMapResultOut> = {
  build(run, r) {
    const fs = r.field_significance;
    const mc = fs.monte_carlo;
    const summary = `Field significance: ${fs.fdr.cells_significant} of ${fs.fdr.cells_tested} ` +
      `cells (${(100 * fs.fdr.area_fraction).toFixed(1)} % of the area) pass the false ` +
      `discovery rate at ${fs.fdr.alpha_fdr}` +
      (mc
        ? `; Monte Carlo (${mc.surrogates} surrogates): ${(100 * mc.observed_best).toFixed(1)} % ` +
          `of the area locally significant at lag ${mc.best_lag}, p_field = ${
            mc.p_field.toPrecision(2)
          }.`
        : "; no Monte Carlo test.");
    return mapChartOf(
      r.map,
      `Solar signal in ${r.field.name}: slope on ${r.predictor.name} at the best lag ` +
        `(${r.start_period} to ${r.end_period}, lags ${r.lags[0].lag}..${
          r.lags[r.lags.length - 1].lag
        } ${r.lag_unit})`,
      `Per-cell regression slope of the field on the solar series at the lag of the largest ` +
        `|r|, ${r.preprocess} trend removed${r.deseasonalised ? ", deseasonalised" : ""}.`,
      [summary, ...r.warnings, ...r.cautions],
      run,
    );
  },
};
