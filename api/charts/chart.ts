/**
 * A small declarative chart toolkit rendered to standalone SVG with d3-scale and d3-shape
 * (no DOM): one panel with an x and a y axis, and layers (lines, uncertainty bands, point
 * markers, stems, bars with error bars, vertical event lines and horizontal reference
 * levels), a legend, lines under the plot (warnings always whole, growing the chart when they
 * need the room; notes and cautions shortened to a pointer when room is short), light and dark
 * themes and time-range clipping.
 *
 * The SVG is accessible (`role="img"`, `aria-labelledby` pointing at `<title>` and `<desc>`,
 * with a text summary of what is drawn), uses the system font stack only, loads nothing, runs
 * no script, and is well-formed XML (every text is escaped).
 *
 * Rendering runs in named stages, one file each under `render/`: data domains
 * (`domain.ts`), vertical layout of title, legend and notes (`layout.ts`), scales and ticks
 * (`scales.ts`), axes (`axes.ts`), layers by type (`layers.ts`), legend (`legend.ts`), title
 * and notes (`title.ts`, `notes.ts`), and the accessible description (`describe.ts`).
 *
 * @module
 */
import { el, shortHash, text } from "./svg.ts";
import { THEMES } from "./theme.ts";
import type { ChartSpec, RenderOptions } from "./spec.ts";
import { dataDomains } from "./render/domain.ts";
import { layoutFrame } from "./render/layout.ts";
import { buildPlot, type Plot } from "./render/scales.ts";
import { drawAxes } from "./render/axes.ts";
import { drawLayers } from "./render/layers.ts";
import { drawLegend } from "./render/legend.ts";
import { drawTitle } from "./render/title.ts";
import { drawNotes } from "./render/notes.ts";
import { describeChart, svgDocument } from "./render/describe.ts";
import { layerColors } from "./render/marks.ts";
import { FONT } from "./render/metrics.ts";

export type * from "./spec.ts";

/** Render a chart spec to an SVG document string. */
export function renderChart(spec: ChartSpec, opts: RenderOptions): string {
  const theme = THEMES[opts.theme];
  const W = opts.width;
  const id = opts.idPrefix ??
    "c" + shortHash(JSON.stringify([spec.title, W, opts.height, opts.theme, opts.from, opts.to]));
  const colors = layerColors(spec.layers, theme);
  const domains = dataDomains(spec, opts);
  const frame = layoutFrame(spec, [...(spec.notes ?? []), ...domains.dropped], W, opts.height);
  // the kept lines (warnings) are never cut: the chart is taller than asked when they need it
  const H = frame.height;
  const plot = buildPlot(spec, domains, frame, W, H);
  const drawn = drawLayers(plot, spec.layers, colors, theme);
  const markup = el("rect", { width: W, height: H, fill: theme.background }) +
    drawTitle(frame.title, theme) +
    el("g", { class: "legend" }, drawLegend(frame.legend, frame.legendTop, colors, W, theme)) +
    el("g", { class: "axes" }, drawAxes(plot, spec.x, spec.y, theme)) +
    clipped(plot, `${id}-clip`, drawn.markup) +
    (drawn.anyVisible ? "" : emptyMessage(plot, theme.muted)) +
    el("g", { class: "notes" }, drawNotes(frame.notes, H, theme));
  return svgDocument(id, plot, theme, spec.title, describeChart(spec, plot, drawn), markup);
}

/** The layers' group, clipped to the plot area. */
function clipped(p: Plot, clipId: string, layers: string): string {
  const rect = el("rect", {
    x: p.left,
    y: p.top,
    width: p.right - p.left,
    height: p.bottom - p.top,
  });
  return el("defs", {}, el("clipPath", { id: clipId }, rect)) +
    el("g", { class: "layers", "clip-path": `url(#${clipId})` }, layers);
}

/** The message in the middle of a plot that shows no data. */
function emptyMessage(p: Plot, fill: string): string {
  return text({
    class: "empty",
    x: (p.left + p.right) / 2,
    y: (p.top + p.bottom) / 2,
    "text-anchor": "middle",
    fill,
    "font-size": FONT + 1,
  }, "No data in the selected range");
}
