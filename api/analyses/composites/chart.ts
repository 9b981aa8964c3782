/**
 * Chart of the "composites" analysis (superposed epoch analysis): the composite against time
 * from the epoch with its bootstrap band over epochs, the epoch marked at 0, and the offsets
 * where the composite is unusual against random epoch sets (pointwise p < 0.05) marked.
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import type { Layer } from "../../charts/chart.ts";
import { runDescription, runNotes, runTitle } from "../../charts/run_common.ts";
import { axisLabel, quantityLabel } from "../../charts/labels.ts";
import type { CompositeResultOut } from "./result.ts";

export const compositesChart: KindChart<CompositeResultOut> = {
  build(run, r) {
    const o = r.outputs.composite;
    const used = r.epochs_used.length;
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
    layers.push({
      type: "line",
      label: `composite of ${used} epochs`,
      x: o.time,
      y: o.value,
      color: 0,
    });
    layers.push({ type: "vline", x: 0, text: "epoch", dash: "dashed" });
    const unusual = r.offsets.filter((row) =>
      row.p_random_epochs !== null && row.composite !== null && row.p_random_epochs < 0.05
    );
    if (unusual.length) {
      layers.push({
        type: "points",
        label: "p < 0.05 against random epochs (pointwise)",
        x: unusual.map((row) => row.offset_years),
        y: unusual.map((row) => row.composite!),
        marker: "circle",
        size: 30,
        color: 1,
      });
    }
    return {
      title: runTitle("Superposed epoch composite", run),
      description: runDescription(
        run,
        `${o.name} against years from the epoch, over ${used} epochs, with a ${r.band}.` +
          (r.seasonal_cycle.deseasonalise
            ? " Each calendar month's mean over the series was removed first."
            : ""),
      ),
      x: { label: "Years from the epoch", kind: "linear" },
      y: { label: axisLabel(quantityLabel(o.quantity), o.units, o.quantity) },
      layers,
      ...runNotes(run, [
        "Family-wise p-value over the window against random epoch sets: " +
        `${r.p_family_wise.toPrecision(3)}.`,
      ]),
    };
  },
};
