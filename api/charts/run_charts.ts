/**
 * Charts of finished runs, chosen by `run.kind` from the stored result. Each kind may have a
 * specialised builder (in `api/charts/kinds/`); every builder reads the result defensively
 * and answers null when the shape is not what it knows, and then (or when a builder throws)
 * the generic chart is drawn: the run's series-like outputs as lines with their bands.
 *
 * @module
 */
import type { RunRecord } from "../store/types.ts";
import type { OutputSeries } from "../runs/kind.ts";
import type { ChartSpec, Layer } from "./chart.ts";
import { axisLabel, quantityLabel } from "./labels.ts";
import { outputsOf, strings } from "./read.ts";
import { KIND_CHARTS } from "./kinds/mod.ts";

/** A specialised chart builder: null when the result does not fit it. */
export type KindChart = (run: RunRecord) => ChartSpec | null;

/** "lag_correlation" → "Lag correlation". */
export function kindTitle(kind: string): string {
  const s = kind.replace(/[_-]+/g, " ").trim();
  return s ? s[0].toUpperCase() + s.slice(1) : "Run";
}

/** The notes every run chart carries: its cautions, then its warnings. */
export function runNotes(run: RunRecord): string[] {
  const r = run.result ?? {};
  return [
    ...strings(r.cautions),
    ...strings(r.warnings).map((w) => `Warning: ${w}`),
  ];
}

/** The opening of a run chart's description. */
export function runDescription(run: RunRecord, what: string): string {
  return `${what} Run ${run.id} of kind ${run.kind} (algorithm ${run.algorithm_version}), ` +
    `result digest sha256:${run.result_digest ?? "none"}.`;
}

/** Band then line layers of one output (band from lower/upper, else ±1σ uncertainty). */
export function outputLayers(o: OutputSeries, color?: number, label?: string): Layer[] {
  const layers: Layer[] = [];
  if (o.lower && o.upper) {
    layers.push({
      type: "band",
      label: o.interval ?? `${label ?? o.name}: interval`,
      x: o.time,
      lower: o.lower,
      upper: o.upper,
      color,
    });
  } else if (o.uncertainty) {
    const u = o.uncertainty;
    layers.push({
      type: "band",
      label: `${label ?? o.name}: ±1σ`,
      x: o.time,
      lower: o.value.map((v, i) => (v === null || u[i] === null ? null : v - (u[i] as number))),
      upper: o.value.map((v, i) => (v === null || u[i] === null ? null : v + (u[i] as number))),
      color,
    });
  }
  layers.push({ type: "line", label: label ?? o.name, x: o.time, y: o.value, color });
  return layers;
}

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
