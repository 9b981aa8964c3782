/**
 * Run charts fit for each kind, from real runs made through the API: a reconstruction with its
 * prediction band and back-extension, an attribution's contributions, a cycle table over the
 * smoothed series, a periodogram with false-alarm levels. Each SVG is checked as XML with
 * its title, description and axes.
 */
import assert from "node:assert/strict";
import {
  inventedAttributionRequest,
  makeTestApp,
  monthlySeries,
  type TestService,
} from "./helpers.ts";
import { checkSvg, findAll, type SvgNode, texts } from "./svg_check.ts";
import { randomStream } from "../../core/random/mod.ts";
import { loadDataset } from "../core/cycles/load_dataset.ts";
import { putFinishedRun } from "./run_fixture.ts";

async function created(res: Response) {
  const body = await res.json();
  assert.equal(res.status, 201, JSON.stringify(body).slice(0, 800));
  return body;
}

async function chartOf(svc: TestService, id: string, query = ""): Promise<SvgNode> {
  const res = await svc.get(`/v1/runs/${id}/chart.svg${query}`);
  assert.equal(res.status, 200);
  return checkSvg(await res.text());
}

/** Invented monthly sunspot-like cycles of 11 years (a sine squared), by month index. */
function cycleSeries() {
  return (i: number) => 5 + 150 * Math.sin((Math.PI * i) / 132) ** 2;
}

Deno.test("irradiance reconstruction chart: prediction band, observed-proxy and back-extended pieces", async () => {
  const svc = await makeTestApp();
  try {
    const st = randomStream(5, 0);
    const spots = cycleSeries();
    // facular index follows sunspot number; TSI follows the facular index (1980–1999 only)
    const fac = (i: number) => 0.15 + 0.0002 * spots(i) + 0.002 * st.normal();
    const facVals = Array.from({ length: 1200 }, (_, i) => fac(i));
    const ss = monthlySeries("Invented sunspot number", "sunspot_number", "1", 1900, 1200, spots, {
      version: "2",
    });
    const mg = monthlySeries(
      "Invented facular index",
      "facular_index",
      "1",
      1980,
      240,
      (i) => facVals[960 + i],
    );
    const tsi = monthlySeries(
      "Invented TSI",
      "tsi",
      "W m-2",
      1980,
      240,
      (i) => 1360.5 + 30 * (facVals[960 + i] - 0.15) + 0.05 * st.normal(),
    );
    const model = await created(
      await svc.post("/v1/irradiance/models", {
        tsi,
        terms: [{ name: "mg", role: "facular", series: mg }],
        sunspot_number: ss,
      }),
    );
    // the model's chart: the fitted TSI over the measured TSI it was calibrated on
    const mt = texts(await chartOf(svc, model.id));
    assert.ok(mt.includes("observed: Invented TSI"), mt.join("|"));
    const rec = await created(
      await svc.post("/v1/irradiance/reconstructions", {
        model: model.id,
        proxies: [{ term: "mg", series: model.params.terms[0].series }],
        sunspot_number: model.params.sunspot_number,
        period: { start: "1900", end: "1999" },
        resolution: "annual",
      }),
    );
    const root = await chartOf(svc, rec.id);
    assert.match(
      findAll(root, "title")[0].text,
      /^Reconstructed total solar irradiance \(annual means\)/,
    );
    const t = texts(root);
    assert.ok(t.includes("Total solar irradiance (W m⁻²)"));
    assert.ok(t.includes("Year"));
    assert.ok(t.includes("95 % prediction interval"), t.join("|"));
    assert.ok(t.includes("TSI from observed proxies"));
    assert.ok(t.includes("TSI with proxies mapped from sunspot number"));
    assert.ok(t.includes("proxies observed from here"));
    assert.ok(t.some((s) => /satellite era/.test(s)), "the pre-satellite caution is printed");
    const lines = findAll(root, "path").filter((p) => p.attrs.class === "line");
    assert.equal(lines.length, 2);
    assert.ok(lines.some((p) => p.attrs["stroke-dasharray"] === "6 4"), "back-extension dashed");
    assert.ok(findAll(root, "path").some((p) => p.attrs.class === "band"));
    // Time clipping to the observed era leaves no back-extension boundary marker
    const clipped = await chartOf(svc, rec.id, "?from=1985&to=1999");
    assert.ok(!texts(clipped).includes("proxies observed from here"));
  } finally {
    await svc.close();
  }
});

