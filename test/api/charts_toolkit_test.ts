/**
 * The SVG chart toolkit (api/charts/): well-formed accessible SVG, escaping, axes and labels,
 * layers, themes, time-range clipping, decimation.
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import { type ChartSpec, renderChart, type RenderOptions } from "../../api/charts/chart.ts";
import { escapeXml, textWidth, wrapText } from "../../api/charts/svg.ts";
import { numberLabel, yearTicks } from "../../api/charts/ticks.ts";
import { decimateBand, decimateM4 } from "../../api/charts/decimate.ts";
import { axisLabel, quantityLabel, unitsLabel } from "../../api/charts/labels.ts";
import { THEMES } from "../../api/charts/theme.ts";
import { checkSvg, findAll, texts } from "./svg_check.ts";

const OPTS: RenderOptions = { width: 800, height: 400, theme: "light" };

function monthly(n: number, start = 1990) {
  const x = Array.from({ length: n }, (_, i) => start + (i + 0.5) / 12);
  const y = x.map((t) => 1360.8 + 0.5 * Math.sin((2 * Math.PI * (t - 1990)) / 11));
  return { x, y };
}

function spec(extra: Partial<ChartSpec> = {}): ChartSpec {
  const { x, y } = monthly(240);
  return {
    title: "Total solar irradiance",
    description: "A test chart.",
    x: { label: "Year", kind: "year" },
    y: { label: "Total solar irradiance (W m⁻²)" },
    layers: [
      { type: "band", label: "±1σ", x, lower: y.map((v) => v - 0.1), upper: y.map((v) => v + 0.1) },
      { type: "line", label: "TSI", x, y },
    ],
    ...extra,
  };
}

Deno.test("renderChart() emits well-formed accessible SVG with title, desc and both axis labels", () => {
  const svg = renderChart(spec(), OPTS);
  const root = checkSvg(svg);
  assert.equal(root.attrs.width, "800");
  assert.equal(root.attrs.height, "400");
  assert.equal(root.attrs.viewBox, "0 0 800 400");
  assert.equal(findAll(root, "title")[0].text, "Total solar irradiance");
  const desc = findAll(root, "desc")[0].text;
  assert.match(desc, /^A test chart\./);
  assert.match(desc, /Horizontal axis: Year, from 1990-01 to 2009-12/);
  assert.match(desc, /Vertical axis: Total solar irradiance \(W m⁻²\)/);
  const t = texts(root);
  assert.ok(t.includes("Year"));
  assert.ok(t.includes("Total solar irradiance (W m⁻²)"));
  assert.ok(t.includes("1995") && t.includes("2000") && t.includes("2005"), t.join("|"));
  assert.ok(t.includes("TSI") && t.includes("±1σ"), "legend entries");
  // System font stack only.
  assert.match(root.attrs["font-family"], /system-ui/);
  assert.ok(findAll(root, "path").some((p) => p.attrs.class === "band"));
  assert.ok(findAll(root, "path").some((p) => p.attrs.class === "line"));
});

Deno.test("renderChart() escapes hostile text in titles, labels, legends and notes", () => {
  const evil = `</title><script>alert("x")</script> & 'q' \u0001 \uD800`;
  const svg = renderChart(
    spec({
      title: evil,
      description: evil,
      y: { label: evil },
      layers: [{ type: "line", label: evil, x: [1, 2, 3], y: [1, 2, 3] }],
      notes: [evil],
    }),
    OPTS,
  );
  const root = checkSvg(svg);
  assert.equal(
    findAll(root, "title")[0].text,
    evil.replace("\u0001", "\uFFFD").replace("\uD800", "\uFFFD"),
  );
  assert.equal(findAll(root, "script").length, 0);
});

Deno.test("renderChart() themes: light and dark backgrounds and text colours differ", () => {
  const light = checkSvg(renderChart(spec(), { ...OPTS, theme: "light" }));
  const dark = checkSvg(renderChart(spec(), { ...OPTS, theme: "dark" }));
  const bg = (r: typeof light) => findAll(r, "rect")[0].attrs.fill;
  assert.equal(bg(light), "#ffffff");
  assert.equal(bg(dark), "#0f1419");
  assert.equal(dark.attrs["data-theme"], "dark");
});

Deno.test("renderChart() clips to the time range: markers outside are not drawn", () => {
  const s = spec({
    layers: [
      { type: "line", x: [1990, 2000, 2010], y: [1, 2, 3] },
      { type: "points", label: "events", x: [1991, 1999, 2009], y: [1, 2, 3] },
      { type: "vline", x: 1991, text: "early" },
      { type: "vline", x: 1999, text: "inside" },
    ],
  });
  const root = checkSvg(renderChart(s, { ...OPTS, from: 1995, to: 2005 }));
  const pts = findAll(root, "g").find((g) => g.attrs.class === "points");
  assert.equal(pts?.children.filter((c) => c.name === "path").length, 1);
  const t = texts(root);
  assert.ok(t.includes("inside") && !t.includes("early"));
  assert.ok(t.includes("1996") && t.includes("2004"), t.join("|"));
  assert.ok(!t.includes("1990") && !t.includes("2010"));
  assert.match(findAll(root, "desc")[0].text, /from 1995-01 to 2005-01/);
  // The line is clipped to the plot area.
  const layers = findAll(root, "g").find((g) => g.attrs.class === "layers");
  const clip = findAll(root, "clipPath")[0];
  assert.equal(layers?.attrs["clip-path"], `url(#${clip.attrs.id})`);
});

Deno.test("renderChart() says so when no data falls in the range", () => {
  const root = checkSvg(renderChart(spec(), { ...OPTS, from: 1800, to: 1850 }));
  assert.ok(texts(root).includes("No data in the selected range"));
  assert.match(findAll(root, "desc")[0].text, /No data falls in the selected range/);
});

Deno.test("renderChart() draws an empty spec without crashing", () => {
  const root = checkSvg(
    renderChart({
      title: "Empty",
      description: "Nothing.",
      x: { label: "Year" },
      y: { label: "Value" },
      layers: [],
    }, OPTS),
  );
  assert.ok(texts(root).includes("No data in the selected range"));
});

Deno.test("renderChart() skips nulls and non-finite values as gaps", () => {
  const root = checkSvg(
    renderChart(
      spec({ layers: [{ type: "line", x: [1, 2, 3, 4, 5], y: [1, null, 3, NaN, 5] }] }),
      OPTS,
    ),
  );
  const d = findAll(root, "path").find((p) => p.attrs.class === "line")?.attrs.d ?? "";
  assert.equal((d.match(/M/g) ?? []).length, 3, d); // three separate pieces
  assert.ok(!/NaN|Infinity/.test(d));
});

Deno.test("renderChart() log axis drops non-positive values and labels decades", () => {
  const x = Array.from({ length: 50 }, (_, i) => i + 1);
  const y = x.map((v) => (v === 10 ? 0 : Math.pow(10, -3 + v / 10)));
  const root = checkSvg(renderChart({
    title: "Power",
    description: "Log test.",
    x: { label: "Period (yr)", kind: "log" },
    y: { label: "Power", kind: "log" },
    layers: [{ type: "line", x, y }],
  }, OPTS));
  const t = texts(root);
  assert.ok(t.includes("1") && t.includes("10"), t.join("|"));
  assert.ok(!findAll(root, "path").some((p) => /NaN|Infinity/.test(p.attrs.d ?? "")));
});

Deno.test("renderChart() category bars with error bars, hlines and stems", () => {
  const root = checkSvg(renderChart({
    title: "Contributions",
    description: "Bars.",
    x: { label: "Regressor", kind: "category", categories: ["TSI", "ENSO", "Volcanic"] },
    y: { label: "Contribution (K)" },
    layers: [{
      type: "bars",
      label: "contribution",
      x: ["TSI", "ENSO", "Volcanic"],
      y: [0.1, 0.2, -0.3],
      lower: [0.05, 0.1, -0.4],
      upper: [0.15, 0.3, -0.2],
    }, { type: "hline", y: 0, color: "foreground", dash: "solid" }],
  }, OPTS));
  const bars = findAll(root, "g").find((g) => g.attrs.class === "bars");
  assert.equal(bars?.children.filter((c) => c.name === "rect").length, 3);
  assert.equal(bars?.children.filter((c) => c.name === "path").length, 3);
  const t = texts(root);
  assert.ok(t.includes("TSI") && t.includes("ENSO") && t.includes("Volcanic"));
  const stems = checkSvg(renderChart({
    title: "Stems",
    description: "Stems.",
    x: { label: "Lag (yr)", kind: "linear" },
    y: { label: "r" },
    layers: [{ type: "stems", label: "r", x: [-1, 0, 1], y: [0.1, 0.5, 0.2] }],
  }, OPTS));
  const p = findAll(stems, "path").find((q) => q.attrs.class === "stems");
  assert.equal((p?.attrs.d.match(/M/g) ?? []).length, 3);
});

Deno.test("renderChart() output size stays bounded for a 100 000-point daily series", () => {
  const n = 100_000;
  const x = Array.from({ length: n }, (_, i) => 1750 + i / 365.25);
  const y = x.map((t, i) => Math.sin(t) + (i === 54_321 ? 50 : 0));
  const svg = renderChart({
    title: "Long",
    description: "Long.",
    x: { label: "Year" },
    y: { label: "v" },
    layers: [{ type: "line", x, y }],
  }, OPTS);
  checkSvg(svg);
  assert.ok(svg.length < 200_000, `${svg.length} bytes`);
  assert.match(svg, /min\/max per pixel column/);
  // the spike sets the top of the y domain: a tick near 50 is labelled
  assert.ok(/>50</.test(svg));
});

Deno.test("yearTicks() picks whole years, months or days with ISO labels", () => {
  assert.deepEqual(yearTicks(1749, 2025, 6).map((t) => t.label), [
    "1750",
    "1800",
    "1850",
    "1900",
    "1950",
    "2000",
  ]);
  const months = yearTicks(2001, 2002, 6).map((t) => t.label);
  assert.deepEqual(
    months,
    ["2001-01", "2001-03", "2001-05", "2001-07", "2001-09", "2001-11", "2002-01"].slice(
      0,
      months.length,
    ),
  );
  const days = yearTicks(2024 + 59 / 366, 2024 + 66 / 366, 8).map((t) => t.label);
  assert.equal(days[0], "2024-02-29"); // leap day of 2024: day of year 60
  assert.deepEqual(yearTicks(NaN, NaN, 5), []);
});

Deno.test("numberLabel() plain decimals without grouping, exponents at the extremes", () => {
  assert.equal(numberLabel(1360.25, 0.05), "1360.25");
  assert.equal(numberLabel(1360, 0.5), "1360");
  assert.equal(numberLabel(2e6, 1e6), "2e6");
  assert.equal(numberLabel(-0.5, 0.1), "-0.5");
});

Deno.test("unitsLabel() and axisLabel() read UDUNITS strings", () => {
  assert.equal(unitsLabel("W m-2"), "W m⁻²");
  assert.equal(unitsLabel("K"), "K");
  assert.equal(unitsLabel("1e-6", "sunspot_area"), "millionths of hemisphere");
  assert.equal(axisLabel(quantityLabel("tsi"), "W m-2"), "Total solar irradiance (W m⁻²)");
  assert.equal(axisLabel(quantityLabel("sunspot_number"), "1"), "Sunspot number");
  assert.equal(quantityLabel("some_new_thing"), "Some new thing");
});

Deno.test("escapeXml() and wrapText()", () => {
  assert.equal(escapeXml("<&>\"'"), "&lt;&amp;&gt;&quot;&apos;");
  assert.deepEqual(wrapText("xxx yyy zzz", 10, 40), ["xxx yyy", "zzz"]);
  // a word wider than the line is kept whole, or cut to fit when asked
  assert.deepEqual(wrapText("xxxxxxxxxx", 10, 40), ["xxxxxxxxxx"]);
  assert.deepEqual(wrapText("xxxxxxxxxx", 10, 40, false, true), ["xxxxxx", "xxxx"]);
  // run labels (8 hex digits) have one width whatever their digits, so layouts do not vary
  assert.equal(textWidth("run 0123abcd", 12), textWidth("run ffffffff", 12));
  assert.equal(textWidth("run 0123abcd", 12), textWidth("run 99999999", 12));
});

Deno.test("decimateM4() keeps the first, last, minimum and maximum of every pixel column", () => {
  fc.assert(
    fc.property(
      fc.array(fc.double({ min: -1e3, max: 1e3, noNaN: true }), { minLength: 50, maxLength: 2000 }),
      fc.integer({ min: 1, max: 40 }),
      (ys, columns) => {
        const x = ys.map((_, i) => i);
        const x0 = 0, x1 = ys.length - 1;
        const d = decimateM4(x, ys, x0, x1, columns);
        assert.ok(d.x.length <= Math.max(ys.length, 4 * (columns + 1)));
        // x stays increasing
        for (let i = 1; i < d.x.length; i++) assert.ok(d.x[i] > d.x[i - 1]);
        if (ys.length <= 4 * columns) return;
        const w = (x1 - x0) / columns;
        const col = (v: number) => Math.floor((v - x0) / w);
        const byCol = new Map<number, number[]>();
        ys.forEach((v, i) => byCol.set(col(i), [...(byCol.get(col(i)) ?? []), v]));
        const kept = new Map<number, number[]>();
        d.x.forEach((v, i) => kept.set(col(v), [...(kept.get(col(v)) ?? []), d.y[i] as number]));
        for (const [c, vs] of byCol) {
          const k = kept.get(c) ?? [];
          assert.equal(Math.min(...k), Math.min(...vs));
          assert.equal(Math.max(...k), Math.max(...vs));
          assert.equal(k[0], vs[0]);
          assert.equal(k[k.length - 1], vs[vs.length - 1]);
        }
      },
    ),
    { numRuns: 60 },
  );
});

Deno.test("decimateM4() keeps gaps and the neighbours outside the range", () => {
  const x = Array.from({ length: 1000 }, (_, i) => i);
  const y: (number | null)[] = x.map((v) => (v >= 400 && v < 420 ? null : v % 7));
  const d = decimateM4(x, y, 100, 900, 20);
  assert.equal(d.x[0], 99);
  assert.equal(d.x[d.x.length - 1], 901);
  assert.equal(d.y.filter((v) => v === null).length, 1);
  assert.deepEqual(decimateM4([1, 2], [1, 2], 5, 6, 10), { x: [2], y: [2] });
});

Deno.test("decimateBand() never narrows the envelope", () => {
  const x = Array.from({ length: 5000 }, (_, i) => i);
  const lower = x.map((v) => -1 - (v === 2500 ? 9 : 0));
  const upper = x.map((v) => 1 + (v === 1234 ? 9 : 0));
  const d = decimateBand(x, lower, upper, 0, 4999, 50);
  assert.ok(d.x.length <= 110);
  assert.equal(Math.min(...(d.lower as number[])), -10);
  assert.equal(Math.max(...(d.upper as number[])), 10);
});

Deno.test("renderChart() keeps a usable plot at the smallest size with many legend entries and notes", () => {
  const x = [2000, 2001, 2002];
  const layers = Array.from({ length: 12 }, (_, i) => ({
    type: "line" as const,
    label: `a rather long legend entry number ${i}`,
    x,
    y: [i, i + 1, i + 2],
  }));
  const notes = Array.from({ length: 8 }, (_, i) => `note ${i}: ` + "words ".repeat(30));
  for (const [w, h] of [[240, 160], [320, 200], [4000, 3000]]) {
    const root = checkSvg(renderChart(spec({ layers, notes }), { ...OPTS, width: w, height: h }));
    for (const r of findAll(root, "rect")) {
      assert.ok(
        Number(r.attrs.width ?? 0) >= 0 && Number(r.attrs.height ?? 0) >= 0,
        JSON.stringify(r.attrs),
      );
    }
    const clip = findAll(findAll(root, "clipPath")[0], "rect")[0];
    assert.ok(
      Number(clip.attrs.height) >= Math.max(40, h * 0.35) - 1,
      `${w}x${h}: plot ${clip.attrs.height}`,
    );
    // every layer is still named in the description
    assert.match(findAll(root, "desc")[0].text, /number 11/);
  }
});

/** WCAG 2.2 contrast ratio (relative luminance as defined in WCAG 2.2, "relative luminance"). */
function contrast(a: string, b: string): number {
  const lum = (hex: string) => {
    const [r, g, bl] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255)
      .map((c) => (c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4));
    return 0.2126 * r + 0.7152 * g + 0.0722 * bl;
  };
  const [x, y] = [lum(a), lum(b)].sort((p, q) => q - p);
  return (x + 0.05) / (y + 0.05);
}

