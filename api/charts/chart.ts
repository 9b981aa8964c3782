/**
 * A small declarative chart toolkit rendered to standalone SVG with d3-scale and d3-shape
 * (no DOM): one panel with an x and a y axis, and layers (lines, uncertainty bands, point
 * markers, stems, bars with error bars, vertical event lines and horizontal reference
 * levels), a legend, notes (cautions) under the plot, light and dark themes and time-range
 * clipping.
 *
 * The SVG is accessible (`role="img"`, `aria-labelledby` pointing at `<title>` and `<desc>`,
 * with a text summary of what is drawn), uses the system font stack only, loads nothing, runs
 * no script, and is well-formed XML (every text is escaped).
 *
 * @module
 */
import { scaleBand, scaleLinear, scaleLog } from "d3-scale";
import {
  area,
  line,
  symbol,
  symbolCircle,
  symbolDiamond,
  symbolSquare,
  symbolTriangle,
  type SymbolType,
} from "d3-shape";
import { el, escapeXml, num, shortHash, text, textWidth, wrapText } from "./svg.ts";
import { color, type ColorRef, FONT_STACK, type Theme, type ThemeName, THEMES } from "./theme.ts";
import { numberLabel, type Tick, yearTicks } from "./ticks.ts";
import { decimateBand, decimateM4 } from "./decimate.ts";
import { formatIsoTime } from "../../core/time/mod.ts";

export type AxisKind = "year" | "linear" | "log" | "category";
export type Dash = "solid" | "dashed" | "dotted";
export type MarkerShape = "circle" | "square" | "diamond" | "triangle-up" | "triangle-down";
type Values = ArrayLike<number | null>;

export interface AxisSpec {
  /** Axis title with units, e.g. "Total solar irradiance (W m⁻²)". */
  label: string;
  /** "year": decimal years labelled as calendar dates (default for x); default "linear". */
  kind?: AxisKind;
  /** Fixed domain; otherwise the extent of the visible data (and reference levels). */
  domain?: [number, number];
  /** Extend the computed domain to include 0. */
  includeZero?: boolean;
  /** Category names, for kind "category" (x axis only). */
  categories?: string[];
}

interface LayerBase {
  /** Legend text; layers without a label are not in the legend. */
  label?: string;
  color?: ColorRef;
}

export interface LineLayer extends LayerBase {
  type: "line";
  x: ArrayLike<number>;
  y: Values;
  dash?: Dash;
  width?: number;
}

export interface BandLayer extends LayerBase {
  type: "band";
  x: ArrayLike<number>;
  lower: Values;
  upper: Values;
  opacity?: number;
}

export interface PointsLayer extends LayerBase {
  type: "points";
  x: ArrayLike<number>;
  y: Values;
  marker?: MarkerShape;
  /** Marker area in px² (default 42). */
  size?: number;
}

export interface StemsLayer extends LayerBase {
  type: "stems";
  x: ArrayLike<number>;
  y: Values;
  baseline?: number;
}

export interface BarsLayer extends LayerBase {
  type: "bars";
  /** Category names (category x axis) or numbers. */
  x: ArrayLike<number> | string[];
  y: Values;
  /** Error bar bounds. */
  lower?: Values;
  upper?: Values;
}

export interface VLineLayer extends LayerBase {
  type: "vline";
  x: number;
  text?: string;
  dash?: Dash;
}

export interface HLineLayer extends LayerBase {
  type: "hline";
  y: number;
  text?: string;
  dash?: Dash;
}

export type Layer =
  | LineLayer
  | BandLayer
  | PointsLayer
  | StemsLayer
  | BarsLayer
  | VLineLayer
  | HLineLayer;

export interface ChartSpec {
  /** Visible title and the SVG `<title>`. */
  title: string;
  /** Opening of the SVG `<desc>`; a summary of the axes and layers is appended. */
  description: string;
  x: AxisSpec;
  y: AxisSpec;
  layers: Layer[];
  /** Short lines shown under the plot (cautions, method notes). */
  notes?: string[];
}

