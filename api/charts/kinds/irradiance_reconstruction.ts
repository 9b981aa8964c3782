/**
 * Chart of an "irradiance-reconstructions" run: reconstructed TSI with its prediction interval,
 * drawn solid where every proxy was observed and dashed where proxies were mapped from
 * sunspot number (back-extension), with the boundary between the two marked.
 *
 * @module
 */
import type { RunRecord } from "../../store/types.ts";
import type { ChartSpec, Layer } from "../chart.ts";
import { runDescription, runNotes } from "../run_common.ts";
import { numOrNull, obj, objects, outputSeries, str } from "../read.ts";
import { axisLabel, quantityLabel } from "../labels.ts";

/** Chart spec, or null when the result has no reconstructed TSI output. */
export function irradianceReconstructionChart(run: RunRecord): ChartSpec | null {
  const r = run.result;
  const o = outputSeries(obj(r?.outputs)?.tsi, "tsi");
  if (!r || !o) return null;
  // runs stored before algorithm version 2 spelt it sourceSegments
  const segs = (objects(r.source_segments ?? r.sourceSegments) ?? []).map((s) => ({
    source: str(s.source) ?? "",
    start: numOrNull(s.start),
    end: numOrNull(s.end),
  })).filter((s) => s.start !== null && s.end !== null) as {
    source: string;
    start: number;
    end: number;
  }[];
  const isBack = (t: number) =>
    segs.some((s) => /back/i.test(s.source) && t >= s.start - 1e-9 && t <= s.end + 1e-9);
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
      if (
        /back/i.test(a.source) !== /back/i.test(b.source) && a.source !== "none" &&
        b.source !== "none"
      ) {
        const at = (a.end + b.start) / 2;
        layers.push({
          type: "vline",
          x: at,
          text: /back/i.test(a.source) ? "proxies observed from here" : "back-extension from here",
        });
      }
    }
  }
  const level = numOrNull(r.level);
  const scenario = str(obj(r.scenario)?.label);
  const res = str(r.resolution) ?? "";
  return {
    title: `Reconstructed total solar irradiance${res ? ` (${res} means)` : ""} · run ${
      run.id.slice(0, 8)
    }`,
    description: runDescription(
      run,
      `Reconstructed TSI${
        level !== null ? ` with its ${(level * 100).toFixed(0)} % prediction interval` : ""
      }` +
        `${anyBack ? "; dashed where proxies were mapped from sunspot number" : ""}.` +
        (scenario ? ` ${scenario}` : ""),
    ),
    x: { label: "Year", kind: "year" },
    y: { label: axisLabel(quantityLabel(o.quantity), o.units, o.quantity) },
    layers,
    notes: runNotes(run),
  };
}
