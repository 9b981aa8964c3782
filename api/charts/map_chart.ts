/**
 * Map charts of gridded results (solar-signal maps, composites, field slices) as standalone
 * SVG: an equirectangular map of the grid cells coloured on a diverging scale centred on zero
 * (ColorBrewer's RdBu, Brewer 2003, via d3-scale-chromatic; blue below zero, red above), with
 * the coastlines of Natural Earth (map_coastlines.ts), the cells that pass the stated
 * significance test marked with a dot (stippling), a colour bar with the units, the title, and
 * every warning and caution written out in full under the map (the chart grows taller rather
 * than cut one).
 *
 * Same conventions as the line charts (chart.ts): `role="img"` with `<title>` and `<desc>`, the
 * system font stack, no script, nothing loaded, light and dark themes.
 *
 * Cells are drawn as rectangles between their bounds (from the grid's bounds when given, else
 * halfway to the neighbouring centres); runs of equal colour along a row are merged, so a 1°
 * global map stays a few hundred kilobytes.
 *
 * @module
 */
import { interpolateRdBu, interpolateViridis } from "d3-scale-chromatic";
import { el, escapeXml, num, shortHash, text, wrapText } from "./svg.ts";
import { FONT_STACK, THEMES } from "./theme.ts";
import type { ChartSpec, RenderOptions } from "./spec.ts";
import { renderChart } from "./chart.ts";
import { coastlinePath, frameX, frameY, type MapFrame } from "./map_coastlines.ts";
import { FONT, NOTE_FONT, NOTE_LINE, TITLE_FONT } from "./render/metrics.ts";

/** A map chart: values on a latitude–longitude grid. */
export interface MapChartSpec {
  type: "map";
  title: string;
  /** Opening of the SVG `<desc>`; a summary of the values is appended. */
  description: string;
  /** Cell centres, degrees north and east. */
  lat: ArrayLike<number>;
  lon: ArrayLike<number>;
  lat_bounds?: ArrayLike<number> | null;
  lon_bounds?: ArrayLike<number> | null;
  /** One value per cell, latitude-major (i · n_lon + j); null or NaN = no value (grey). */
  values: ArrayLike<number | null>;
  /** What the colours show, with units, e.g. "slope (K per W m-2)". */
  legend: string;
  /** 1 where the cell is marked as significant; null/0 otherwise. */
  stipple?: ArrayLike<number | null>;
  /** What the dots mean, e.g. "significant: Benjamini–Hochberg at α_FDR = 0.10". */
  stippleLabel?: string;
  /** Fixed symmetric colour limit; default the 98th percentile of |value|. */
  limit?: number;
  /**
   * `diverging` (default): centred on zero, for signed quantities (r, slopes, anomalies);
   * `sequential`: viridis from the 2nd to the 98th percentile, for absolute values.
   */
  scale?: "diverging" | "sequential";
  /** Warnings and cautions, each written in full under the map. */
  notes?: string[];
}

/** Render any chart spec: a map, or the line-chart toolkit's panel. */
export function renderAnyChart(spec: ChartSpec | MapChartSpec, opts: RenderOptions): string {
  return isMapChart(spec) ? renderMapChart(spec, opts) : renderChart(spec, opts);
}

/** True for a map chart spec. */
export function isMapChart(spec: unknown): spec is MapChartSpec {
  return (spec as { type?: string } | null)?.type === "map";
}

const CLASSES = 11;

/** Edges of the cells along one axis: bounds when given, else midpoints between centres. */
function edges(
  c: ArrayLike<number>,
  bounds: ArrayLike<number> | null | undefined,
  lo: number,
  hi: number,
  single: number,
) {
  const n = c.length;
  const a = new Float64Array(n), b = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let left: number, right: number;
    if (bounds && bounds.length === 2 * n) {
      left = bounds[2 * i];
      right = bounds[2 * i + 1];
    } else if (n === 1) {
      left = c[0] - single;
      right = c[0] + single;
    } else {
      left = i > 0 ? (c[i - 1] + c[i]) / 2 : c[0] - (c[1] - c[0]) / 2;
      right = i < n - 1 ? (c[i] + c[i + 1]) / 2 : c[i] + (c[i] - c[i - 1]) / 2;
    }
    a[i] = Math.max(lo, Math.min(left, right));
    b[i] = Math.min(hi, Math.max(left, right));
  }
  return { a, b };
}

