/**
 * The legend: one entry per labelled layer (a swatch drawn like the layer, then its label),
 * flowed into rows across the chart's width.
 *
 * @module
 */
import { symbol } from "d3-shape";
import { el, num, text, textWidth } from "../svg.ts";
import type { Theme } from "../theme.ts";
import type { HLineLayer, Layer, LineLayer } from "../spec.ts";
import { fitText } from "./fit_text.ts";
import { DASHES, markerType } from "./marks.ts";
import { FONT, LEGEND_ROW } from "./metrics.ts";

/** A legend entry: the layer, its index and its left edge. */
export interface LegendEntry {
  l: Layer;
  i: number;
  x: number;
}

/** The labelled layers flowed into rows of a chart `width` px wide. */
export function legendRows(layers: Layer[], width: number): LegendEntry[][] {
  const rows: LegendEntry[][] = [];
  let lx = 12;
  layers.forEach((l, i) => {
    if (!l.label) return;
    const w = 22 + textWidth(l.label, FONT) + 14;
    if (!rows.length || (lx + w > width - 8 && lx > 12)) {
      rows.push([]);
      lx = 12;
    }
    rows[rows.length - 1].push({ l, i, x: lx });
    lx += w;
  });
  return rows;
}

/** Height the legend rows take under the title. */
export function legendHeight(rows: LegendEntry[][]): number {
  return rows.length ? 4 + rows.length * LEGEND_ROW + 2 : 0;
}

/** The legend's swatches and labels, rows starting at `top`. */
export function drawLegend(
  rows: LegendEntry[][],
  top: number,
  colors: string[],
  width: number,
  theme: Theme,
): string {
  let legend = "";
  rows.forEach((row, r) => {
    const ly = top + 4 + r * LEGEND_ROW;
    const cy = ly + FONT / 2 - 1;
    for (const { l, i, x } of row) {
      legend += legendSwatch(l, colors[i], x, cy, theme);
      // an entry alone on its row may still be wider than the chart: cut it to fit
      const fit = fitText(l.label as string, FONT, width - 8 - (x + 22));
      legend += text(
        { x: x + 22, y: ly + FONT - 2, fill: theme.foreground, "font-size": fit.size },
        fit.text,
      );
    }
  });
  return legend;
}

/** A small picture of a layer: a patch for a band, a marker, a bar, a stem or a line. */
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
