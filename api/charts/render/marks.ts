/**
 * How layers are marked: their colours, dash patterns and point-marker shapes, shared by the
 * layers and their legend swatches.
 *
 * @module
 */
import {
  symbolCircle,
  symbolDiamond,
  symbolSquare,
  symbolTriangle,
  type SymbolType,
} from "d3-shape";
import { color, type Theme } from "../theme.ts";
import type { Dash, Layer, MarkerShape } from "../spec.ts";

/** SVG `stroke-dasharray` of each dash style. */
export const DASHES: Record<Dash, string | undefined> = {
  solid: undefined,
  dashed: "6 4",
  dotted: "2 3",
};

/** True for a finite number (null, undefined, NaN and infinities are gaps). */
export function finite(v: number | null | undefined): v is number {
  return typeof v === "number" && Number.isFinite(v);
}

/** The d3 symbol of a marker shape, with its rotation in degrees. */
export function markerType(shape: MarkerShape | undefined): { type: SymbolType; rotate: number } {
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
export function layerColors(layers: Layer[], theme: Theme): string[] {
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