Deno.test("attribution chart: one contribution line per regressor with its lag, solar max minus min in the notes", async () => {
  const svc = await makeTestApp();
  try {
    const run = await created(
      await svc.post("/v1/attributions", inventedAttributionRequest({ n: 360, startYear: 1950 })),
    );
    const root = await chartOf(svc, run.id, "?theme=dark");
    assert.match(findAll(root, "title")[0].text, /^Contributions to Invented station/);
    const t = texts(root);
    const lag = run.result.lags.solar;
    assert.ok(t.some((s) => s.startsWith(`solar, lag ${lag} months`)), t.join("|"));
    assert.ok(t.some((s) => s.startsWith("enso")));
    assert.ok(t.includes("Contribution: Temperature anomaly (K)"));
    assert.ok(t.some((s) => s.startsWith("Solar regressor solar: sensitivity")));
    assert.ok(t.some((s) => s.startsWith("Correlation is not attribution")));
    const lines = findAll(root, "path").filter((p) => p.attrs.class === "line");
    assert.equal(
      lines.length,
      Object.keys(run.result.outputs).filter((k) => k.startsWith("contribution_")).length,
    );
  } finally {
    await svc.close();
  }
});

/** Pixel position of a value on an axis, interpolated from two labelled ticks. */
function axisPixel(
  root: SvgNode,
  labels: [string, string],
  value: [number, number],
  v: number,
  attr: "x" | "y",
) {
  const tickText = findAll(root, "g").find((g) => g.attrs.class === "axes")!.children.filter((c) =>
    c.name === "text"
  );
  const at = (l: string) => {
    const t = tickText.find((c) => c.text === l);
    assert.ok(t, `tick ${l}`);
    return Number(t.attrs[attr]) - (attr === "y" ? 4 : 0); // y labels sit 4 px below their tick
  };
  const [p0, p1] = [at(labels[0]), at(labels[1])];
  return p0 + ((v - value[0]) / (value[1] - value[0])) * (p1 - p0);
}

function translate(p: SvgNode): [number, number] {
  const m = /translate\(([-\d.]+) ([-\d.]+)\)/.exec(p.attrs.transform ?? "");
  assert.ok(m, p.attrs.transform);
  return [Number(m[1]), Number(m[2])];
}

