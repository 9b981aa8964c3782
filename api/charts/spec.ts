/**
 * The declarative chart description the renderer draws: one panel with an x and a y axis, and
 * layers (lines, uncertainty bands, point markers, stems, bars with error bars, vertical event
 * lines and horizontal reference levels), a legend and notes; plus the render options (size,
 * theme, time range).
 *
 * @module
 */
import type { ColorRef, ThemeName } from "./theme.ts";

export type AxisKind = "year" | "linear" | "log" | "category";
export type Dash = "solid" | "dashed" | "dotted";
export type MarkerShape = "circle" | "square" | "diamond" | "triangle-up" | "triangle-down";
/** Values of a layer; null (or a non-finite number) is a gap. */
export type Values = ArrayLike<number | null>;

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
  /**
   * Lines under the plot that may be shortened when room is short (method notes, cautions):
   * shown whole as long as they fit, else as many whole notes as fit and one line pointing to
   * where the rest is read (`notesRef`, else the chart's description, which holds them all).
   */
  notes?: string[];
  /**
   * Lines always shown whole, whatever the size (warnings, and what the chart cannot be read
   * without, e.g. a lag chart's preprocessing and lag window): the chart grows taller than
   * asked when they need the room.
   */
  keep?: string[];
  /** Where notes cut for room can be read, e.g. "run 7e8f9a0b" (a run chart's label). */
  notesRef?: string;
}

export interface RenderOptions {
  width: number;
  /** Height asked for; the chart is taller when its kept lines (`ChartSpec.keep`) need it. */
  height: number;
  theme: ThemeName;
  /** Time range (decimal years), applied to a "year" x axis. */
  from?: number;
  to?: number;
  /** Prefix of element ids (unique per chart when several are inlined in one page). */
  idPrefix?: string;
}
