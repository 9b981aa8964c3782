/**
 * Pieces shared by run charts: titles, notes (cautions and warnings), descriptions, and the
 * band-and-line layers of a series-like output.
 *
 * @module
 */
import type { RunRecord, StoredSeries } from "../store/types.ts";
import type { OutputSeries } from "../runs/kind.ts";
import type { Layer } from "./chart.ts";
import { strings } from "./read.ts";

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
