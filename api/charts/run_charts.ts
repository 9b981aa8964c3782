/**
 * Charts of finished runs, chosen by `run.kind` from the stored result. Each kind may have a
 * specialised builder (in `api/charts/kinds/`); every builder reads the result defensively
 * and answers null when the shape is not what it knows, and then (or when a builder throws)
 * the generic chart is drawn: the run's series-like outputs as lines with their bands.
 *
 * @module
 */
import type { RunRecord } from "../store/types.ts";
import type { ChartSpec, Layer } from "./chart.ts";
import { axisLabel, quantityLabel } from "./labels.ts";
import { outputsOf } from "./read.ts";
import { KIND_CHARTS } from "./kinds/mod.ts";
import { kindTitle, outputLayers, runDescription, runNotes } from "./run_common.ts";

export type { KindChart } from "./run_common.ts";

/**
 * The generic chart of a run: its outputs that share the units of the first one, as lines
 * with bands (at most 7; the others are named in a note).
 */
export function defaultRunChart(run: RunRecord): ChartSpec {
  const outs = outputsOf(run.result);
  const notes = runNotes(run);
  const title = `${kindTitle(run.kind)} · run ${run.id.slice(0, 8)}`;
  if (!outs.length) {
    return {
      title,
      description: runDescription(
        run,
        "This run has no series-like outputs to draw; its numbers are in the run's JSON.",
      ),
      x: { label: "Year", kind: "year" },
      y: { label: "Value" },
      layers: [],
      notes,
    };
  }
  const first = outs[0][1];
  const same = outs.filter(([, o]) => o.units === first.units && o.quantity === first.quantity)
    .slice(0, 7);
  const left = outs.filter(([k]) => !same.some(([s]) => s === k));
  if (left.length) {
    notes.push(
      `Not drawn (other units or too many): ${
        left.map(([k]) => k).join(", ")
      }; fetch each at /v1/runs/${run.id}/outputs/{name}.`,
    );
  }
  const layers: Layer[] = [];
  same.forEach(([, o], i) => layers.push(...outputLayers(o, i)));
  return {
    title,
    description: runDescription(
      run,
      `Outputs ${same.map(([k]) => `"${k}"`).join(", ")} of the run.`,
    ),
    x: { label: "Year", kind: "year" },
    y: { label: axisLabel(quantityLabel(first.quantity), first.units, first.quantity) },
    layers,
    notes,
  };
}

/** The chart spec of a finished run: the kind's own chart when it fits, else the generic one. */
export function runChartSpec(run: RunRecord): ChartSpec {
  const special = KIND_CHARTS[run.kind];
  if (special) {
    try {
      const spec = special(run);
      if (spec) return spec;
    } catch {
      // A result shape this builder does not know: draw the generic chart instead.
    }
  }
  return defaultRunChart(run);
}