Deno.test("cycles chart of R's sunspot.month: minima and maxima markers at the table's dates, cycle numbers", async () => {
  const svc = await makeTestApp();
  try {
    // R datasets::sunspot.month (fixtures/datasets/PROVENANCE.md), version 1 scale
    const d = loadDataset("sunspot_month");
    const run = await created(
      await svc.post("/v1/cycles", {
        series: {
          name: "R datasets sunspot.month",
          quantity: "sunspot_number",
          units: "1",
          version: "1",
          time: d.date,
          value: d.value,
        },
        anchor: { cycle: 1, date: "1755-02" },
      }),
    );
    const cycles = run.result.cycles;
    const root = await chartOf(svc, run.id, "?width=2400&height=500");
    assert.match(findAll(root, "title")[0].text, /^Solar cycles of R datasets sunspot.month/);
    const t = texts(root);
    for (const c of cycles) {
      assert.ok(t.includes(`cycle ${c.number}`), `cycle ${c.number} labelled`);
    }
    assert.ok(t.includes("cycle minima") && t.includes("cycle maxima"));
    assert.ok(
      t.includes("provisional maximum") ===
        cycles.some((c: { maximum: { provisional: boolean } | null }) => c.maximum?.provisional),
    );
    assert.ok(t.some((s) => /^\d+ complete cycles, mean length/.test(s)));
    const groups = findAll(root, "g").filter((g) => g.attrs.class === "points");
    const minima = groups[0].children.filter((c) => c.name === "path");
    // one minimum per cycle start, plus the end of the last cycle when it has ended
    assert.equal(minima.length, cycles.length + (cycles[cycles.length - 1].end ? 1 : 0));
    // The marker of cycle 19's minimum (1954-04 in the published list, SCIENCE.md §5, C) sits at
    // its decimal year on the axis, to a pixel.
    const c19 = cycles.find((c: { number: number }) => c.number === 19);
    assert.equal(c19.start.date, "1954-04");
    const px = axisPixel(root, ["1900", "2000"], [1900, 2000], c19.start.decimal_year, "x");
    assert.ok(
      minima.some((m) => Math.abs(translate(m)[0] - px) < 1),
      `a minimum marker at x ≈ ${px}`,
    );
  } finally {
    await svc.close();
  }
});

Deno.test("spectra chart of R's sunspot.year: log period axis, false-alarm levels at their power, the 11-year peak", async () => {
  const svc = await makeTestApp();
  try {
    const d = loadDataset("sunspot_year");
    const run = await created(
      await svc.post("/v1/spectra", {
        series: {
          name: "R datasets sunspot.year",
          quantity: "sunspot_number",
          units: "1",
          version: "1",
          time: d.date,
          value: d.value,
        },
        periods: { min: 2, max: 150, count: 1500 },
        replicates: 50,
        seed: 4,
      }),
    );
    const r = run.result;
    const root = await chartOf(svc, run.id);
    assert.match(
      findAll(root, "title")[0].text,
      /^Lomb–Scargle periodogram of R datasets sunspot.year/,
    );
    const t = texts(root);
    assert.ok(t.includes("Period (years, logarithmic)"));
    assert.ok(t.includes("10") && t.includes("100"), t.join("|"));
    const levels = r.false_alarm.levels as {
      fap: number;
      analytic: number | null;
      monte_carlo: number | null;
    }[];
    for (const lv of levels) {
      if (lv.analytic !== null) assert.ok(t.includes(`FAP ${lv.fap * 100} % (Horne & Baliunas)`));
      if (lv.monte_carlo !== null) {
        assert.ok(t.some((s) => s.startsWith(`FAP ${lv.fap * 100} % (Monte Carlo`)), t.join("|"));
      }
    }
    // The dominant period is about 11 years (common practice; SCIENCE.md §5: mean cycle 11.03 yr)
    assert.ok(Math.abs(r.dominant.period - 11) < 0.6, `${r.dominant.period}`);
    assert.ok(t.some((s) => s.startsWith(`Peaks: ${r.dominant.period.toPrecision(4)}`)));
    assert.ok(t.includes(`${r.dominant.period.toPrecision(3)} yr`));
    // Each false-alarm line is drawn at its power level on the y axis.
    const hlines = findAll(root, "line").filter((l) => l.attrs.class === "hline");
    const yTicks = findAll(root, "g").find((g) => g.attrs.class === "axes")!.children
      .filter((c) => c.name === "text" && c.attrs["text-anchor"] === "end").map((c) => c.text);
    const [a, b] = [yTicks[0], yTicks[yTicks.length - 1]];
    const lv = levels.find((l) => l.analytic !== null)!;
    const py = axisPixel(root, [a, b], [Number(a), Number(b)], lv.analytic!, "y");
    assert.ok(hlines.some((h) => Math.abs(Number(h.attrs.y1) - py) < 1), `an hline at y ≈ ${py}`);
  } finally {
    await svc.close();
  }
});

