/**
 * The generic run chart: a run's series-like outputs as lines with their bands.
 *
 * @module
 */
import type { RunRecord } from "../store/types.ts";
import type { ChartSpec, Layer } from "./chart.ts";
import { axisLabel, quantityLabel } from "./labels.ts";
import { outputsOf } from "./read.ts";
import { kindTitle, outputLayers, runDescription, runNotes, runTitle } from "./run_common.ts";

/**
 * The generic chart of a run: its outputs that share the units of the first one, as lines
 * with bands (at most 7; the others are named in a note).
 */
export function defaultRunChart(run: RunRecord): ChartSpec {
  const outs = outputsOf(run.result);
  const notes: string[] = [];
  const title = runTitle(kindTitle(run.kind), run);
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
      ...runNotes(run, notes),
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
    ...runNotes(run, notes),
  };
}
