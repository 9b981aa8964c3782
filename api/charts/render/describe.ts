/**
 * Accessibility and the SVG document: the `<desc>` text (the spec's description, both axes with
 * their ranges, every layer drawn, the notes) and the root element that points `aria-labelledby`
 * at `<title>` and `<desc>`.
 *
 * @module
 */
import { escapeXml, num } from "../svg.ts";
import { FONT_STACK, type Theme } from "../theme.ts";
import { numberLabel } from "../ticks.ts";
import type { ChartSpec } from "../spec.ts";
import { formatIsoTime } from "../../../core/time/mod.ts";
import { FONT } from "./metrics.ts";
import type { Plot } from "./scales.ts";

/** A decimal year as an ISO date at a precision fit for the axis span. */
function yearText(t: number, span: number): string {
  return formatIsoTime(t, span >= 30 ? "annual" : span >= 1 ? "monthly" : "daily");
}

/** The x axis range in words. */
function xRangeText(p: Plot): string {
  if (p.xKind === "category") return `categories ${p.categories.join(", ")}`;
  if (!p.hasX) return "with no data";
  const { x0, x1 } = p;
  const at = (v: number) =>
    p.xKind === "year" ? yearText(v, x1 - x0) : numberLabel(v, Math.abs(x1 - x0) / 100);
  return `from ${at(x0)} to ${at(x1)}`;
}

/** The y axis range in words. */
function yRangeText(p: Plot): string {
  if (!p.hasY) return "with no data";
  const [y0, y1] = p.yDomain;
  return `from ${numberLabel(y0, Math.abs(y1 - y0) / 100)} to ${
    numberLabel(y1, Math.abs(y1 - y0) / 100)
  }`;
}

/** The text of the chart's `<desc>`. */
export function describeChart(
  spec: ChartSpec,
  p: Plot,
  drawn: { summary: string[]; anyVisible: boolean },
): string {
  return [
    spec.description,
    `Horizontal axis: ${spec.x.label}, ${xRangeText(p)}. Vertical axis: ${spec.y.label}${
      p.yKind === "log" ? " (logarithmic)" : ""
    }, ${yRangeText(p)}.`,
    drawn.summary.length ? `Drawn: ${drawn.summary.join("; ")}.` : "",
    drawn.anyVisible ? "" : "No data falls in the selected range.",
    ...(spec.keep ?? []),
    ...(spec.notes ?? []),
    ...p.dropped,
  ].filter(Boolean).join(" ");
}

/** The standalone SVG document around the drawn markup. */
export function svgDocument(
  id: string,
  p: Plot,
  theme: Theme,
  title: string,
  desc: string,
  markup: string,
): string {
  const W = num(p.width), H = num(p.height);
  const head = `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" ` +
    `viewBox="0 0 ${W} ${H}" role="img" aria-labelledby="${id}-title ${id}-desc" ` +
    `font-family="${escapeXml(FONT_STACK)}" font-size="${FONT}" data-theme="${theme.name}">`;
  return `<?xml version="1.0" encoding="UTF-8"?>\n${head}<title id="${id}-title">${
    escapeXml(title)
  }</title><desc id="${id}-desc">${escapeXml(desc)}</desc>${markup}</svg>\n`;
}
