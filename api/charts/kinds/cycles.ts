/**
 * Chart of a "cycles" run: the cycle table drawn over the smoothed series — the smoothed curve
 * used to find the extrema, minima and maxima as markers (a provisional maximum as a diamond),
 * and a vertical line with the cycle number at every cycle start.
 *
 * @module
 */
import type { RunRecord, StoredSeries } from "../../store/types.ts";
import type { ChartSpec, Layer } from "../chart.ts";
import { inputBackdrop, runDescription, runNotes } from "../run_common.ts";
import { numOrNull, obj, objects, outputSeries, str } from "../read.ts";
import { axisLabel, quantityLabel } from "../labels.ts";

/** Chart spec, or null when the result has no smoothed output and cycle table. */
export function cyclesChart(run: RunRecord, inputs: StoredSeries[] = []): ChartSpec | null {
  const r = run.result;
  const smoothed = outputSeries(obj(r?.outputs)?.smoothed, "smoothed");
  const cycles = objects(r?.cycles);
  if (!r || !smoothed || !cycles) return null;
  const layers: Layer[] = [
    ...inputBackdrop(inputs, smoothed.quantity, smoothed.units),
    { type: "line", label: smoothed.name, x: smoothed.time, y: smoothed.value, color: 0 },
  ];
  const minX: number[] = [], minY: number[] = [];
  const maxX: number[] = [], maxY: number[] = [];
  const provX: number[] = [], provY: number[] = [];
  for (const c of cycles) {
    const start = obj(c.start), max = obj(c.maximum);
    const st = numOrNull(start?.decimal_year), sv = numOrNull(start?.value);
    if (st !== null && sv !== null) {
      minX.push(st);
      minY.push(sv);
      const label = numOrNull(c.number) ?? numOrNull(c.index);
      layers.push({
        type: "vline",
        x: st,
        text: label !== null
          ? `${numOrNull(c.number) !== null ? "cycle " : "#"}${label}`
          : undefined,
        dash: "dotted",
      });
    }
    const mt = numOrNull(max?.decimal_year), mv = numOrNull(max?.value);
    if (mt !== null && mv !== null) {
      if (max?.provisional === true) {
        provX.push(mt);
        provY.push(mv);
      } else {
        maxX.push(mt);
        maxY.push(mv);
      }
    }
  }
  // The end of the last complete cycle is the start of the next (already drawn) or, for the
  // final complete cycle without a successor row, its end minimum.
  const last = cycles[cycles.length - 1];
  const endT = numOrNull(obj(last?.end)?.decimal_year), endV = numOrNull(obj(last?.end)?.value);
  if (endT !== null && endV !== null && !minX.includes(endT)) {
    minX.push(endT);
    minY.push(endV);
  }
  layers.push({
    type: "points",
    label: "cycle minima",
    x: minX,
    y: minY,
    marker: "triangle-down",
    size: 55,
    color: 2,
  });
  layers.push({
    type: "points",
    label: "cycle maxima",
    x: maxX,
    y: maxY,
    marker: "triangle-up",
    size: 55,
    color: 1,
  });
  if (provX.length) {
    layers.push({
      type: "points",
      label: "provisional maximum",
      x: provX,
      y: provY,
      marker: "diamond",
      size: 55,
      color: 4,
    });
  }
  const summary = obj(r.summary);
  const len = obj(summary?.length_years);
  const mean = numOrNull(len?.mean), sd = numOrNull(len?.sd);
  const complete = numOrNull(summary?.complete_cycles);
  const notes = [
    ...(complete !== null
      ? [
        `${complete} complete cycle${complete === 1 ? "" : "s"}` +
        (mean !== null
          ? `, mean length ${mean.toFixed(2)} yr${sd !== null ? ` (sd ${sd.toFixed(2)})` : ""}`
          : "") +
        (summary?.in_progress === true ? "; the last cycle is in progress." : "."),
      ]
      : []),
    ...runNotes(run),
  ];
  const input = obj(r.input);
  const name = str(input?.name);
  return {
    title: `Solar cycles${name ? ` of ${name}` : ""} · run ${run.id.slice(0, 8)}`,
    description: runDescription(
      run,
      `Cycle table over the ${str(r.smoothing) ?? "smoothed"} series: ${cycles.length} cycles, ` +
        `${minX.length} minima and ${maxX.length + provX.length} maxima marked.`,
    ),
    x: { label: "Year", kind: "year" },
    y: {
      label: axisLabel(quantityLabel(smoothed.quantity), smoothed.units, smoothed.quantity),
      includeZero: true,
    },
    layers,
    notes,
  };
}
