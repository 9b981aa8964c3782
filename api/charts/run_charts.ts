/**
 * Charts of finished runs: the analysis' own chart (declared in its folder and typed on its
 * result) when it has one and the stored result parses with its result schema, else the
 * generic chart of the run's series-like outputs with their bands.
 *
 * @module
 */
import type { RunRecord, StoredSeries } from "../store/types.ts";
import type { RunKind } from "../runs/kind.ts";
import type { ChartSpec } from "./chart.ts";
import type { MapChartSpec } from "./map_chart.ts";
import { defaultRunChart } from "./default_chart.ts";

export { defaultRunChart };

/** True when the chart of this run's analysis draws the run's input series too. */
export function chartNeedsInputs(kind: RunKind | undefined): boolean {
  return kind?.chart?.needsInputs === true;
}

/** The names of the other views an analysis' chart offers (`?view=`), besides the default. */
export function chartViews(kind: RunKind | undefined): string[] {
  return Object.keys(kind?.chart?.views ?? {});
}

/**
 * The chart spec of a finished run: its analysis' chart (or the named view of it) when it
 * fits, else the generic one.
 */
export function runChartSpec(
  run: RunRecord,
  kind: RunKind | undefined,
  inputs: StoredSeries[] = [],
  view?: string,
): ChartSpec | MapChartSpec {
  if (kind?.chart) {
    // A stored result of an older shape (before an algorithm change) gets the generic chart.
    const parsed = kind.result.safeParse(run.result);
    if (parsed.success) {
      const build = view === undefined ? kind.chart.build : kind.chart.views?.[view]?.build;
      const spec = build?.(run, parsed.data, inputs);
      if (spec) return spec;
    }
  }
  return defaultRunChart(run);
}
