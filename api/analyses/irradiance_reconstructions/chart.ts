/**
 * Chart of the "irradiance-reconstructions" analysis: reconstructed TSI with its band (the
 * ensemble's when members were drawn, else the analytic one), a few ensemble members as thin
 * lines, the central curve solid where every proxy was observed and dashed where proxies were
 * mapped from sunspot number (back-extension), the boundary between the two marked, and notes
 * naming the sources the band contains and those it leaves out.
 *
 * @module
 */
import type { KindChart } from "../../runs/kind.ts";
import type { Layer } from "../../charts/chart.ts";
import { runDescription, runNotes, runTitle } from "../../charts/run_common.ts";
import { axisLabel, quantityLabel } from "../../charts/labels.ts";
import type { ReconstructionResultOut } from "./result.ts";

/** Ensemble members drawn as thin lines (enough to show their texture, few enough to read). */
const SHOWN_MEMBERS = 5;

export const reconstructionChart: KindChart<ReconstructionResultOut> = {
  build(run, r) {
    const o = r.outputs.tsi;
    const segs = r.source_segments;
    const isBack = (t: number) =>
      segs.some((s) => s.source === "back_extended" && t >= s.start && t <= s.end);
    const direct: (number | null)[] = [], back: (number | null)[] = [];
    let anyBack = false;
    o.time.forEach((t, i) => {
      const v = o.value[i];
      const b = isBack(t);
      if (b && v !== null) anyBack = true;
      back.push(b ? v : null);
      direct.push(b ? null : v);
    });
    // Join the two pieces where they meet, so the curve has no hole at the boundary.
    for (let i = 1; i < o.time.length; i++) {
      if (back[i - 1] !== null && direct[i] !== null && back[i] === null) back[i] = direct[i];
      if (direct[i - 1] !== null && back[i] !== null && direct[i] === null) direct[i] = back[i];
    }
    const layers: Layer[] = [];
    if (o.lower && o.upper) {
      layers.push({
        type: "band",
        label: o.interval ?? "prediction interval",
        x: o.time,
        lower: o.lower,
        upper: o.upper,
        color: 0,
      });
    }
    const members = r.ensemble?.members.slice(0, SHOWN_MEMBERS) ?? [];
    members.forEach((y, m) =>
      layers.push({
        type: "line",
        ...(m === 0 ? { label: `${members.length} of ${r.ensemble!.realizations} members` } : {}),
        x: o.time,
        y,
        color: "muted",
        width: 0.6,
      })
    );
    layers.push({
      type: "line",
      label: anyBack ? "TSI from observed proxies" : "Reconstructed TSI",
      x: o.time,
      y: direct,
      color: 0,
    });
    if (anyBack) {
      layers.push({
        type: "line",
        label: "TSI with proxies mapped from sunspot number",
        x: o.time,
        y: back,
        color: 1,
        dash: "dashed",
      });
      for (let k = 1; k < segs.length; k++) {
        const a = segs[k - 1], b = segs[k];
        const aBack = a.source === "back_extended", bBack = b.source === "back_extended";
        if (aBack !== bBack && a.source !== "none" && b.source !== "none") {
          layers.push({
            type: "vline",
            x: (a.end + b.start) / 2,
            text: aBack ? "proxies observed from here" : "back-extension from here",
          });
        }
      }
    }
    return {
      title: runTitle(`Reconstructed total solar irradiance (${r.resolution} means)`, run),
      description: runDescription(
        run,
        `Reconstructed TSI with its ${(r.level * 100).toFixed(0)} % band (${
          r.band.method.replaceAll("_", " ")
        }; sources in the band: ${r.band.included.map((s) => s.source).join(", ")})` +
          `${members.length ? `, ${members.length} ensemble members as thin lines` : ""}` +
          `${anyBack ? "; dashed where proxies were mapped from sunspot number" : ""}.` +
          ` ${r.scenario.label}`,
      ),
      x: { label: "Year", kind: "year" },
      y: { label: axisLabel(quantityLabel(o.quantity), o.units, o.quantity) },
      layers,
      // what the band holds is read with the band: never shortened
      ...runNotes(run, [], [
        `Band: ${r.band.included.map((s) => s.source).join(", ")} uncertainty. Not in the band: ${
          r.band.not_included.map((t) => t.split(" (")[0]).join("; ")
        }.`,
      ]),
    };
  },
};
