/**
 * Layers drawn as paths over many points: uncertainty bands (areas) and lines. Long series are
 * reduced to the first, last, minimum and maximum point of every pixel column (M4, Jugel et
 * al. 2014; decimate.ts), on log10(x) for a logarithmic axis.
 *
 * @module
 */
import { area, line } from "d3-shape";
import { el } from "../svg.ts";
import type { Theme } from "../theme.ts";
import type { BandLayer, LineLayer, Values } from "../spec.ts";
import { decimateBand, decimateM4 } from "../decimate.ts";
import { DASHES, finite } from "./marks.ts";
import type { Plot } from "./scales.ts";
import type { Drawn } from "./layers.ts";

/** An uncertainty band as a filled area. */
export function drawBand(p: Plot, l: BandLayer, c: string, theme: Theme): Drawn {
  const columns = Math.max(1, Math.round(p.right - p.left));
  const d = p.xKind === "category" ? { x: [], lower: [], upper: [] } : p.xKind === "log"
    ? unlog(
      decimateBand(log10All(l.x), l.lower, l.upper, Math.log10(p.x0), Math.log10(p.x1), columns),
    )
    : decimateBand(l.x, l.lower, l.upper, p.x0, p.x1, columns);
  const gen = area<number>()
    .defined((i) => Number.isFinite(d.x[i]) && p.yOk(d.lower[i]) && p.yOk(d.upper[i]))
    .x((i) => p.X(d.x[i]))
    .y0((i) => p.Y(d.lower[i] as number))
    .y1((i) => p.Y(d.upper[i] as number))
    .digits(2);
  const path = gen(d.x.map((_, i) => i));
  const visible = !!path && d.x.length > 0;
  return {
    layer: visible
      ? el("path", {
        class: "band",
        d: path,
        fill: c,
        "fill-opacity": l.opacity ?? theme.bandOpacity,
        stroke: "none",
      })
      : "",
    visible,
    summary: `band "${l.label ?? l.type}" (${l.x.length} points)`,
  };
}

/** A line, with gaps where values are missing. */
export function drawLine(p: Plot, l: LineLayer, c: string): Drawn {
  const columns = Math.max(1, Math.round(p.right - p.left));
  const d = p.xKind === "log"
    ? unlog(decimateM4(log10All(l.x), l.y, Math.log10(p.x0), Math.log10(p.x1), columns))
    : decimateM4(l.x, l.y, p.x0, p.x1, columns);
  const gen = line<number>()
    .defined((i) => Number.isFinite(d.x[i]) && p.yOk(d.y[i]))
    .x((i) => p.X(d.x[i]))
    .y((i) => p.Y(d.y[i] as number))
    .digits(2);
  const path = gen(d.x.map((_, i) => i));
  const visible = !!path && d.y.some((v) => p.yOk(v));
  const reduced = d.x.length < visibleCount(l.x, p.x0, p.x1);
  return {
    layer: visible
      ? el("path", {
        class: "line",
        d: path,
        fill: "none",
        stroke: c,
        "stroke-width": l.width ?? 1.6,
        "stroke-dasharray": DASHES[l.dash ?? "solid"],
        "stroke-linejoin": "round",
        "stroke-linecap": "round",
      })
      : "",
    visible,
    summary: `line "${l.label ?? l.type}" (${countFinite(l.y)} points${
      reduced ? `, drawn with min/max per pixel column` : ""
    })`,
  };
}

/** log10 of every x (non-positive x become NaN, i.e. not drawn on a log axis). */
function log10All(x: ArrayLike<number>): number[] {
  return Array.from(x, (v) => (v > 0 ? Math.log10(v) : NaN));
}

function unlog<T extends { x: number[] }>(d: T): T {
  d.x = d.x.map((v) => Math.pow(10, v));
  return d;
}

function countFinite(v: Values): number {
  let n = 0;
  for (let i = 0; i < v.length; i++) if (finite(v[i])) n++;
  return n;
}

function visibleCount(x: ArrayLike<number>, x0: number, x1: number): number {
  let n = 0;
  for (let i = 0; i < x.length; i++) if (x[i] >= x0 && x[i] <= x1) n++;
  return n;
}
