/// <reference lib="dom" />
/**
 * Chart layout measured in a real browser (Debian's Chromium driven by playwright-core): every
 * text of a chart lies inside the SVG, legend entries do not overlap each other, and labelled
 * x-axis ticks do not collide, at the default size, at the smallest size and in both themes.
 * The server lays text out with estimated widths; this checks the estimate against real fonts.
 * Skipped with a message where /usr/bin/chromium is absent.
 */
import assert from "node:assert/strict";
import { type Browser, chromium } from "playwright-core";
import { makeTestApp, monthlySeries, type TestService, uploadSeries } from "../api/helpers.ts";
import { loadDataset } from "../core/cycles/load_dataset.ts";

const CHROMIUM = "/usr/bin/chromium";
const HAS_CHROMIUM = (() => {
  try {
    return Deno.statSync(CHROMIUM).isFile;
  } catch {
    return false;
  }
})();
if (!HAS_CHROMIUM) console.warn("charts_layout_test: /usr/bin/chromium is absent; skipped");

interface Box {
  text: string;
  cls: string;
  x: number;
  y: number;
  w: number;
  h: number;
}

async function measure(
  browser: Browser,
  svg: string,
): Promise<{ W: number; H: number; boxes: Box[] }> {
  const page = await browser.newPage();
  try {
    await page.setContent(
      `<!doctype html><html><body style="margin:0">${
        svg.replace(/^<\?xml[^>]*>\s*/, "")
      }</body></html>`,
    );
    return await page.evaluate(() => {
      const root = document.querySelector("svg") as SVGSVGElement;
      const W = Number(root.getAttribute("width")), H = Number(root.getAttribute("height"));
      const boxes = [...root.querySelectorAll("text")].map((t) => {
        const b = (t as SVGTextElement).getBBox();
        const parent = t.parentElement?.getAttribute("class") ?? "";
        // rotated labels: measure in screen space
        const r = t.getBoundingClientRect();
        const rotated = (t.getAttribute("transform") ?? "").includes("rotate");
        return {
          text: t.textContent ?? "",
          cls: t.getAttribute("class") ?? parent,
          x: rotated ? r.x : b.x,
          y: rotated ? r.y : b.y,
          w: rotated ? r.width : b.width,
          h: rotated ? r.height : b.height,
        };
      });
      return { W, H, boxes };
    });
  } finally {
    await page.close();
  }
}

function overlap(a: Box, b: Box): boolean {
  return a.x < b.x + b.w - 0.5 && b.x < a.x + a.w - 0.5 && a.y < b.y + b.h - 0.5 &&
    b.y < a.y + a.h - 0.5;
}

function checkLayout(name: string, m: { W: number; H: number; boxes: Box[] }) {
  for (const b of m.boxes) {
    assert.ok(
      b.x >= -0.5 && b.y >= -0.5 && b.x + b.w <= m.W + 0.5 && b.y + b.h <= m.H + 0.5,
      `${name}: "${b.text}" (${b.x.toFixed(1)}, ${b.y.toFixed(1)}, ${b.w.toFixed(1)} × ${
        b.h.toFixed(1)
      }) leaves the ${m.W} × ${m.H} chart`,
    );
  }
  // Legend entries, tick labels and axis titles never overlap one another.
  const crowd = m.boxes.filter((b) => ["legend", "axes", "x-label", "y-label"].includes(b.cls));
  assert.ok(crowd.length >= 6 && crowd.every((b) => b.w > 0), `${name}: texts measured`);
  for (let i = 0; i < crowd.length; i++) {
    for (let j = i + 1; j < crowd.length; j++) {
      assert.ok(
        !overlap(crowd[i], crowd[j]),
        `${name}: "${crowd[i].text}" (${crowd[i].cls}) overlaps "${crowd[j].text}" (${
          crowd[j].cls
        })`,
      );
    }
  }
}

