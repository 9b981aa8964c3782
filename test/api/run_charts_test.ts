/**
 * Run charts fit for each kind, from real runs made through the API: a reconstruction with its
 * prediction band and back-extension, an attribution's contributions, a cycle table over the
 * smoothed series, a periodogram with false-alarm levels. Each SVG is checked as XML with
 * its title, description and axes.
 */
import assert from "node:assert/strict";
import { makeTestApp, monthlySeries, type TestService } from "./helpers.ts";
import { checkSvg, findAll, type SvgNode, texts } from "./svg_check.ts";
import { randomStream } from "../../core/random/mod.ts";

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
        sunspotNumber: ss,
      }),
    );
    const rec = await created(
      await svc.post("/v1/irradiance/reconstructions", {
        model: model.id,
        proxies: [{ term: "mg", series: model.params.terms[0].series }],
        sunspotNumber: model.params.sunspotNumber,
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
    const st = randomStream(21, 0);
    const n = 360, L = 12;
    const tsi: number[] = [], enso: number[] = [];
    let en = 0;
    for (let i = 0; i < n + L; i++) {
      tsi.push(1361 + 0.5 * Math.sin((2 * Math.PI * i) / 132) + 0.2 * st.normal());
      en = 0.9 * en + 0.4 * st.normal();
      enso.push(en);
    }
    const temp: number[] = [];
    let e = 0;
    for (let i = 0; i < n; i++) {
      e = 0.5 * e + 0.02 * st.normal();
      temp.push(0.1 * (tsi[i + L - 6] - 1361) + 0.05 * enso[i + L - 2] + e);
    }
    const run = await created(
      await svc.post("/v1/attributions", {
        climate: monthlySeries(
          "Invented station",
          "temperature_anomaly",
          "K",
          1950,
          n,
          (i) => temp[i],
        ),
        regressors: [
          {
            name: "solar",
            role: "solar",
            series: monthlySeries("Invented TSI", "tsi", "W m-2", 1950, n, (i) => tsi[i + L]),
            min_lag: 0,
            max_lag: 12,
          },
          {
            name: "enso",
            role: "enso",
            series: monthlySeries("Invented ENSO", "enso_index", "1", 1950, n, (i) => enso[i + L]),
            min_lag: 0,
            max_lag: 6,
          },
        ],
      }),
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
