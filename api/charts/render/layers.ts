/**
 * The data layers in spec order: paths (bands, lines, stems, bars) first, then the overlay
 * (markers, reference rules and their texts) above them, all clipped to the plot area; with a
 * one-line summary of each layer for the description.
 *
 * @module
 */
import type { Theme } from "../theme.ts";
import type { Layer } from "../spec.ts";
import { drawBand, drawLine } from "./layer_paths.ts";
import { drawBars, drawPoints, drawStems } from "./layer_marks.ts";
import { drawHLine, drawVLine, placeVLineTexts } from "./layer_rules.ts";
import type { Plot } from "./scales.ts";

/** What drawing one layer gives. */
export interface Drawn {
  /** Markup among the paths. */
  layer?: string;
  /** Markup above the paths. */
  overlay?: string[];
  /** Text of a vertical line, placed after every layer is drawn. */
  vlineText?: { x: number; text: string; color: string };
  /** Whether the layer drew any data. */
  visible: boolean;
  /** What was drawn, for the description. */
  summary: string;
}

function drawLayer(p: Plot, l: Layer, c: string, theme: Theme): Drawn | null {
  switch (l.type) {
    case "band":
      return drawBand(p, l, c, theme);
    case "line":
      return drawLine(p, l, c);
    case "points":
      return drawPoints(p, l, c, theme);
    case "stems":
      return drawStems(p, l, c);
    case "bars":
      return drawBars(p, l, c, theme);
    case "vline":
      return drawVLine(p, l, c);
    case "hline":
      return drawHLine(p, l, c);
  }
}

/** Every layer's markup (without the clip group), whether any data showed, and summaries. */
export function drawLayers(
  p: Plot,
  layers: Layer[],
  colors: string[],
  theme: Theme,
): { markup: string; anyVisible: boolean; summary: string[] } {
  let markup = "";
  let anyVisible = false;
  const overlay: string[] = [];
  const vlineTexts: NonNullable<Drawn["vlineText"]>[] = [];
  const summary: string[] = [];
  if (p.hasX && p.hasY) {
    layers.forEach((l, i) => {
      const d = drawLayer(p, l, colors[i], theme);
      if (!d) return;
      markup += d.layer ?? "";
      overlay.push(...d.overlay ?? []);
      if (d.vlineText) vlineTexts.push(d.vlineText);
      if (d.visible) anyVisible = true;
      summary.push(d.summary);
    });
  }
  overlay.push(...placeVLineTexts(p, vlineTexts));
  return { markup: markup + overlay.join(""), anyVisible, summary };
}
