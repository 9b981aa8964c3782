/**
 * Chart of a "composites" run (superposed epoch analysis): the composite against time from the
 * epoch with its bootstrap band over epochs, the epoch marked at 0, and the offsets where the
 * composite is unusual against random epoch sets (pointwise p < 0.05) marked.
 *
 * @module
 */
import type { RunRecord } from "../../store/types.ts";
import type { ChartSpec, Layer } from "../chart.ts";
import { runDescription, runNotes } from "../run_common.ts";
import { numOrNull, obj, objects, outputSeries, str } from "../read.ts";
import { axisLabel, quantityLabel } from "../labels.ts";

/** Chart spec, or null when the result has no composite output. */
export function compositesChart(run: RunRecord): ChartSpec | null {
  const r = run.result;
  const o = outputSeries(obj(r?.outputs)?.composite, "composite");
  if (!r || !o) return null;
  const layers: Layer[] = [{ type: "hline", y: 0, color: "foreground", dash: "solid" }];
  if (o.lower && o.upper) {
    layers.push({
      type: "band",
      label: o.interval ?? "band",
      x: o.time,
      lower: o.lower,
      upper: o.upper,
      color: 0,
    });
  }
  const used = Array.isArray(r.epochs_used) ? r.epochs_used.length : null;
  layers.push({
    type: "line",
    label: `composite${used !== null ? ` of ${used} epochs` : ""}`,
    x: o.time,
    y: o.value,
    color: 0,
  });
  layers.push({ type: "vline", x: 0, text: "epoch", dash: "dashed" });
  const sx: number[] = [], sy: number[] = [];
  for (const row of objects(r.offsets) ?? []) {
    const p = numOrNull(row.p_random_epochs),
      x = numOrNull(row.offset_years),
      y = numOrNull(row.composite);
    if (p !== null && x !== null && y !== null && p < 0.05) {
      sx.push(x);
      sy.push(y);
    }
  }
  if (sx.length) {
    layers.push({
      type: "points",
      label: "p < 0.05 against random epochs (pointwise)",
      x: sx,
      y: sy,
      marker: "circle",
      size: 30,
      color: 1,
    });
  }
  const fw = numOrNull(r.p_family_wise);
  const notes = [
    ...(fw !== null
      ? [`Family-wise p-value over the window against random epoch sets: ${fw.toPrecision(3)}.`]
      : []),
    ...runNotes(run),
  ];
  return {
    title: `Superposed epoch composite · run ${run.id.slice(0, 8)}`,
    description: runDescription(
      run,
      `${o.name} against years from the epoch${used !== null ? `, over ${used} epochs` : ""}` +
        `${str(r.band) ? `, with a ${str(r.band)}` : ""}.`,
    ),
    x: { label: "Years from the epoch", kind: "linear" },
    y: { label: axisLabel(quantityLabel(o.quantity), o.units, o.quantity) },
    layers,
    notes,
  };
}
