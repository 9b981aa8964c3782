/**
 * Chart specs that exercise every branch of the renderer: each axis kind (calendar years,
 * linear, logarithmic, categories), every layer type, gaps, fixed and degenerate domains, time
 * ranges inside, beyond and not applicable, crowded legends and notes, hostile text, both themes
 * and the extreme sizes. Used by the byte-level snapshot of the renderer.
 *
 * @module
 */
import type { ChartSpec, RenderOptions } from "../../api/charts/chart.ts";

const months = (n: number, start: number) =>
  Array.from({ length: n }, (_, i) => start + (i + 0.5) / 12);

/** [name, spec, options] of each case. */
export function rendererCases(): [string, ChartSpec, RenderOptions][] {
  const light: RenderOptions = { width: 800, height: 400, theme: "light" };
  const x = months(240, 1990);
  const y = x.map((
    t,
    i,
  ) => (i % 37 === 5 ? null : 1360.8 + 0.5 * Math.sin((2 * Math.PI * t) / 11)));
  const base: ChartSpec = {
    title: "Total solar irradiance",
    description: "A test chart.",
    x: { label: "Year", kind: "year" },
    y: { label: "Total solar irradiance (W m⁻²)" },
    layers: [
      {
        type: "band",
        label: "±1σ",
        x,
        lower: y.map((v) => v && v - 0.1),
        upper: y.map((v) => v && v + 0.1),
      },
      { type: "line", label: "TSI", x, y, dash: "dashed", width: 2 },
      {
        type: "points",
        label: "maxima",
        x: [1991.5, 2002.1, 2013.3],
        y: [1361.3, 1361.2, NaN],
        marker: "triangle-up",
        size: 55,
      },
      {
        type: "points",
        label: "minima",
        x: [1996.5, 2008.9],
        y: [1360.3, 1360.3],
        marker: "triangle-down",
      },
      { type: "points", label: "sq", x: [1995], y: [1361], marker: "square" },
      { type: "points", label: "dia", x: [1999], y: [1361], marker: "diamond", color: 4 },
      { type: "points", x: [2001], y: [1361.1] },
      { type: "vline", x: 1996.5, text: "cycle 23", dash: "dotted" },
      { type: "vline", x: 1996.6, text: "overlapping text" },
      { type: "vline", x: 2009.9, text: "at the right edge of the plot", label: "edge" },
      { type: "vline", x: 1800, text: "outside" },
      {
        type: "hline",
        y: 1361,
        text: "reference",
        label: "level",
        dash: "solid",
        color: "foreground",
      },
      { type: "hline", y: 1360.5 },
    ],
    notes: [
      "A caution that is long enough to wrap onto a second line at the default width of the chart, and then some more words.",
    ],
  };
  const stems: ChartSpec = {
    title: "Stems and bars",
    description: "Stems.",
    x: { label: "Lag (months)", kind: "linear" },
    y: { label: "r" },
    layers: [
      {
        type: "stems",
        label: "r",
        x: [-2, -1, 0, 1, 2],
        y: [0.1, -0.2, 0.5, null, 0.3],
        baseline: 0.05,
      },
      {
        type: "bars",
        label: "bars",
        x: [-2, 0, 2],
        y: [0.2, 0.4, -0.1],
        lower: [0.1, 0.3, -0.2],
        upper: [0.3, 0.5, 0],
      },
      { type: "hline", y: 0, color: "foreground", dash: "solid" },
    ],
  };
  const category: ChartSpec = {
    title: "Categories",
    description: "Bars.",
    x: { label: "Regressor", kind: "category", categories: ["solar", "enso", "volcanic"] },
    y: { label: "Coefficient", includeZero: true },
    layers: [
      {
        type: "bars",
        label: "β",
        x: ["solar", "enso", "volcanic", "unknown"],
        y: [0.1, 0.3, -0.2, 1],
        lower: [0.05, 0.2, -0.3, 0],
        upper: [0.15, 0.4, -0.1, 2],
      },
      { type: "band", label: "ignored band", x: [0, 1], lower: [0, 0], upper: [1, 1] },
      { type: "vline", x: 1, text: "not on categories" },
      { type: "hline", y: 0.25, text: "threshold" },
    ],
  };
  const period = Array.from({ length: 400 }, (_, i) => 1.5 * Math.pow(100, i / 399));
  const logx: ChartSpec = {
    title: "Periodogram",
    description: "Log period axis.",
    x: { label: "Period (years, logarithmic)", kind: "log" },
    y: { label: "Power", includeZero: true },
    layers: [
      {
        type: "band",
        x: [0, ...period],
        lower: [0, ...period.map(() => 0)],
        upper: [1, ...period.map((p) => 0.2 + 1 / p)],
        opacity: 0.2,
      },
      {
        type: "line",
        label: "power",
        x: [-1, ...period],
        y: [1, ...period.map((p) => Math.exp(-((p - 11) ** 2) / 4))],
        color: 0,
        width: 1.3,
      },
      { type: "hline", y: 0.6, label: "FAP 1 %", color: 1, dash: "dashed" },
      { type: "vline", x: 11, text: "11.0 yr", dash: "dotted" },
    ],
  };
  const logy: ChartSpec = {
    title: "Log y",
    description: "Log y.",
    x: { label: "x", kind: "linear" },
    y: { label: "y", kind: "log" },
    layers: [
      { type: "bars", label: "b", x: [1, 2, 3, 4], y: [10, 100, 0, 1000] },
      { type: "line", label: "l", x: [1, 2, 3, 4], y: [5, -1, 50, 500] },
      { type: "hline", y: -3 },
    ],
  };
  const fixed: ChartSpec = {
    ...base,
    title: "Fixed domains",
    x: { label: "Year", kind: "year", domain: [1995, 2005] },
    y: { label: "TSI", domain: [1360, 1362] },
  };
  const single: ChartSpec = {
    title: "One point",
    description: "Degenerate domains.",
    x: { label: "x", kind: "linear" },
    y: { label: "y" },
    layers: [{ type: "points", label: "p", x: [3], y: [7] }],
  };
  const singleYear: ChartSpec = {
    ...single,
    x: { label: "Year" },
    layers: [{ type: "line", x: [2000.5], y: [0] }],
  };
  const empty: ChartSpec = {
    title: "",
    description: "",
    x: { label: "" },
    y: { label: "" },
    layers: [],
  };
  const onlyRules: ChartSpec = {
    title: "Rules only",
    description: "No data.",
    x: { label: "Year" },
    y: { label: "v" },
    layers: [{ type: "vline", x: 2000 }, { type: "hline", y: 1, text: "one" }],
  };
  const n = 100_000;
  const dx = Array.from({ length: n }, (_, i) => 1750 + i / 365.25);
  const long: ChartSpec = {
    title: "Long",
    description: "Long.",
    x: { label: "Year" },
    y: { label: "v" },
    layers: [
      {
        type: "band",
        x: dx,
        lower: dx.map((t) => Math.sin(t) - 1),
        upper: dx.map((t) => Math.sin(t) + 1),
      },
      { type: "line", x: dx, y: dx.map((t, i) => Math.sin(t) + (i === 54_321 ? 50 : 0)) },
    ],
  };
  const crowded: ChartSpec = {
    ...base,
    title: "A very long title " + "that goes on and on ".repeat(12),
    layers: Array.from({ length: 14 }, (_, i) => ({
      type: "line" as const,
      label: `a rather long legend entry number ${i}` +
        (i === 3 ? " ".repeat(1) + "x".repeat(120) : ""),
      x: [2000, 2001, 2002],
      y: [i, i + 1, i + 2],
    })),
    notes: Array.from({ length: 8 }, (_, i) => `note ${i}: ` + "words ".repeat(30)),
  };
  const hostile: ChartSpec = {
    title: `<script>alert("x")</script> & "quotes" 'apostrophes'`,
    description: "</desc><g onload='x'>",
    x: { label: "x < y & z", kind: "linear" },
    y: { label: `"y" > 'z'` },
    layers: [{ type: "line", label: "<line> & co", x: [1, 2], y: [1, 2] }, {
      type: "vline",
      x: 1.5,
      text: "<v>",
    }],
    notes: ['<note> & "more"'],
  };
  return [
    ["base", base, light],
    ["base dark", base, { ...light, theme: "dark" }],
    ["base small", base, { width: 240, height: 160, theme: "light" }],
    ["base huge", base, { width: 4000, height: 3000, theme: "dark" }],
    ["base range", base, { ...light, from: 1995, to: 2000.25 }],
    ["base from beyond", base, { ...light, from: 2050 }],
    ["base to before", base, { ...light, to: 1900 }],
    ["base range months", base, { ...light, from: 2001.1, to: 2001.6 }],
    ["base id", base, { ...light, idPrefix: "fixed" }],
    ["stems", stems, light],
    ["stems range dropped", stems, { ...light, from: 1990, to: 2000 }],
    ["category", category, light],
    ["category dark small", category, { width: 300, height: 200, theme: "dark" }],
    ["log x", logx, light],
    ["log x narrow", {
      ...logx,
      layers: logx.layers.map((l) =>
        l.type === "line" ? { ...l, x: period.slice(100, 140), y: period.slice(100, 140) } : l
      ),
    }, light],
    ["log y", logy, light],
    ["fixed", fixed, light],
    ["single", single, light],
    ["single year", singleYear, light],
    ["empty", empty, light],
    ["only rules", onlyRules, light],
    ["long", long, light],
    ["long range", long, { ...light, from: 1900, to: 1910 }],
    ["crowded", crowded, light],
    ["crowded small", crowded, { width: 240, height: 160, theme: "dark" }],
    ["crowded tall", crowded, { width: 320, height: 900, theme: "light" }],
    ["hostile", hostile, light],
  ];
}
