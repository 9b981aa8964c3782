/**
 * Grid lines, ticks, tick labels, the axis lines and the two axis titles. Crowded x tick labels
 * are thinned to every n-th; titles longer than the room shrink, then are cut.
 *
 * @module
 */
import { el, num, text, textWidth } from "../svg.ts";
import type { Theme } from "../theme.ts";
import type { AxisSpec } from "../spec.ts";
import { fitText } from "./fit_text.ts";
import { FONT } from "./metrics.ts";
import type { Plot } from "./scales.ts";

/** The axes group's content. */
export function drawAxes(p: Plot, x: AxisSpec, y: AxisSpec, theme: Theme): string {
  return yGrid(p, theme) + xGrid(p, theme) + axisLines(p, theme) + axisTitles(p, x, y, theme);
}

/** Horizontal grid lines with the y tick labels. */
function yGrid(p: Plot, theme: Theme): string {
  let axes = "";
  for (const t of p.yTicks) {
    const py = p.Y(t.value);
    axes += el("line", {
      x1: p.left,
      x2: p.right,
      y1: py,
      y2: py,
      stroke: theme.grid,
      "stroke-width": 1,
    });
    axes += text({
      x: p.left - 6,
      y: py + 4,
      "text-anchor": "end",
      fill: theme.muted,
      "font-size": FONT,
    }, t.label);
  }
  return axes;
}

/** Vertical grid lines (not for categories), x ticks and every n-th label that has room. */
function xGrid(p: Plot, theme: Theme): string {
  let axes = "";
  const maxXLabel = Math.max(0, ...p.xTicks.map((t) => textWidth(t.label, FONT)));
  const spacing = p.xTicks.length > 1 ? (p.right - p.left) / p.xTicks.length : p.right - p.left;
  const everyNth = Math.max(1, Math.ceil((maxXLabel + 8) / Math.max(1, spacing)));
  p.xTicks.forEach((t, i) => {
    const px = p.xKind === "category" ? t.value : p.X(t.value);
    if (p.xKind !== "category") {
      axes += el("line", {
        x1: px,
        x2: px,
        y1: p.top,
        y2: p.bottom,
        stroke: theme.grid,
        "stroke-width": 1,
      });
    }
    axes += el("line", {
      x1: px,
      x2: px,
      y1: p.bottom,
      y2: p.bottom + 4,
      stroke: theme.foreground,
    });
    if (i % everyNth === 0) {
      axes += text({
        x: px,
        y: p.bottom + 4 + FONT + 2,
        "text-anchor": "middle",
        fill: theme.muted,
        "font-size": FONT,
      }, t.label);
    }
  });
  return axes;
}

/** The x axis line at the bottom of the plot and the y axis line on its left. */
function axisLines(p: Plot, theme: Theme): string {
  const line = (x1: number, x2: number, y1: number, y2: number) =>
    el("line", { x1, x2, y1, y2, stroke: theme.foreground, "stroke-width": 1 });
  return line(p.left, p.right, p.bottom, p.bottom) + line(p.left, p.left, p.top, p.bottom);
}

/** The x axis title under the tick labels, the y axis title rotated on the left. */
function axisTitles(p: Plot, x: AxisSpec, y: AxisSpec, theme: Theme): string {
  const xMid = (p.left + p.right) / 2;
  const xl = fitText(x.label, FONT, 2 * Math.min(xMid, p.width - xMid) - 8);
  const yMid = (p.top + p.bottom) / 2;
  const yl = fitText(y.label, FONT, 2 * Math.min(yMid, p.height - yMid) - 8);
  return text({
    class: "x-label",
    x: xMid,
    y: p.bottom + 4 + FONT + 4 + FONT + 4,
    "text-anchor": "middle",
    fill: theme.foreground,
    "font-size": xl.size,
  }, xl.text) + text({
    class: "y-label",
    x: 12 + FONT,
    y: yMid,
    "text-anchor": "middle",
    transform: `rotate(-90 ${num(12 + FONT)} ${num(yMid)})`,
    fill: theme.foreground,
    "font-size": yl.size,
  }, yl.text);
}
