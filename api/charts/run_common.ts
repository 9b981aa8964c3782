/**
 * Pieces shared by run charts: titles with the run's label, the lines under the plot (warnings,
 * own and inherited, always whole; notes and cautions shortenable), descriptions, and the
 * band-and-line layers of a series-like output.
 *
 * @module
 */
import type { RunRecord, StoredSeries } from "../store/types.ts";
import type { OutputSeries } from "../runs/kind.ts";
import type { Layer } from "./chart.ts";
import { strings } from "./read.ts";
import { runLabel } from "../runs/label.ts";
import { inheritedOf, inheritedSource } from "../runs/inherit.ts";

/**
 * The input series of the given quantity and units as thin muted lines, to draw behind a
 * result derived from them (a smoothing over its raw values, a forecast after the observed
 * record). Points before `from` (decimal years) are left out.
 */
export function inputBackdrop(
  inputs: StoredSeries[],
  quantity: string,
  units: string,
  from = -Infinity,
): Layer[] {
  const layers: Layer[] = [];
  for (const s of inputs) {
    if (s.quantity !== quantity || s.units !== units) continue;
    let a = 0;
    while (a < s.n && s.time[a] < from) a++;
    if (a >= s.n) continue;
    layers.push({
      type: "line",
      label: `observed: ${s.name}`,
      x: s.time.subarray(a),
      y: s.value.subarray(a),
      color: "muted",
      width: 0.9,
    });
  }
  return layers;
}

/** "lag_correlation" → "Lag correlation". */
export function kindTitle(kind: string): string {
  const s = kind.replace(/[_-]+/g, " ").trim();
  return s ? s[0].toUpperCase() + s.slice(1) : "Run";
}

/** A run chart's title: what it shows, then the run's short label. */
export function runTitle(what: string, run: RunRecord): string {
  return `${what} · run ${runLabel(run.id)}`;
}

/** What a run chart shows under its plot. */
export interface RunChartNotes {
  /** Notes that may be shortened to a pointer when room is short: method notes, cautions. */
  notes: string[];
  /** Lines always shown whole: the statements given, then every warning. */
  keep: string[];
  /** Where the shortened notes are read: the run, by its label. */
  notesRef: string;
}

/**
 * The lines under a run chart: `notes` (the chart's own method notes) and the run's cautions,
 * own then inherited, may be shortened; `keep` (statements the chart cannot be read without),
 * the run's first caution and its warnings, own then inherited, are always shown whole.
 */
export function runNotes(run: RunRecord, notes: string[] = [], keep: string[] = []): RunChartNotes {
  const r = run.result ?? {};
  const inherited = inheritedOf(r);
  const from = (level: "warning" | "caution") =>
    inherited.filter((n) => n.level === level).map((n) => ({
      source: inheritedSource(n),
      text: n.text,
    }));
  // The kind's first caution (correlation is not attribution, reconstructions are
  // model-dependent, ...) is never shortened: a chart shown alone must still say it.
  const [primary, ...otherCautions] = strings(r.cautions);
  return {
    notes: [
      ...notes,
      ...otherCautions,
      ...from("caution").map((n) => `From ${n.source}: ${n.text}`),
    ],
    keep: [
      ...keep,
      ...(primary ? [primary] : []),
      ...strings(r.warnings).map((w) => `Warning: ${w}`),
      ...from("warning").map((n) => `Warning (from ${n.source}): ${n.text}`),
    ],
    notesRef: `run ${runLabel(run.id)}`,
  };
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
