/**
 * Charts of finished runs, chosen by `run.kind` from the stored result. Each kind may have a
 * specialised builder (in `api/charts/kinds/`); every builder reads the result defensively
 * and answers null when the shape is not what it knows, and then (or when a builder throws)
 * the generic chart is drawn: the run's series-like outputs as lines with their bands.
 *
 * @module
 */
import type { RunRecord, StoredSeries } from "../store/types.ts";
import type { ChartSpec } from "./chart.ts";
import { KIND_CHARTS, KIND_INPUTS } from "./kinds/mod.ts";
import { defaultRunChart } from "./default_chart.ts";

export type { KindChart } from "./run_common.ts";
export { defaultRunChart };

/** True when the chart of this kind draws the run's input series too. */
export function chartNeedsInputs(kind: string): boolean {
  return KIND_INPUTS.has(kind);
}

/** The chart spec of a finished run: the kind's own chart when it fits, else the generic one. */
export function runChartSpec(run: RunRecord, inputs: StoredSeries[] = []): ChartSpec {
  const special = KIND_CHARTS[run.kind];
  if (special) {
    try {
      const spec = special(run, inputs);
      if (spec) return spec;
    } catch {
      // A result shape this builder does not know: draw the generic chart instead.
    }
  }
  return defaultRunChart(run);
}
