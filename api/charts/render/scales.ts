/**
 * The plot's scales and ticks: the y scale over the plot's height (rounded to nice values unless
 * the spec fixes the domain), the left margin that fits its tick labels, and the x scale
 * (calendar years, linear, logarithmic or categories) over the rest of the width.
 *
 * @module
 */
import { scaleBand, scaleLinear, scaleLog } from "d3-scale";
import { textWidth } from "../svg.ts";
import { numberLabel, type Tick, yearTicks } from "../ticks.ts";
import type { AxisKind, ChartSpec } from "../spec.ts";
import type { DataDomains } from "./domain.ts";
import type { Frame } from "./layout.ts";
import { FONT } from "./metrics.ts";

/** Everything the axes and layers are drawn with. */
export interface Plot extends DataDomains {
  width: number;
  height: number;
  /** Plot area edges, px. */
  left: number;
  right: number;
  top: number;
  bottom: number;
  /** Data to px. */
  X(v: number): number;
  Y(v: number): number;
  /** The y domain after rounding to nice values. */
  yDomain: number[];
  xTicks: Tick[];
  yTicks: Tick[];
  /** The category scale of a category x axis, else null. */
  band: ReturnType<typeof scaleBand<string>> | null;
}

/** Scales and ticks of a chart laid out in `frame`. */
export function buildPlot(
  spec: ChartSpec,
  d: DataDomains,
  frame: Frame,
  width: number,
  height: number,
): Plot {
  const top = frame.plotTop, bottom = frame.plotBottom;
  const yCount = Math.max(2, Math.round((bottom - top) / 45));
  const ys = d.yKind === "log"
    ? scaleLog().domain(d.hasY ? [d.y0, d.y1] : [1, 10]).range([bottom, top])
    : scaleLinear().domain(d.hasY ? [d.y0, d.y1] : [0, 1]).range([bottom, top]);
  if (!spec.y.domain) ys.nice(yCount);
  const yTicks = axisTicks(ys, d.yKind, yCount);
  const yLabelW = Math.max(20, ...yTicks.map((t) => textWidth(t.label, FONT)));
  const left = 12 + FONT + 8 + yLabelW + 8;
  const right = width - 16;
  const x = xScale(d, left, right);
  return {
    ...d,
    width,
    height,
    left,
    right,
    top,
    bottom,
    X: x.X,
    Y: (v: number) => ys(v),
    yDomain: ys.domain(),
    xTicks: x.ticks,
    yTicks,
    band: x.band,
  };
}

/** The x scale between `left` and `right` px, with its ticks. */
function xScale(d: DataDomains, left: number, right: number) {
  if (d.xKind === "category") {
    const band = scaleBand<string>().domain(d.categories).range([left, right]).paddingInner(0.25)
      .paddingOuter(0.15);
    const ticks = d.categories.map((c) => ({
      value: (band(c) ?? 0) + band.bandwidth() / 2,
      label: c,
    }));
    return { X: (v: number) => v, ticks, band };
  }
  const n = Math.max(2, Math.round((right - left) / 90));
  if (d.xKind === "log") {
    const s = scaleLog().domain(d.hasX && d.x0 > 0 ? [d.x0, d.x1] : [1, 10]).range([left, right]);
    return { X: (v: number) => s(v), ticks: axisTicks(s, "log", n), band: null };
  }
  const s = scaleLinear().domain(d.hasX ? [d.x0, d.x1] : [0, 1]).range([left, right]);
  const ticks = d.xKind === "year" ? yearTicks(d.x0, d.x1, n) : axisTicks(s, "linear", n);
  return { X: (v: number) => s(v), ticks, band: null };
}

/** Labelled ticks of a linear or logarithmic scale. */
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