async function charts(svc: TestService): Promise<[string, string][]> {
  const d = loadDataset("sunspot_month");
  const spots = {
    name: "R datasets sunspot.month",
    quantity: "sunspot_number",
    units: "1",
    version: "1",
    time: d.date,
    value: d.value,
  };
  const sid = await uploadSeries(svc, spots);
  const tsi = await uploadSeries(
    svc,
    monthlySeries(
      "A station TSI record with a rather long descriptive name, monthly means",
      "tsi",
      "W m-2",
      1980,
      480,
      (i) => 1361 + 0.5 * Math.sin(i / 21),
      {
        uncertainty: Array.from({ length: 480 }, () => 0.15),
      },
    ),
  );
  const temp = await uploadSeries(
    svc,
    monthlySeries(
      "Station temperature anomaly",
      "temperature_anomaly",
      "K",
      1950,
      600,
      (i) => 0.1 * Math.sin((2 * Math.PI * (i - 18)) / 132) + 0.05 * Math.sin(i * 7.1),
    ),
  );
  const solar = await uploadSeries(
    svc,
    monthlySeries(
      "Station sunspot number",
      "sunspot_number",
      "1",
      1950,
      600,
      (i) => 80 + 70 * Math.sin((2 * Math.PI * i) / 132),
      { version: "2" },
    ),
  );
  const post = async (path: string, body: unknown) => {
    const res = await svc.post(path, body);
    const j = await res.json();
    assert.equal(res.status, 201, JSON.stringify(j).slice(0, 300));
    return j.id as string;
  };
  const lag = await post("/v1/lag-correlations", {
    solar,
    climate: temp,
    max_lag: 36,
    surrogates: 200,
  });
  const cyc = await post("/v1/cycles", { series: sid, anchor: { cycle: 1, date: "1755-02" } });
  const spec = await post("/v1/spectra", { series: sid, replicates: 20 });
  const years = Array.from({ length: 150 }, (_, i) => 1850 + i);
  const epochs = [1860, 1871, 1883, 1894, 1905, 1917, 1928, 1939, 1950, 1961, 1972, 1983];
  const comp = await post("/v1/composites", {
    series: {
      name: "Invented annual station",
      quantity: "temperature_anomaly",
      units: "K",
      time: years.map(String),
      value: years.map((y, i) =>
        0.1 * Math.sin(i * 2.3) + (epochs.some((e) => y - e >= 1 && y - e <= 2) ? 0.3 : 0)
      ),
    },
    epoch_dates: epochs.map(String),
    before_years: 3,
    after_years: 4,
    bootstrap: 100,
    random_sets: 100,
  });
  const attr = await post("/v1/attributions", {
    climate: temp,
    regressors: [
      { name: "solar", role: "solar", series: solar, min_lag: 0, max_lag: 24 },
      {
        name: "enso",
        role: "enso",
        series: monthlySeries(
          "Invented ENSO index",
          "enso_index",
          "1",
          1950,
          600,
          (i) => Math.sin(i * 0.37) + Math.sin(i * 0.11),
        ),
        min_lag: 0,
        max_lag: 6,
      },
    ],
    surrogates: 100,
  });
  const out: [string, string][] = [];
  for (const q of ["", "?theme=dark", "?width=240&height=160", "?width=1600&height=300"]) {
    for (
      const [name, path] of [
        ["series", `/v1/series/${tsi}/chart.svg`],
        ["lag", `/v1/runs/${lag}/chart.svg`],
        ["cycles", `/v1/runs/${cyc}/chart.svg`],
        ["spectra", `/v1/runs/${spec}/chart.svg`],
        ["composite", `/v1/runs/${comp}/chart.svg`],
        ["attribution", `/v1/runs/${attr}/chart.svg`],
      ]
    ) {
      const res = await svc.get(path + q);
      assert.equal(res.status, 200);
      out.push([`${name}${q}`, await res.text()]);
    }
  }
  return out;
}

Deno.test({
  name: "charts: every text inside the SVG and no overlapping legend entries, measured in Chromium",
  ignore: !HAS_CHROMIUM,
  sanitizeResources: false,
  sanitizeOps: false,
  async fn() {
    const svc = await makeTestApp();
    const browser = await chromium.launch({
      executablePath: CHROMIUM,
      headless: true,
      args: [
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--no-first-run",
        "--disable-background-networking",
      ],
    });
    try {
      for (const [name, svg] of await charts(svc)) checkLayout(name, await measure(browser, svg));
    } finally {
      await browser.close();
      await svc.close();
    }
  },
});