Deno.test("composite chart: years from the epoch, bootstrap band, epoch line, significant offsets marked", async () => {
  const svc = await makeTestApp();
  try {
    const st = randomStream(5, 0);
    const years = Array.from({ length: 150 }, (_, i) => 1850 + i);
    const epochs = [1860, 1871, 1883, 1894, 1905, 1917, 1928, 1939, 1950, 1961, 1972, 1983];
    const v = years.map((y) =>
      0.1 * st.normal() + (epochs.some((e) => y - e >= 1 && y - e <= 2) ? 0.3 : 0)
    );
    const run = await created(
      await svc.post("/v1/composites", {
        series: {
          name: "Invented annual station",
          quantity: "temperature_anomaly",
          units: "K",
          time: years.map(String),
          value: v,
        },
        epoch_dates: epochs.map(String),
        before_years: 3,
        after_years: 4,
        bootstrap: 200,
        random_sets: 200,
        preprocess: "mean",
      }),
    );
    const root = await chartOf(svc, run.id);
    const t = texts(root);
    assert.ok(t.includes("Years from the epoch"));
    assert.ok(t.includes("epoch"));
    assert.ok(t.includes(`composite of ${run.result.epochs_used.length} epochs`));
    assert.ok(t.includes("95 % bootstrap band"));
    // the invented response at +1 and +2 years stands out against random epochs
    const sig = run.result.offsets.filter((o: { p_random_epochs: number }) =>
      o.p_random_epochs < 0.05
    );
    assert.ok(sig.some((o: { offset_years: number }) => o.offset_years === 1));
    const pts = findAll(root, "g").filter((g) => g.attrs.class === "points")[0];
    assert.equal(pts.children.filter((c) => c.name === "path").length, sig.length);
    assert.ok(t.includes("p < 0.05 against random epochs (pointwise)"));
  } finally {
    await svc.close();
  }
});

Deno.test("every registered run kind gets a chart, whatever its stored result looks like", async () => {
  const svc = await makeTestApp();
  try {
    const t = [2000.5, 2001.5, 2002.5];
    const odd = [
      {},
      {
        outputs: {
          a: { name: "a", quantity: "tsi", units: "W m-2", time: t, value: [1, null, 3] },
        },
      },
      {
        outputs: { a: { name: "a", time: t, value: [1, 2] } },
        cycles: "x",
        lags: [1],
        periodogram: { period: [1], power: [] },
      },
      { outputs: "nope", source_segments: [{ start: "x" }], offsets: null, coefficients: [null] },
    ];
    for (const kind of svc.runs.kinds.map((k) => k.kind)) {
      for (const result of odd) {
        const run = await putFinishedRun(svc.store, kind, result as Record<string, unknown>);
        const res = await svc.get(`/v1/runs/${run.id}/chart.svg`);
        assert.equal(res.status, 200, `${kind}: ${JSON.stringify(result)}`);
        checkSvg(await res.text());
      }
    }
  } finally {
    await svc.close();
  }
});

Deno.test("smoothing chart draws the smoothed series over the observed input", async () => {
  const svc = await makeTestApp();
  try {
    const d = loadDataset("sunspot_month");
    const run = await created(
      await svc.post("/v1/smoothing", {
        series: {
          name: "R datasets sunspot.month",
          quantity: "sunspot_number",
          units: "1",
          version: "1",
          time: d.date,
          value: d.value,
        },
      }),
    );
    const root = await chartOf(svc, run.id, "?from=1950&to=1980");
    const t = texts(root);
    assert.ok(t.includes("observed: R datasets sunspot.month"), t.join("|"));
    const lines = findAll(root, "path").filter((p) => p.attrs.class === "line");
    assert.equal(lines.length, 2);
    assert.ok(t.includes("Sunspot number"));
    assert.match(findAll(root, "desc")[0].text, /Horizontal axis: Year, from 1950 to 1981\./);
  } finally {
    await svc.close();
  }
});
