/**
 * Layers drawn mark by mark: point markers, stems from a baseline, and bars (on categories or
 * numbers) with optional error bars. Marks outside the x range or without a value are skipped.
 *
 * @module
 */
import { symbol } from "d3-shape";
import { el, num } from "../svg.ts";
import type { Theme } from "../theme.ts";
import type { BarsLayer, PointsLayer, StemsLayer } from "../spec.ts";
import { markerType } from "./marks.ts";
import type { Plot } from "./scales.ts";
import type { Drawn } from "./layers.ts";

/** Point markers (drawn above the paths). */
export function drawPoints(p: Plot, l: PointsLayer, c: string, theme: Theme): Drawn {
  const { type, rotate } = markerType(l.marker);
  const d = symbol(type, l.size ?? 42)() ?? "";
  let g = "";
  let n = 0;
  for (let i = 0; i < l.x.length; i++) {
    const v = l.y[i];
    if (!p.yOk(v) || !p.inX(l.x[i])) continue;
    n++;
    g += el("path", {
      d,
      transform: `translate(${num(p.X(l.x[i]))} ${num(p.Y(v))})${
        rotate ? ` rotate(${rotate})` : ""
      }`,
    });
  }
  return {
    overlay: [
      el("g", { class: "points", fill: c, stroke: theme.background, "stroke-width": 0.8 }, g),
    ],
    visible: n > 0,
    summary: `markers "${l.label ?? l.type}" (${n} shown)`,
  };
}

/** Vertical stems from the baseline (default 0) to each value. */
export function drawStems(p: Plot, l: StemsLayer, c: string): Drawn {
  const base = l.baseline ?? 0;
  let d = "";
  let n = 0;
  for (let i = 0; i < l.x.length; i++) {
    const v = l.y[i];
    if (!p.yOk(v) || !p.inX(l.x[i])) continue;
    n++;
    const px = num(p.X(l.x[i]));
    d += `M${px},${num(p.Y(base))}V${num(p.Y(v))}`;
  }
  return {
    layer: n ? el("path", { class: "stems", d, stroke: c, "stroke-width": 1.4, fill: "none" }) : "",
    visible: n > 0,
    summary: `stems "${l.label ?? l.type}" (${n} shown)`,
  };
}

/** Bars from 0 (the axis bottom on a log axis), with error bars where both bounds exist. */
export function drawBars(p: Plot, l: BarsLayer, c: string, theme: Theme): Drawn {
  let g = "";
  let n = 0;
  const bw = p.band ? p.band.bandwidth() : barWidth(l.x as ArrayLike<number>, p.X);
  const base = p.yKind === "log" ? p.yDomain[0] : 0;
  for (let i = 0; i < l.x.length; i++) {
    const v = l.y[i];
    if (!p.yOk(v)) continue;
    const cx = barCentre(p, l.x[i], bw);
    if (cx === null) continue;
    n++;
    const y0 = p.Y(base), y1 = p.Y(v);
    g += el("rect", {
      x: cx - bw / 2,
      y: Math.min(y0, y1),
      width: bw,
      height: Math.abs(y1 - y0),
      fill: c,
    });
    const lo = l.lower?.[i], hi = l.upper?.[i];
    if (p.yOk(lo ?? null) && p.yOk(hi ?? null)) {
      g += errorBar(p, cx, lo as number, hi as number, bw, theme);
    }
  }
  return {
    layer: el("g", { class: "bars" }, g),
    visible: n > 0,
    summary: `bars "${l.label ?? l.type}" (${n})${l.lower ? " with error bars" : ""}`,
  };
}

/** Centre px of a bar, or null when its category is unknown or its x is out of range. */
function barCentre(p: Plot, x: number | string, bw: number): number | null {
  if (p.band) {
    const b = p.band(String(x));
    return b === undefined ? null : b + bw / 2;
  }
  const xv = x as number;
  return p.inX(xv) ? p.X(xv) : null;
}

function errorBar(p: Plot, cx: number, lo: number, hi: number, bw: number, theme: Theme) {
  const t = Math.min(8, bw / 4);
  return el("path", {
    d: `M${num(cx)},${num(p.Y(lo))}V${num(p.Y(hi))}M${num(cx - t)},${num(p.Y(lo))}H${num(cx + t)}M${
      num(cx - t)
    },${num(p.Y(hi))}H${num(cx + t)}`,
    stroke: theme.foreground,
    "stroke-width": 1.2,
    fill: "none",
  });
}

function barWidth(x: ArrayLike<number>, X: (v: number) => number): number {
  let minGap = Infinity;
  for (let i = 1; i < x.length; i++) minGap = Math.min(minGap, Math.abs(X(x[i]) - X(x[i - 1])));
  return Number.isFinite(minGap) ? Math.max(1, minGap * 0.8) : 12;
}