export interface RenderOptions {
  width: number;
  height: number;
  theme: ThemeName;
  /** Time range (decimal years), applied to a "year" x axis. */
  from?: number;
  to?: number;
  /** Prefix of element ids (unique per chart when several are inlined in one page). */
  idPrefix?: string;
}

const FONT = 12;
const TITLE_FONT = 15;
const NOTE_FONT = 10.5;
const DASHES: Record<Dash, string | undefined> = { solid: undefined, dashed: "6 4", dotted: "2 3" };

function finite(v: number | null | undefined): v is number {
  return typeof v === "number" && Number.isFinite(v);
}

function markerType(shape: MarkerShape | undefined): { type: SymbolType; rotate: number } {
  switch (shape) {
    case "square":
      return { type: symbolSquare, rotate: 0 };
    case "diamond":
      return { type: symbolDiamond, rotate: 0 };
    case "triangle-up":
      return { type: symbolTriangle, rotate: 0 };
    case "triangle-down":
      return { type: symbolTriangle, rotate: 180 };
    default:
      return { type: symbolCircle, rotate: 0 };
  }
}

/**
 * Layer colours: explicit, or the next palette colour among layers that draw data. A band
 * without a colour takes the colour of the data layer that follows it (its central line).
 */
function layerColors(layers: Layer[], theme: Theme): string[] {
  let next = 0;
  const out = layers.map((l) => {
    if (l.color !== undefined) return color(theme, l.color);
    if (l.type === "vline" || l.type === "hline") return theme.muted;
    if (l.type === "band") return "";
    return color(theme, next++);
  });
  for (let i = out.length - 1, following = color(theme, next); i >= 0; i--) {
    const l = layers[i];
    if (out[i] === "") out[i] = following;
    else if (l.type !== "vline" && l.type !== "hline") following = out[i];
  }
  return out;
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

/** Render a chart spec to an SVG document string. */
export function renderChart(spec: ChartSpec, opts: RenderOptions): string {
  const theme = THEMES[opts.theme];
  const W = opts.width, H = opts.height;
  const id = opts.idPrefix ??
    "c" + shortHash(JSON.stringify([spec.title, W, H, opts.theme, opts.from, opts.to]));
  const xKind: AxisKind = spec.x.kind ?? "year";
  const yKind: AxisKind = spec.y.kind === "log" ? "log" : "linear";
  const colors = layerColors(spec.layers, theme);
  const summary: string[] = [];
  const dropped: string[] = [];

  // ---- x domain
  const categories = xKind === "category" ? (spec.x.categories ?? []) : [];
  let x0 = NaN, x1 = NaN;
  if (xKind !== "category") {
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
    x0 = e.lo;
    x1 = e.hi;
    // A range that starts after the data ends (or ends before it starts) shows one empty year.
    if (x0 > x1) {
      if (finite(opts.from) && !finite(opts.to)) x1 = x0 + 1;
      else x0 = x1 - 1;
    }
  }
  const hasX = xKind === "category"
    ? categories.length > 0
    : Number.isFinite(x0) && Number.isFinite(x1);
  if (hasX && xKind !== "category" && x0 === x1) {
    const pad = xKind === "year" ? 0.5 : Math.abs(x0) * 0.05 || 1;
    x0 -= pad;
    x1 += pad;
  }
  const inX = (v: number) => xKind === "category" || (v >= x0 && v <= x1);

  // ---- y domain over the visible x range
  const ye: Extent = { lo: Infinity, hi: -Infinity };
  const yOk = (v: number | null | undefined): v is number =>
    finite(v) && (yKind !== "log" || v > 0);
  if (spec.y.domain) {
    ye.lo = spec.y.domain[0];
    ye.hi = spec.y.domain[1];
  } else if (hasX) {
    const take = (xs: ArrayLike<number> | string[], ...cols: (Values | undefined)[]) => {
      for (const col of cols) {
        if (!col) continue;
        for (let i = 0; i < col.length; i++) {
          const xv = xs[i];
          if (typeof xv === "number" && !inX(xv)) continue;
          if (yOk(col[i])) extend(ye, col[i]);
        }
      }
    };
    for (const l of spec.layers) {
      if (l.type === "line" || l.type === "points") take(l.x, l.y);
      else if (l.type === "stems") take(l.x, l.y, [l.baseline ?? 0]);
      else if (l.type === "band") take(l.x, l.lower, l.upper);
      else if (l.type === "bars") {
        take(l.x, l.y, l.lower, l.upper);
        if (yKind !== "log") extend(ye, 0);
      } else if (l.type === "hline" && yOk(l.y)) extend(ye, l.y);
    }
    if (spec.y.includeZero && yKind !== "log") extend(ye, 0);
  }
  const hasY = Number.isFinite(ye.lo) && Number.isFinite(ye.hi);
  if (hasY && ye.lo === ye.hi) {
    const pad = yKind === "log" ? ye.lo * 0.5 : Math.abs(ye.lo) * 0.05 || 1;
    ye.lo -= pad;
    ye.hi += pad;
  }

  // ---- layout: title, legend, notes, margins
  const top0 = 10;
  const wrappedTitle = wrapText(spec.title, TITLE_FONT, W - 24, true);
  const titleLines = wrappedTitle.slice(0, 2).map((t, i, a) =>
    fitText(i === a.length - 1 && wrappedTitle.length > 2 ? t + " …" : t, TITLE_FONT, W - 24, true)
      .text
  );
  let y = top0 + TITLE_FONT;
  let markup = "";
  markup += el("rect", { width: W, height: H, fill: theme.background });
  titleLines.forEach((t, i) => {
    markup += text({
      x: 12,
      y: y + i * (TITLE_FONT + 3),
      fill: theme.foreground,
      "font-size": TITLE_FONT,
      "font-weight": 600,
    }, t);
  });
  y += (titleLines.length - 1) * (TITLE_FONT + 3) + 8;

  // Legend items, in rows; only the rows that leave the plot a usable height are drawn (the
  // description names every layer anyway).
  const minPlot = Math.max(40, H * 0.35);
  const legendItems = spec.layers
    .map((l, i) => ({ l, i }))
    .filter(({ l }) => l.label);
  const rowH = FONT + 6;
  const rows: { l: Layer; i: number; x: number }[][] = [];
  let lx = 12;
  for (const { l, i } of legendItems) {
    const w = 22 + textWidth(l.label as string, FONT) + 14;
    if (!rows.length || (lx + w > W - 8 && lx > 12)) {
      rows.push([]);
      lx = 12;
    }
    rows[rows.length - 1].push({ l, i, x: lx });
    lx += w;
  }
  const legendRoom = Math.max(0, Math.floor((H - 42 - (y + 6) - minPlot - 6) / rowH));
  const shownRows = rows.slice(0, legendRoom);
  let legend = "";
  shownRows.forEach((row, r) => {
    const ly = y + 4 + r * rowH;
    const cy = ly + FONT / 2 - 1;
    for (const { l, i, x } of row) {
      legend += legendSwatch(l, colors[i], x, cy, theme);
      // an entry alone on its row may still be wider than the chart: cut it to fit
      const fit = fitText(l.label as string, FONT, W - 8 - (x + 22));
      legend += text(
        { x: x + 22, y: ly + FONT - 2, fill: theme.foreground, "font-size": fit.size },
        fit.text,
      );
    }
  });
  if (shownRows.length) y += 4 + shownRows.length * rowH + 2;
  markup += el("g", { class: "legend" }, legend);

  // Notes under the plot, as many lines as leave the plot its minimum height (at most 6)
  const noteLines: string[] = [];
  for (const n of [...(spec.notes ?? []), ...dropped]) {
    noteLines.push(...wrapText(n, NOTE_FONT, W - 24));
  }
  const maxNoteLines = Math.max(0, Math.floor((H - 42 - (y + 6) - minPlot - 6) / (NOTE_FONT + 3)));
  const shownNotes = noteLines.slice(0, Math.min(6, maxNoteLines));
  const notesH = shownNotes.length ? shownNotes.length * (NOTE_FONT + 3) + 6 : 0;

  // Scales
  const yRangeTop = y + 6;
  const yRangeBottom = Math.max(yRangeTop + 10, H - 42 - notesH);
  const ys = yKind === "log"
    ? scaleLog().domain(hasY ? [ye.lo, ye.hi] : [1, 10]).range([yRangeBottom, yRangeTop])
    : scaleLinear().domain(hasY ? [ye.lo, ye.hi] : [0, 1]).range([yRangeBottom, yRangeTop]);
  if (!spec.y.domain) ys.nice(Math.max(2, Math.round((yRangeBottom - yRangeTop) / 45)));
  const yTicks: Tick[] = axisTicks(
    ys,
    yKind,
    Math.max(2, Math.round((yRangeBottom - yRangeTop) / 45)),
  );
  const yLabelW = Math.max(20, ...yTicks.map((t) => textWidth(t.label, FONT)));
  const left = 12 + FONT + 8 + yLabelW + 8;
  const right = W - 16;

  let xs: ((v: number) => number) & { ticks?: unknown } = (v: number) => v;
  let xTicks: Tick[] = [];
  let band: ReturnType<typeof scaleBand<string>> | null = null;
  if (xKind === "category") {
    band = scaleBand<string>().domain(categories).range([left, right]).paddingInner(0.25)
      .paddingOuter(0.15);
    const b = band;
    xTicks = categories.map((c) => ({ value: (b(c) ?? 0) + b.bandwidth() / 2, label: c }));
    xs = (v: number) => v;
  } else if (xKind === "log") {
    const s = scaleLog().domain(hasX && x0 > 0 ? [x0, x1] : [1, 10]).range([left, right]);
    xs = s;
    xTicks = axisTicks(s, "log", Math.max(2, Math.round((right - left) / 90)));
  } else {
    const s = scaleLinear().domain(hasX ? [x0, x1] : [0, 1]).range([left, right]);
    xs = s;
    const n = Math.max(2, Math.round((right - left) / 90));
    xTicks = xKind === "year" ? yearTicks(x0, x1, n) : axisTicks(s, "linear", n);
  }
  const X = (v: number) => xs(v);
  const Y = (v: number) => ys(v);

  // ---- grid and axes
  let axes = "";
  for (const t of yTicks) {
    const py = Y(t.value);
    axes += el("line", {
      x1: left,
      x2: right,
      y1: py,
      y2: py,
      stroke: theme.grid,
      "stroke-width": 1,
    });
    axes += text({
      x: left - 6,
      y: py + 4,
      "text-anchor": "end",
      fill: theme.muted,
      "font-size": FONT,
    }, t.label);
  }
  const maxXLabel = Math.max(0, ...xTicks.map((t) => textWidth(t.label, FONT)));
  const spacing = xTicks.length > 1 ? (right - left) / xTicks.length : right - left;
  const everyNth = Math.max(1, Math.ceil((maxXLabel + 8) / Math.max(1, spacing)));
  xTicks.forEach((t, i) => {
    const px = xKind === "category" ? t.value : X(t.value);
    if (xKind !== "category") {
      axes += el("line", {
        x1: px,
        x2: px,
        y1: yRangeTop,
        y2: yRangeBottom,
        stroke: theme.grid,
        "stroke-width": 1,
      });
    }
    axes += el("line", {
      x1: px,
      x2: px,
      y1: yRangeBottom,
      y2: yRangeBottom + 4,
      stroke: theme.foreground,
    });
    if (i % everyNth === 0) {
      axes += text({
        x: px,
        y: yRangeBottom + 4 + FONT + 2,
        "text-anchor": "middle",
        fill: theme.muted,
        "font-size": FONT,
      }, t.label);
    }
  });
  axes += el("line", {
    x1: left,
    x2: right,
    y1: yRangeBottom,
    y2: yRangeBottom,
    stroke: theme.foreground,
    "stroke-width": 1,
  });
  axes += el("line", {
    x1: left,
    x2: left,
    y1: yRangeTop,
    y2: yRangeBottom,
    stroke: theme.foreground,
    "stroke-width": 1,
  });
  const xMid = (left + right) / 2;
  const xl = fitText(spec.x.label, FONT, 2 * Math.min(xMid, W - xMid) - 8);
  axes += text({
    class: "x-label",
    x: xMid,
    y: yRangeBottom + 4 + FONT + 4 + FONT + 4,
    "text-anchor": "middle",
    fill: theme.foreground,
    "font-size": xl.size,
  }, xl.text);
  const yMid = (yRangeTop + yRangeBottom) / 2;
  const yl = fitText(spec.y.label, FONT, 2 * Math.min(yMid, H - yMid) - 8);
  axes += text({
    class: "y-label",
    x: 12 + FONT,
    y: yMid,
    "text-anchor": "middle",
    transform: `rotate(-90 ${num(12 + FONT)} ${num(yMid)})`,
    fill: theme.foreground,
    "font-size": yl.size,
  }, yl.text);
  markup += el("g", { class: "axes" }, axes);

  // ---- layers, clipped to the plot area
  const clipId = `${id}-clip`;
  markup += el(
    "defs",
    {},
    el(
      "clipPath",
      { id: clipId },
      el("rect", { x: left, y: yRangeTop, width: right - left, height: yRangeBottom - yRangeTop }),
    ),
  );
  const columns = Math.max(1, Math.round(right - left));
  let layers = "";
  let anyVisible = false;
  const yDefined = (v: number | null) => yOk(v);
  const overlay: string[] = [];
  const vlineTexts: { x: number; text: string; color: string }[] = [];
  spec.layers.forEach((l, li) => {
    const c = colors[li];
    const name = l.label ?? l.type;
    if (!hasX || !hasY) return;
    switch (l.type) {
      case "band": {
        const d = xKind === "category"
          ? { x: [], lower: [], upper: [] }
          : xKind === "log"
          ? unlogBand(
            decimateBand(log10All(l.x), l.lower, l.upper, Math.log10(x0), Math.log10(x1), columns),
          )
          : decimateBand(l.x, l.lower, l.upper, x0, x1, columns);
        const gen = area<number>()
          .defined((i) => Number.isFinite(d.x[i]) && yDefined(d.lower[i]) && yDefined(d.upper[i]))
          .x((i) => X(d.x[i]))
          .y0((i) => Y(d.lower[i] as number))
          .y1((i) => Y(d.upper[i] as number))
          .digits(2);
        const path = gen(d.x.map((_, i) => i));
        if (path && d.x.length) {
          anyVisible = true;
          layers += el("path", {
            class: "band",
            d: path,
            fill: c,
            "fill-opacity": l.opacity ?? theme.bandOpacity,
            stroke: "none",
          });
        }
        summary.push(`band "${name}" (${l.x.length} points)`);
        break;
      }
      case "line": {
        const d = xKind === "log"
          ? unlog(decimateM4(log10All(l.x), l.y, Math.log10(x0), Math.log10(x1), columns))
          : decimateM4(l.x, l.y, x0, x1, columns);
        const gen = line<number>()
          .defined((i) => Number.isFinite(d.x[i]) && yDefined(d.y[i]))
          .x((i) => X(d.x[i]))
          .y((i) => Y(d.y[i] as number))
          .digits(2);
        const path = gen(d.x.map((_, i) => i));
        if (path && d.y.some(yDefined)) {
          anyVisible = true;
          layers += el("path", {
            class: "line",
            d: path,
            fill: "none",
            stroke: c,
            "stroke-width": l.width ?? 1.6,
            "stroke-dasharray": DASHES[l.dash ?? "solid"],
            "stroke-linejoin": "round",
            "stroke-linecap": "round",
          });
        }
        const n = countFinite(l.y);
        summary.push(
          `line "${name}" (${n} points${
            d.x.length < visibleCount(l.x, x0, x1) ? `, drawn with min/max per pixel column` : ""
          })`,
        );
        break;
      }
      case "points": {
        const { type, rotate } = markerType(l.marker);
        const p = symbol(type, l.size ?? 42)() ?? "";
        let g = "";
        let n = 0;
        for (let i = 0; i < l.x.length; i++) {
          const v = l.y[i];
          if (!yDefined(v) || !inX(l.x[i])) continue;
          n++;
          g += el("path", {
            d: p,
            transform: `translate(${num(X(l.x[i]))} ${num(Y(v))})${
              rotate ? ` rotate(${rotate})` : ""
            }`,
          });
        }
        if (n) anyVisible = true;
        overlay.push(
          el("g", { class: "points", fill: c, stroke: theme.background, "stroke-width": 0.8 }, g),
        );
        summary.push(`markers "${name}" (${n} shown)`);
        break;
      }
      case "stems": {
        const base = l.baseline ?? 0;
        let d = "";
        let n = 0;
        for (let i = 0; i < l.x.length; i++) {
          const v = l.y[i];
          if (!yDefined(v) || !inX(l.x[i])) continue;
          n++;
          const px = num(X(l.x[i]));
          d += `M${px},${num(Y(base))}V${num(Y(v))}`;
        }
        if (n) {
          anyVisible = true;
          layers += el("path", { class: "stems", d, stroke: c, "stroke-width": 1.4, fill: "none" });
        }
        summary.push(`stems "${name}" (${n} shown)`);
        break;
      }
      case "bars": {
        let g = "";
        let n = 0;
        const bw = band ? band.bandwidth() : barWidth(l.x as ArrayLike<number>, X);
        const base = yKind === "log" ? ys.domain()[0] : 0;
        for (let i = 0; i < l.x.length; i++) {
          const v = l.y[i];
          if (!yDefined(v)) continue;
          let cx: number;
          if (band) {
            const b = band(String(l.x[i]));
            if (b === undefined) continue;
            cx = b + bw / 2;
          } else {
            const xv = l.x[i] as number;
            if (!inX(xv)) continue;
            cx = X(xv);
          }
          n++;
          const y0 = Y(base), y1 = Y(v);
          g += el("rect", {
            x: cx - bw / 2,
            y: Math.min(y0, y1),
            width: bw,
            height: Math.abs(y1 - y0),
            fill: c,
          });
          const lo = l.lower?.[i], hi = l.upper?.[i];
          if (yDefined(lo ?? null) && yDefined(hi ?? null)) {
            const t = Math.min(8, bw / 4);
            g += el("path", {
              d: `M${num(cx)},${num(Y(lo as number))}V${num(Y(hi as number))}M${num(cx - t)},${
                num(Y(lo as number))
              }H${num(cx + t)}M${num(cx - t)},${num(Y(hi as number))}H${num(cx + t)}`,
              stroke: theme.foreground,
              "stroke-width": 1.2,
              fill: "none",
            });
          }
        }
        if (n) anyVisible = true;
        layers += el("g", { class: "bars" }, g);
        summary.push(`bars "${name}" (${n})${l.lower ? " with error bars" : ""}`);
        break;
      }
      case "vline": {
        if (xKind === "category" || !inX(l.x)) return;
        const px = X(l.x);
        overlay.push(el("line", {
          class: "vline",
          x1: px,
          x2: px,
          y1: yRangeTop,
          y2: yRangeBottom,
          stroke: c,
          "stroke-width": 1,
          "stroke-dasharray": DASHES[l.dash ?? "dashed"],
        }));
        if (l.text) vlineTexts.push({ x: px, text: l.text, color: c });
        summary.push(
          `vertical line "${l.label ?? l.text ?? "event"}" at ${numberLabel(l.x, 0.01)}`,
        );
        break;
      }
      case "hline": {
        if (!yOk(l.y)) return;
        const py = Y(l.y);
        overlay.push(el("line", {
          class: "hline",
          x1: left,
          x2: right,
          y1: py,
          y2: py,
          stroke: c,
          "stroke-width": 1.2,
          "stroke-dasharray": DASHES[l.dash ?? "dashed"],
        }));
        if (l.text) {
          overlay.push(
            text(
              { x: right - 4, y: py - 4, "text-anchor": "end", fill: c, "font-size": FONT - 1 },
              l.text,
            ),
          );
        }
        summary.push(
          `reference level "${l.label ?? l.text ?? "level"}" at ${
            numberLabel(l.y, Math.abs(l.y) / 1000 || 0.001)
          }`,
        );
        break;
      }
    }
  });
  // Vertical line texts right of their line (left when there is no room), only where they do
  // not overlap, the first listed placed first.
  const placed: [number, number][] = [];
  const free = (a: number, b: number) =>
    a >= left && b <= right && !placed.some(([p, q]) => a < q + 4 && b > p - 4);
  for (const v of vlineTexts) {
    const w = textWidth(v.text, FONT - 1);
    let a = v.x + 3;
    if (!free(a, a + w)) a = v.x - 3 - w;
    if (!free(a, a + w)) continue;
    placed.push([a, a + w]);
    overlay.push(text({ x: a, y: yRangeTop + FONT, fill: v.color, "font-size": FONT - 1 }, v.text));
  }
  markup += el("g", { class: "layers", "clip-path": `url(#${clipId})` }, layers + overlay.join(""));
  if (!anyVisible) {
    markup += text({
      class: "empty",
      x: (left + right) / 2,
      y: yMid,
      "text-anchor": "middle",
      fill: theme.muted,
      "font-size": FONT + 1,
    }, "No data in the selected range");
  }

  // ---- notes
  let notes = "";
  shownNotes.forEach((n, i) => {
    notes += text({
      x: 12,
      y: H - 8 - (shownNotes.length - 1 - i) * (NOTE_FONT + 3),
      fill: theme.muted,
      "font-size": NOTE_FONT,
    }, n);
  });
  markup += el("g", { class: "notes" }, notes);

  // ---- accessible description
  const xDesc = xKind === "category"
    ? `categories ${categories.join(", ")}`
    : hasX
    ? `from ${
      xKind === "year" ? yearText(x0, x1 - x0) : numberLabel(x0, Math.abs(x1 - x0) / 100)
    } to ${xKind === "year" ? yearText(x1, x1 - x0) : numberLabel(x1, Math.abs(x1 - x0) / 100)}`
    : "with no data";
  const yDom = ys.domain();
  const yDesc = hasY
    ? `from ${numberLabel(yDom[0], Math.abs(yDom[1] - yDom[0]) / 100)} to ${
      numberLabel(yDom[1], Math.abs(yDom[1] - yDom[0]) / 100)
    }`
    : "with no data";
  const desc = [
    spec.description,
    `Horizontal axis: ${spec.x.label}, ${xDesc}. Vertical axis: ${spec.y.label}${
      yKind === "log" ? " (logarithmic)" : ""
    }, ${yDesc}.`,
    summary.length ? `Drawn: ${summary.join("; ")}.` : "",
    anyVisible ? "" : "No data falls in the selected range.",
    ...(spec.notes ?? []),
    ...dropped,
  ].filter(Boolean).join(" ");

  const head = `<svg xmlns="http://www.w3.org/2000/svg" width="${num(W)}" height="${
    num(H)
  }" viewBox="0 0 ${num(W)} ${
    num(H)
  }" role="img" aria-labelledby="${id}-title ${id}-desc" font-family="${
    escapeXml(FONT_STACK)
  }" font-size="${FONT}" data-theme="${theme.name}">`;
  return `<?xml version="1.0" encoding="UTF-8"?>\n${head}<title id="${id}-title">${
    escapeXml(spec.title)
  }</title><desc id="${id}-desc">${escapeXml(desc)}</desc>${markup}</svg>\n`;
}

/**
 * A label that fits `max` px: the font shrinks (down to 9 px), then the text is cut with an
 * ellipsis. The full text stays in the description.
 */
function fitText(
  s: string,
  size: number,
  max: number,
  bold = false,
): { text: string; size: number } {
  const w = textWidth(s, size, bold);
  if (w <= max) return { text: s, size };
  const smaller = Math.max(9, Math.floor(size * (max / w) * 10) / 10);
  if (textWidth(s, smaller, bold) <= max) return { text: s, size: smaller };
  let cut = s;
  while (cut.length > 1 && textWidth(cut + "…", smaller, bold) > max) cut = cut.slice(0, -1);
  return { text: cut.trimEnd() + "…", size: smaller };
}

/** A decimal year as an ISO date at a precision fit for the axis span. */
function yearText(t: number, span: number): string {
  return formatIsoTime(t, span >= 30 ? "annual" : span >= 1 ? "monthly" : "daily");
}

/** log10 of every x (non-positive x become NaN, i.e. not drawn on a log axis). */
function log10All(x: ArrayLike<number>): number[] {
  return Array.from(x, (v) => (v > 0 ? Math.log10(v) : NaN));
}

function unlog<T extends { x: number[] }>(d: T): T {
  d.x = d.x.map((v) => Math.pow(10, v));
  return d;
}

const unlogBand = unlog;

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

function barWidth(x: ArrayLike<number>, X: (v: number) => number): number {
  let minGap = Infinity;
  for (let i = 1; i < x.length; i++) minGap = Math.min(minGap, Math.abs(X(x[i]) - X(x[i - 1])));
  return Number.isFinite(minGap) ? Math.max(1, minGap * 0.8) : 12;
}

// deno-lint-ignore no-explicit-any
function axisTicks(scale: any, kind: AxisKind, count: number): Tick[] {
  const values: number[] = scale.ticks(count);
  if (kind === "log") {
    // Label 1-2-5 steps only when there are few decades, else powers of ten.
    const [d0, d1] = scale.domain() as number[];
    const decades = Math.log10(d1 / d0);
    const keep = values.filter((v) => {
      const m = Math.round(v / Math.pow(10, Math.floor(Math.log10(v) + 1e-9)));
      return decades > count / 2
        ? m === 1
        : decades > count / 4
        ? m === 1 || m === 3
        : m === 1 || m === 2 || m === 5;
    });
    return (keep.length >= 2 ? keep : values).map((v) => ({
      value: v,
      label: numberLabel(v, v / 10),
    }));
  }
  const step = values.length > 1 ? Math.abs(values[1] - values[0]) : 1;
  return values.map((v) => ({ value: v, label: numberLabel(v, step) }));
}

function legendSwatch(l: Layer, c: string, x: number, cy: number, theme: Theme): string {
  switch (l.type) {
    case "band":
      return el("rect", {
        x,
        y: cy - 5,
        width: 18,
        height: 10,
        fill: c,
        "fill-opacity": l.opacity ?? theme.bandOpacity,
      });
    case "points": {
      const { type, rotate } = markerType(l.marker);
      return el("path", {
        d: symbol(type, l.size ?? 42)() ?? "",
        transform: `translate(${num(x + 9)} ${num(cy)})${rotate ? ` rotate(${rotate})` : ""}`,
        fill: c,
      });
    }
    case "bars":
      return el("rect", { x: x + 2, y: cy - 6, width: 14, height: 12, fill: c });
    case "stems":
      return el("path", {
        d: `M${num(x + 9)},${num(cy + 6)}V${num(cy - 6)}`,
        stroke: c,
        "stroke-width": 1.6,
      });
    case "vline":
      return el("path", {
        d: `M${num(x + 9)},${num(cy + 6)}V${num(cy - 6)}`,
        stroke: c,
        "stroke-dasharray": DASHES[l.dash ?? "dashed"],
        "stroke-width": 1.2,
      });
    default:
      return el("line", {
        x1: x,
        x2: x + 18,
        y1: cy,
        y2: cy,
        stroke: c,
        "stroke-width": l.type === "line" ? (l.width ?? 1.6) + 0.4 : 1.2,
        "stroke-dasharray":
          DASHES[(l as LineLayer | HLineLayer).dash ?? (l.type === "hline" ? "dashed" : "solid")],
      });
  }
}