/** The longitude window: 0..360 when the grid lies east of 0 past 180, else −180..180. */
function lonWindow(lonA: Float64Array, lonB: Float64Array): [number, number] {
  let min = Infinity, max = -Infinity;
  for (let j = 0; j < lonA.length; j++) {
    min = Math.min(min, lonA[j]);
    max = Math.max(max, lonB[j]);
  }
  if (max - min >= 359) return min >= -1 && max > 181 ? [0, 360] : [-180, 180];
  return [min, max];
}

/** Symmetric colour limit: the 98th percentile of |value| (never 0). */
function colourLimit(values: ArrayLike<number | null>): number {
  const a: number[] = [];
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v !== null && Number.isFinite(v)) a.push(Math.abs(v));
  }
  if (a.length === 0) return 1;
  a.sort((x, y) => x - y);
  const q = a[Math.min(a.length - 1, Math.floor(0.98 * (a.length - 1)))];
  return q > 0 ? q : (a[a.length - 1] > 0 ? a[a.length - 1] : 1);
}

/** The 2nd and 98th percentiles of the values (a non-empty range). */
function sequentialDomain(values: ArrayLike<number | null>): [number, number] {
  const a: number[] = [];
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v !== null && Number.isFinite(v)) a.push(v);
  }
  if (a.length === 0) return [0, 1];
  a.sort((x, y) => x - y);
  const q = (p: number) => a[Math.min(a.length - 1, Math.floor(p * (a.length - 1)))];
  const lo = q(0.02), hi = q(0.98);
  return hi > lo ? [lo, hi] : [lo - 0.5, lo + 0.5];
}

/** A round step for the colour bar's ticks over a range of width `2 · limit`. */
function niceStep(limit: number): number {
  const raw = limit / 2;
  const p = 10 ** Math.floor(Math.log10(raw));
  const m = raw / p;
  return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * p;
}

function tickLabel(v: number, step: number): string {
  const d = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  const s = v.toFixed(d);
  return /^-0(\.0*)?$/.test(s) ? s.slice(1) : s;
}

/** The colour of a class k of CLASSES (0 = lowest). Diverging: blue below zero, red above. */
function classColour(k: number, scale: "diverging" | "sequential"): string {
  // RdBu goes red (0) to blue (1): reverse so negative values are blue
  return scale === "sequential"
    ? interpolateViridis((k + 0.5) / CLASSES)
    : interpolateRdBu(1 - (k + 0.5) / CLASSES);
}

/**
 * Render a map chart to an SVG document.
 *
 * @param spec the map
 * @param opts size (the height grows when the notes need it) and theme
 * @returns the SVG text
 */
