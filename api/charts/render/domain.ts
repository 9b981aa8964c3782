/**
 * The data domains of a chart: the x range (the spec's, else the extent of the layers, then the
 * requested time range) and the y range over the visible x range (with reference levels, bar
 * baselines and an optional zero), each widened when it is a single value.
 *
 * @module
 */
import type { AxisKind, ChartSpec, Layer, RenderOptions, Values } from "../spec.ts";
import { finite } from "./marks.ts";

/** The x and y domains of a chart, and what the data allow. */
export interface DataDomains {
  xKind: AxisKind;
  yKind: "linear" | "log";
  /** Category names of a category x axis (else empty). */
  categories: string[];
  /** x domain (NaN when no layer has an x value). */
  x0: number;
  x1: number;
  hasX: boolean;
  /** y domain (infinite when nothing is visible). */
  y0: number;
  y1: number;
  hasY: boolean;
  /** Notes on options that do not apply (shown under the plot and in the description). */
  dropped: string[];
  /** Whether an x value lies in the x domain (always, on a category axis). */
  inX(v: number): boolean;
  /** Whether a y value can be drawn (finite, and positive on a log axis). */
  yOk(v: number | null | undefined): v is number;
}

interface Extent {
  lo: number;
  hi: number;
}

function extend(e: Extent, v: number | null | undefined) {
  if (finite(v)) {
    if (v < e.lo) e.lo = v;
    if (v > e.hi) e.hi = v;
  }
}

function numericX(l: Layer): ArrayLike<number> | null {
  if (l.type === "vline" || l.type === "hline") return null;
  if (l.type === "bars" && Array.isArray(l.x) && typeof l.x[0] === "string") return null;
  return l.x as ArrayLike<number>;
}

/** The x domain of a numeric axis: fixed, or the layers' extent, then the time range. */
function xExtent(spec: ChartSpec, opts: RenderOptions, xKind: AxisKind, dropped: string[]) {
  const e: Extent = { lo: Infinity, hi: -Infinity };
  if (spec.x.domain) {
    e.lo = spec.x.domain[0];
    e.hi = spec.x.domain[1];
  } else {
    for (const l of spec.layers) {
      const xs = numericX(l);
      if (!xs) continue;
      for (let i = 0; i < xs.length; i++) {
        if (xKind === "log" && !(xs[i] > 0)) continue;
        extend(e, xs[i]);
      }
    }
  }
  if (xKind === "year") {
    if (finite(opts.from)) e.lo = opts.from;
    if (finite(opts.to)) e.hi = opts.to;
  } else if (finite(opts.from) || finite(opts.to)) {
    dropped.push("The requested time range does not apply: the horizontal axis is not time.");
  }
  let x0 = e.lo, x1 = e.hi;
  // A range that starts after the data ends (or ends before it starts) shows one empty year.
  if (x0 > x1) {
    if (finite(opts.from) && !finite(opts.to)) x1 = x0 + 1;
    else x0 = x1 - 1;
  }
  return [x0, x1];
}

/** The y extent of the layers at visible x values (fixed when the spec gives it). */
function yExtent(spec: ChartSpec, d: Omit<DataDomains, "y0" | "y1" | "hasY">): Extent {
  const ye: Extent = { lo: Infinity, hi: -Infinity };
  if (spec.y.domain) return { lo: spec.y.domain[0], hi: spec.y.domain[1] };
  if (!d.hasX) return ye;
  const take = (xs: ArrayLike<number> | string[], ...cols: (Values | undefined)[]) => {
    for (const col of cols) {
      if (!col) continue;
      for (let i = 0; i < col.length; i++) {
        const xv = xs[i];
        if (typeof xv === "number" && !d.inX(xv)) continue;
        if (d.yOk(col[i])) extend(ye, col[i]);
      }
    }
  };
  for (const l of spec.layers) {
    if (l.type === "line" || l.type === "points") take(l.x, l.y);
    else if (l.type === "stems") take(l.x, l.y, [l.baseline ?? 0]);
    else if (l.type === "band") take(l.x, l.lower, l.upper);
    else if (l.type === "bars") {
      take(l.x, l.y, l.lower, l.upper);
      if (d.yKind !== "log") extend(ye, 0);
    } else if (l.type === "hline" && d.yOk(l.y)) extend(ye, l.y);
  }
  if (spec.y.includeZero && d.yKind !== "log") extend(ye, 0);
  return ye;
}

/** The domains of a chart's axes from its spec, its layers and the requested range. */
export function dataDomains(spec: ChartSpec, opts: RenderOptions): DataDomains {
  const xKind: AxisKind = spec.x.kind ?? "year";
  const yKind = spec.y.kind === "log" ? "log" : "linear";
  const dropped: string[] = [];
  const categories = xKind === "category" ? (spec.x.categories ?? []) : [];
  let [x0, x1] = xKind === "category" ? [NaN, NaN] : xExtent(spec, opts, xKind, dropped);
  const hasX = xKind === "category"
    ? categories.length > 0
    : Number.isFinite(x0) && Number.isFinite(x1);
  if (hasX && xKind !== "category" && x0 === x1) {
    const pad = xKind === "year" ? 0.5 : Math.abs(x0) * 0.05 || 1;
    x0 -= pad;
    x1 += pad;
  }
  const inX = (v: number) => xKind === "category" || (v >= x0 && v <= x1);
  const yOk = (v: number | null | undefined): v is number =>
    finite(v) && (yKind !== "log" || v > 0);
  const partial = { xKind, yKind, categories, x0, x1, hasX, dropped, inX, yOk } as const;
  const ye = yExtent(spec, partial);
  const hasY = Number.isFinite(ye.lo) && Number.isFinite(ye.hi);
  if (hasY && ye.lo === ye.hi) {
    const pad = yKind === "log" ? ye.lo * 0.5 : Math.abs(ye.lo) * 0.05 || 1;
    ye.lo -= pad;
    ye.hi += pad;
  }
  return { ...partial, y0: ye.lo, y1: ye.hi, hasY };
}
