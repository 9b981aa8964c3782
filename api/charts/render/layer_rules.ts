/**
 * Reference rules across the plot: vertical event lines (with a text placed later, where it
 * does not overlap another) and horizontal reference levels (with their text at the right).
 *
 * @module
 */
import { el, text, textWidth } from "../svg.ts";
import { numberLabel } from "../ticks.ts";
import type { HLineLayer, VLineLayer } from "../spec.ts";
import { DASHES } from "./marks.ts";
import { FONT } from "./metrics.ts";
import type { Plot } from "./scales.ts";
import type { Drawn } from "./layers.ts";

/** A vertical line at x (not on a category axis, nor outside the x range). */
export function drawVLine(p: Plot, l: VLineLayer, c: string): Drawn | null {
  if (p.xKind === "category" || !p.inX(l.x)) return null;
  const px = p.X(l.x);
  return {
    overlay: [el("line", {
      class: "vline",
      x1: px,
      x2: px,
      y1: p.top,
      y2: p.bottom,
      stroke: c,
      "stroke-width": 1,
      "stroke-dasharray": DASHES[l.dash ?? "dashed"],
    })],
    vlineText: l.text ? { x: px, text: l.text, color: c } : undefined,
    visible: false,
    summary: `vertical line "${l.label ?? l.text ?? "event"}" at ${numberLabel(l.x, 0.01)}`,
  };
}

/** A horizontal reference level at y (not when y cannot be drawn on the axis). */
export function drawHLine(p: Plot, l: HLineLayer, c: string): Drawn | null {
  if (!p.yOk(l.y)) return null;
  const py = p.Y(l.y);
  const overlay = [el("line", {
    class: "hline",
    x1: p.left,
    x2: p.right,
    y1: py,
    y2: py,
    stroke: c,
    "stroke-width": 1.2,
    "stroke-dasharray": DASHES[l.dash ?? "dashed"],
  })];
  if (l.text) {
    overlay.push(text(
      { x: p.right - 4, y: py - 4, "text-anchor": "end", fill: c, "font-size": FONT - 1 },
      l.text,
    ));
  }
  return {
    overlay,
    visible: false,
    summary: `reference level "${l.label ?? l.text ?? "level"}" at ${
      numberLabel(l.y, Math.abs(l.y) / 1000 || 0.001)
    }`,
  };
}

/**
 * Texts of vertical lines right of their line (left when there is no room), only where they do
 * not overlap, the first listed placed first.
 */
export function placeVLineTexts(
  p: Plot,
  texts: { x: number; text: string; color: string }[],
): string[] {
  const placed: [number, number][] = [];
  const free = (a: number, b: number) =>
    a >= p.left && b <= p.right && !placed.some(([s, e]) => a < e + 4 && b > s - 4);
  const out: string[] = [];
  for (const v of texts) {
    const w = textWidth(v.text, FONT - 1);
    let a = v.x + 3;
    if (!free(a, a + w)) a = v.x - 3 - w;
    if (!free(a, a + w)) continue;
    placed.push([a, a + w]);
    out.push(text({ x: a, y: p.top + FONT, fill: v.color, "font-size": FONT - 1 }, v.text));
  }
  return out;
}