export function renderMapChart(spec: MapChartSpec, opts: RenderOptions): string {
  const theme = THEMES[opts.theme];
  const W = opts.width;
  const id = opts.idPrefix ??
    "m" + shortHash(JSON.stringify([spec.title, W, opts.height, opts.theme]));
  const nLat = spec.lat.length, nLon = spec.lon.length;
  const latE = edges(spec.lat, spec.lat_bounds, -90, 90, 90);
  const lonE = edges(spec.lon, spec.lon_bounds, -Infinity, Infinity, 180);
  const [west, east] = lonWindow(lonE.a, lonE.b);
  let south = 90, north = -90;
  for (let i = 0; i < nLat; i++) {
    south = Math.min(south, latE.a[i]);
    north = Math.max(north, latE.b[i]);
  }
  // layout: title, subtitle, map, colour bar, stipple key, notes
  const titleLines = wrapText(spec.title, TITLE_FONT, W - 24, true);
  const top = 10 + titleLines.length * (TITLE_FONT + 4) + 4;
  const notes: string[] = [];
  for (const n of spec.notes ?? []) notes.push(...wrapText(n, NOTE_FONT, W - 24));
  const below = 66 + (spec.stipple ? 16 : 0) + (notes.length ? notes.length * NOTE_LINE + 8 : 0);
  const aspect = (east - west) / Math.max(1e-9, north - south);
  let mapW = W - 24, mapH = mapW / aspect;
  // the map keeps at least three quarters of the full width: the chart grows taller for long
  // notes rather than shrink the map to a thumbnail
  const room = Math.max(80, opts.height - top - below, (0.75 * (W - 24)) / aspect);
  if (mapH > room) {
    mapH = room;
    mapW = mapH * aspect;
  }
  const H = Math.ceil(top + mapH + below);
  const frame: MapFrame = {
    west,
    east,
    south,
    north,
    x0: (W - mapW) / 2,
    y0: top,
    width: mapW,
    height: mapH,
  };
  const scale = spec.scale ?? "diverging";
  const limit = spec.limit && spec.limit > 0 ? spec.limit : colourLimit(spec.values);
  const [lo, hi] = scale === "sequential" ? sequentialDomain(spec.values) : [-limit, limit];
  const classOf = (v: number) =>
    Math.max(0, Math.min(CLASSES - 1, Math.floor(((v - lo) / (hi - lo)) * CLASSES)));
  const shiftLon = (lon: number) => {
    let x = lon;
    while (x < west - 1e-9) x += 360;
    while (x > east + 1e-9) x -= 360;
    return x;
  };
  // cells, merged along rows by colour
  let cells = "";
  let shown = 0, missing = 0, marked = 0;
  let vmin = Infinity, vmax = -Infinity;
  const order = Array.from({ length: nLon }, (_, j) => j).sort(
    (p, q) => shiftLon(lonE.a[p]) - shiftLon(lonE.a[q]),
  );
  for (let i = 0; i < nLat; i++) {
    const y1 = frameY(frame, latE.b[i]), y2 = frameY(frame, latE.a[i]);
    let runStart = -1, runFill = "", runEnd = 0;
    const flush = () => {
      if (runStart >= 0) {
        cells += el("rect", {
          x: runStart,
          y: y1,
          width: Math.max(0.1, runEnd - runStart),
          height: Math.max(0.1, y2 - y1),
          fill: runFill,
        });
      }
      runStart = -1;
    };
    for (const j of order) {
      const v = spec.values[i * nLon + j];
      const ok = v !== null && Number.isFinite(v);
      const fill = ok ? classColour(classOf(v as number), scale) : theme.grid;
      if (ok) {
        shown++;
        vmin = Math.min(vmin, v as number);
        vmax = Math.max(vmax, v as number);
      } else missing++;
      const a = shiftLon(lonE.a[j]);
      const x1 = frameX(frame, a), x2 = frameX(frame, a + (lonE.b[j] - lonE.a[j]));
      if (runStart >= 0 && fill === runFill && Math.abs(x1 - runEnd) < 0.05) runEnd = x2;
      else {
        flush();
        runStart = x1;
        runEnd = x2;
        runFill = fill;
      }
    }
    flush();
  }
  // stippling
  let dots = "";
  if (spec.stipple) {
    const r = Math.max(0.8, Math.min(2.2, (mapW / nLon) * 0.16));
    const ink = theme.name === "dark" ? "#f5f5f5" : "#1b1f24";
    for (let i = 0; i < nLat; i++) {
      for (let j = 0; j < nLon; j++) {
        const v = spec.values[i * nLon + j];
        if (spec.stipple[i * nLon + j] !== 1 || v === null || !Number.isFinite(v)) continue;
        marked++;
        dots += el("circle", {
          cx: frameX(frame, shiftLon(spec.lon[j])),
          cy: frameY(frame, spec.lat[i]),
          r,
          fill: ink,
        });
      }
    }
  }
  const clip = `${id}-clip`;
  const coast = el("path", {
    d: coastlinePath(frame),
    fill: "none",
    stroke: theme.name === "dark" ? "#c9d1d9" : "#30363d",
    "stroke-width": 0.7,
    "stroke-linejoin": "round",
  });
  const map = el(
    "defs",
    {},
    el(
      "clipPath",
      { id: clip },
      el("rect", {
        x: frame.x0,
        y: frame.y0,
        width: mapW,
        height: mapH,
      }),
    ),
  ) +
    el("g", {
      class: "cells",
      "clip-path": `url(#${clip})`,
      "shape-rendering": "crispEdges",
    }, cells) +
    el("g", { class: "coastlines", "clip-path": `url(#${clip})` }, coast) +
    el("g", { class: "stippling", "clip-path": `url(#${clip})` }, dots) +
    el("rect", {
      x: frame.x0,
      y: frame.y0,
      width: mapW,
      height: mapH,
      fill: "none",
      stroke: theme.muted,
      "stroke-width": 0.8,
    }) + graticuleLabels(frame, theme.muted);
  // colour bar
  const barW = Math.min(420, W - 24), barX = (W - barW) / 2, barY = top + mapH + 34;
  let bar = "";
  for (let k = 0; k < CLASSES; k++) {
    bar += el("rect", {
      x: barX + (k * barW) / CLASSES,
      y: barY,
      width: barW / CLASSES + 0.3,
      height: 10,
      fill: classColour(k, scale),
    });
  }
  const step = niceStep((hi - lo) / 2);
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + 1e-9 * step; v += step) {
    const x = barX + ((v - lo) / (hi - lo)) * barW;
    bar += el("line", { x1: x, x2: x, y1: barY + 10, y2: barY + 14, stroke: theme.muted }) +
      text({
        x,
        y: barY + 25,
        "text-anchor": "middle",
        fill: theme.muted,
        "font-size": FONT - 1,
      }, tickLabel(v, step));
  }
  bar += text(
    {
      x: W / 2,
      y: barY - 6,
      "text-anchor": "middle",
      fill: theme.foreground,
      "font-size": FONT,
    },
    `${spec.legend}; colours saturate ${
      scale === "sequential"
        ? `below ${tickLabel(lo, step / 10)} and above ${tickLabel(hi, step / 10)}`
        : `beyond ±${tickLabel(limit, step / 10)}`
    }`,
  );
  let key = "";
  let y = barY + 40;
  if (spec.stipple) {
    key += el("circle", { cx: barX + 4, cy: y - 4, r: 2, fill: theme.foreground }) +
      text(
        { x: barX + 12, y, fill: theme.foreground, "font-size": FONT - 1 },
        `${spec.stippleLabel ?? "significant"} (${marked} cells); grey: no value`,
      );
    y += 16;
  }
  let noteText = "";
  notes.forEach((line, k) => {
    noteText += text(
      { x: 12, y: y + 6 + k * NOTE_LINE, fill: theme.muted, "font-size": NOTE_FONT },
      line,
    );
  });
  let title = "";
  titleLines.forEach((line, k) => {
    title += text({
      x: 12,
      y: 10 + TITLE_FONT + k * (TITLE_FONT + 4),
      fill: theme.foreground,
      "font-size": TITLE_FONT,
      "font-weight": "600",
    }, line);
  });
  const desc = `${spec.description} Equirectangular map of ${nLat} × ${nLon} cells ` +
    `(${south.toFixed(1)}..${north.toFixed(1)}° N, ${west.toFixed(1)}..${east.toFixed(1)}° E): ` +
    `${shown} cells with a value${
      shown ? ` from ${vmin.toPrecision(3)} to ${vmax.toPrecision(3)}` : ""
    }, ${missing} without; ${spec.legend}.` +
    (spec.stipple ? ` ${marked} cells marked: ${spec.stippleLabel ?? "significant"}.` : "") +
    " Coastlines: Natural Earth 1:110m (public domain)." +
    (spec.notes?.length ? ` Notes: ${spec.notes.join(" ")}` : "");
  const markup = el("rect", { width: W, height: H, fill: theme.background }) + title +
    el("g", { class: "map" }, map) + el("g", { class: "legend" }, bar + key) +
    el("g", { class: "notes" }, noteText);
  const head = `<svg xmlns="http://www.w3.org/2000/svg" width="${num(W)}" height="${num(H)}" ` +
    `viewBox="0 0 ${num(W)} ${num(H)}" role="img" aria-labelledby="${id}-title ${id}-desc" ` +
    `font-family="${escapeXml(FONT_STACK)}" font-size="${FONT}" data-theme="${theme.name}">`;
  return `<?xml version="1.0" encoding="UTF-8"?>\n${head}<title id="${id}-title">${
    escapeXml(spec.title)
  }</title><desc id="${id}-desc">${escapeXml(desc)}</desc>${markup}</svg>\n`;
}

