/**
 * The chart of one stored series: its values over decimal years, with a ±1σ band when the
 * series carries uncertainties.
 *
 * @module
 */
import type { StoredSeries } from "../store/types.ts";
import { formatIsoTime } from "../../core/time/mod.ts";
import type { ChartSpec, Layer } from "./chart.ts";
import { axisLabel, quantityLabel } from "./labels.ts";

/** Chart spec of a stored series. */
export function seriesChartSpec(s: StoredSeries): ChartSpec {
  const x = s.time;
  const layers: Layer[] = [];
  if (s.uncertainty) {
    const lower = new Float64Array(s.value.length);
    const upper = new Float64Array(s.value.length);
    for (let i = 0; i < s.value.length; i++) {
      lower[i] = s.value[i] - s.uncertainty[i];
      upper[i] = s.value[i] + s.uncertainty[i];
    }
    layers.push({ type: "band", label: "±1σ uncertainty", x, lower, upper });
  }
  layers.push({ type: "line", label: s.uncertainty ? s.name : undefined, x, y: s.value });
  const span = s.n
    ? `${formatIsoTime(s.start, s.resolution)} to ${formatIsoTime(s.end, s.resolution)}`
    : "no points";
  const notes: string[] = [];
  if (s.version) notes.push(`${quantityLabel(s.quantity)}, version ${s.version}.`);
  if (s.derived_from) notes.push(`Derived from run ${s.derived_from}.`);
  return {
    title: s.name,
    description: `Stored series "${s.name}" (${
      quantityLabel(s.quantity)
    }, ${s.resolution}, ${s.n} points, ${span}; id ${s.id}).`,
    x: { label: "Year", kind: "year" },
    y: { label: axisLabel(quantityLabel(s.quantity), s.units, s.quantity) },
    layers,
    notes,
  };
}
