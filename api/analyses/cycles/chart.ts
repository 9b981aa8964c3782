/**
 * Chart of the "cycles" analysis: the cycle table drawn over the smoothed series — the smoothed
 * curve used to find the extrema, minima and maxima as markers (a provisional maximum as a
 * diamond), and a vertical line with the cycle number at every cycle start; the observed
 * series behind.
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import type { Layer } from "../../charts/chart.ts";
import { inputBackdrop, runDescription, runNotes, runTitle } from "../../charts/run_common.ts";
import { axisLabel, quantityLabel } from "../../charts/labels.ts";
import type { CyclesResultOut } from "./result.ts";

type Marks = { x: number[]; y: number[] };

/** Start lines and extremum markers of the cycle table. */
function cycleMarks(r: CyclesResultOut) {
  const lines: Layer[] = [];
  const min: Marks = { x: [], y: [] },
    max: Marks = { x: [], y: [] },
    prov: Marks = { x: [], y: [] };
  for (const c of r.cycles) {
    min.x.push(c.start.decimal_year);
    min.y.push(c.start.value);
    lines.push({
      type: "vline",
      x: c.start.decimal_year,
      text: `${c.number !== null ? "cycle " : "#"}${c.number ?? c.index}`,
      dash: "dotted",
    });
    if (c.maximum) {
      const m = c.maximum.provisional ? prov : max;
      m.x.push(c.maximum.decimal_year);
      m.y.push(c.maximum.value);
    }
  }
  // The end of the last complete cycle is the start of the next (already drawn) or, for the
  // final complete cycle without a successor row, its end minimum.
  const end = r.cycles[r.cycles.length - 1]?.end;
  if (end && !min.x.includes(end.decimal_year)) {
    min.x.push(end.decimal_year);
    min.y.push(end.value);
  }
  return { lines, min, max, prov };
}

/** "N complete cycles, mean length …" under the plot. */
function summaryNote(r: CyclesResultOut): string {
  const { complete_cycles: n, length_years: len, in_progress } = r.summary;
  return `${n} complete cycle${n === 1 ? "" : "s"}` +
    (len.mean !== null
      ? `, mean length ${len.mean.toFixed(2)} yr${
        len.sd !== null ? ` (sd ${len.sd.toFixed(2)})` : ""
      }`
      : "") +
    (in_progress ? "; the last cycle is in progress." : ".");
}

export const cyclesChart: KindChart<CyclesResultOut> = {
  needsInputs: true,
  build(run, r, inputs) {
    const smoothed = r.outputs.smoothed;
    const { lines, min, max, prov } = cycleMarks(r);
    const marker = (
      label: string,
      m: Marks,
      marker: "triangle-down" | "triangle-up" | "diamond",
      color: number,
    ): Layer => ({ type: "points", label, ...m, marker, size: 55, color });
    const layers: Layer[] = [
      ...inputBackdrop(inputs, smoothed.quantity, smoothed.units),
      { type: "line", label: smoothed.name, x: smoothed.time, y: smoothed.value, color: 0 },
      ...lines,
      marker("cycle minima", min, "triangle-down", 2),
      marker("cycle maxima", max, "triangle-up", 1),
      ...(prov.x.length ? [marker("provisional maximum", prov, "diamond", 4)] : []),
    ];
    return {
      title: runTitle(`Solar cycles${r.input.name ? ` of ${r.input.name}` : ""}`, run),
      description: runDescription(
        run,
        `Cycle table over the ${r.smoothing} series: ${r.cycles.length} cycles, ` +
          `${min.x.length} minima and ${max.x.length + prov.x.length} maxima marked.`,
      ),
      x: { label: "Year", kind: "year" },
      y: {
        label: axisLabel(quantityLabel(smoothed.quantity), smoothed.units, smoothed.quantity),
        includeZero: true,
      },
      layers,
      ...runNotes(run, [summaryNote(r)]),
    };
  },
};