/** Latitude and longitude labels at round degrees along the map's left and bottom edges. */
function graticuleLabels(f: MapFrame, fill: string): string {
  const span = Math.max(f.east - f.west, f.north - f.south);
  const step = span > 180 ? 60 : span > 90 ? 30 : span > 30 ? 10 : 5;
  let out = "";
  const fmtLat = (v: number) => (v === 0 ? "0°" : `${Math.abs(v)}°${v > 0 ? "N" : "S"}`);
  const fmtLon = (v: number) => {
    const w = ((v + 540) % 360) - 180;
    return w === 0 || w === -180 ? `${Math.abs(w)}°` : `${Math.abs(w)}°${w > 0 ? "E" : "W"}`;
  };
  for (let v = Math.ceil(f.south / step) * step; v <= f.north; v += step) {
    const y = frameY(f, v);
    if (y < f.y0 + 6 || y > f.y0 + f.height - 2) continue;
    out += text({ x: f.x0 + 3, y: y + 3, fill, "font-size": FONT - 3 }, fmtLat(v));
  }
  for (let v = Math.ceil(f.west / step) * step; v <= f.east; v += step) {
    const x = frameX(f, v);
    if (x < f.x0 + 14 || x > f.x0 + f.width - 14) continue;
    out += text({
      x,
      y: f.y0 + f.height + 11,
      "text-anchor": "middle",
      fill,
      "font-size": FONT - 3,
    }, fmtLon(v));
  }
  return out;
}