Deno.test("THEMES: every data colour, text and axis colour has at least 3:1 contrast with its background (WCAG 2.2 §1.4.11)", () => {
  // check value of the formula: black on white is 21:1 (WCAG 2.2 definition)
  assert.ok(Math.abs(contrast("#000000", "#ffffff") - 21) < 1e-9);
  for (const t of Object.values(THEMES)) {
    for (const c of [...t.palette, t.foreground, t.muted]) {
      assert.ok(
        contrast(c, t.background) >= 3,
        `${t.name}: ${c} on ${t.background} is ${contrast(c, t.background).toFixed(2)}:1`,
      );
    }
    // text (titles, labels, notes) at least 4.5:1 (WCAG 2.2 §1.4.3)
    assert.ok(contrast(t.foreground, t.background) >= 4.5);
    assert.ok(contrast(t.muted, t.background) >= 4.5);
  }
});

Deno.test("renderChart() with a one-sided range beyond the data draws an empty year, not a reversed axis", () => {
  for (const o of [{ from: 2100 }, { to: 1800 }]) {
    const root = checkSvg(renderChart(spec(), { ...OPTS, ...o }));
    assert.ok(texts(root).includes("No data in the selected range"));
    const desc = findAll(root, "desc")[0].text;
    assert.match(desc, o.from ? /from 2100-01 to 2101-01/ : /from 1799-01 to 1800-01/, desc);
  }
});
