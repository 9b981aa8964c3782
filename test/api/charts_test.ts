/**
 * Chart routes: GET /v1/series/{id}/chart.svg and GET /v1/runs/{id}/chart.svg — valid SVG with
 * title, desc and labelled axes; query validation as RFC 9457 problems; immutable caching with
 * strong ETags and 304; dispatch by run kind with a generic fallback.
 */
import assert from "node:assert/strict";
import { uuidv7 } from "uuidv7";
import { assertProblem, makeTestApp, monthlySeries, uploadSeries } from "./helpers.ts";
import { checkSvg, findAll, texts } from "./svg_check.ts";
import { putFinishedRun } from "./run_fixture.ts";

const SPOTS = monthlySeries(
  "Station sunspot number <monthly> & co",
  "sunspot_number",
  "1",
  1990,
  240,
  (i) => Math.max(0, 80 + 70 * Math.sin((2 * Math.PI * i) / 132)),
  { version: "2" },
);

Deno.test("GET /v1/series/{id}/chart.svg: valid SVG with the series name, year axis and quantity label", async () => {
  const svc = await makeTestApp();
  try {
    const id = await uploadSeries(svc, SPOTS);
    const res = await svc.get(`/v1/series/${id}/chart.svg`);
    assert.equal(res.status, 200);
    assert.equal(res.headers.get("content-type"), "image/svg+xml; charset=utf-8");
    assert.equal(res.headers.get("x-content-type-options"), "nosniff");
    const root = checkSvg(await res.text());
    assert.equal(findAll(root, "title")[0].text, SPOTS.name);
    assert.match(
      findAll(root, "desc")[0].text,
      /Sunspot number, monthly, 240 points, 1990-01 to 2009-12/,
    );
    const t = texts(root);
    assert.ok(t.includes("Year"));
    assert.ok(t.includes("Sunspot number"));
    assert.ok(t.includes("2000"));
    assert.ok(t.some((s) => /version 2/.test(s)));
  } finally {
    await svc.close();
  }
});

Deno.test("GET /v1/series/{id}/chart.svg: uncertainty band, units on the axis", async () => {
  const svc = await makeTestApp();
  try {
    const tsi = monthlySeries(
      "Station TSI",
      "tsi",
      "W m-2",
      2000,
      60,
      (i) => 1361 + 0.3 * Math.sin(i / 9),
      {
        uncertainty: Array.from({ length: 60 }, () => 0.1),
      },
    );
    const id = await uploadSeries(svc, tsi);
    const res = await svc.get(`/v1/series/${id}/chart.svg?theme=dark&width=640&height=320`);
    assert.equal(res.status, 200);
    const root = checkSvg(await res.text());
    assert.equal(root.attrs.width, "640");
    assert.equal(root.attrs["data-theme"], "dark");
    assert.ok(texts(root).includes("Total solar irradiance (W m⁻²)"));
    assert.ok(texts(root).includes("±1σ uncertainty"));
    assert.ok(findAll(root, "path").some((p) => p.attrs.class === "band"));
  } finally {
    await svc.close();
  }
});

Deno.test("GET chart.svg: time range by ISO dates or decimal years", async () => {
  const svc = await makeTestApp();
  try {
    const id = await uploadSeries(svc, SPOTS);
    const iso = checkSvg(
      await (await svc.get(`/v1/series/${id}/chart.svg?from=1995&to=1999`)).text(),
    );
    // "1995" counts from its start, "1999" to its end
    assert.match(findAll(iso, "desc")[0].text, /Horizontal axis: Year, from 1995-01 to 2000-01/);
    const dec = checkSvg(
      await (await svc.get(`/v1/series/${id}/chart.svg?from=1995.5&to=2001.25`)).text(),
    );
    assert.match(findAll(dec, "desc")[0].text, /from 1995-07 to 2001-04/);
  } finally {
    await svc.close();
  }
});

Deno.test("GET chart.svg: bad query values are 422 problems naming the parameter", async () => {
  const svc = await makeTestApp();
  try {
    const id = await uploadSeries(svc, SPOTS);
    const cases: [string, string][] = [
      ["width=10", "/width"],
      ["width=abc", "/width"],
      ["height=99999", "/height"],
      ["theme=blue", "/theme"],
      ["from=yesterday", "/from"],
      ["to=2001-13", "/to"],
      ["from=2005&to=2001", "/to"],
    ];
    for (const [q, pointer] of cases) {
      const body = await assertProblem(await svc.get(`/v1/series/${id}/chart.svg?${q}`), 422);
      assert.ok(
        body.errors.some((e: { pointer: string }) => e.pointer === pointer),
        `${q}: ${JSON.stringify(body)}`,
      );
      assert.ok(body.errors.every((e: { in?: string }) => e.in === "query"), q);
    }
    await assertProblem(await svc.get(`/v1/series/sha256:${"0".repeat(64)}/chart.svg`), 404);
  } finally {
    await svc.close();
  }
});

Deno.test("GET /v1/series/{id}/chart.svg: strong ETag with the query in it, immutable, 304", async () => {
  const svc = await makeTestApp();
  try {
    const id = await uploadSeries(svc, SPOTS);
    const a = await svc.get(`/v1/series/${id}/chart.svg`);
    await a.body?.cancel();
    const etag = a.headers.get("etag")!;
    assert.match(etag, /^"[^"]+"$/, "strong ETag (no W/)");
    assert.equal(a.headers.get("cache-control"), "public, max-age=31536000, immutable");
    const again = await svc.get(`/v1/series/${id}/chart.svg`, { "If-None-Match": etag });
    assert.equal(again.status, 304);
    assert.equal(await again.text(), "");
    assert.equal(again.headers.get("etag"), etag);
    const other = await svc.get(`/v1/series/${id}/chart.svg?theme=dark`, { "If-None-Match": etag });
    assert.equal(other.status, 200);
    assert.notEqual(other.headers.get("etag"), etag);
    await other.body?.cancel();
    // A list of tags, one matching
    const listed = await svc.get(`/v1/series/${id}/chart.svg`, { "If-None-Match": `"x", ${etag}` });
    assert.equal(listed.status, 304);
    // The same default query spelled out gives the same representation and tag
    const spelled = await svc.get(`/v1/series/${id}/chart.svg?width=800&height=400&theme=light`);
    assert.equal(spelled.headers.get("etag"), etag);
    await spelled.body?.cancel();
  } finally {
    await svc.close();
  }
});

Deno.test("GET /v1/runs/{id}/chart.svg: generic chart of outputs with bands and cautions", async () => {
  const svc = await makeTestApp();
  try {
    const t = Array.from({ length: 120 }, (_, i) => 2000 + (i + 0.5) / 12);
    const v = t.map((x) => 1361 + 0.4 * Math.sin(x));
    const run = await putFinishedRun(svc.store, "some_future_kind", {
      outputs: {
        main: {
          name: "main",
          quantity: "tsi",
          units: "W m-2",
          time: t,
          value: v,
          lower: v.map((x) => x - 0.2),
          upper: v.map((x) => x + 0.2),
          interval: "95 % prediction interval",
        },
        other: {
          name: "other",
          quantity: "radiative_forcing",
          units: "W m-2",
          time: t,
          value: v.map((x) => (x - 1361) * 0.1775),
        },
        broken: { name: "broken", time: "not an array" },
      },
      cautions: ["Correlation is not attribution."],
      warnings: ["Something to check."],
    });
    const res = await svc.get(`/v1/runs/${run.id}/chart.svg`);
    assert.equal(res.status, 200);
    const root = checkSvg(await res.text());
    const tx = texts(root);
    assert.ok(tx.includes("Total solar irradiance (W m⁻²)"));
    assert.ok(tx.includes("95 % prediction interval"));
    assert.ok(tx.some((s) => s.includes("Correlation is not attribution")));
    assert.ok(tx.some((s) => s.startsWith("Warning: Something")));
    const desc = findAll(root, "desc")[0].text;
    assert.ok(desc.includes(run.id) && desc.includes(run.result_digest!));
    assert.match(desc, /Not drawn \(other units or too many\): other/);
    assert.equal(res.headers.get("cache-control"), "public, max-age=31536000, immutable");
    const nm = await svc.get(`/v1/runs/${run.id}/chart.svg`, {
      "If-None-Match": res.headers.get("etag")!,
    });
    assert.equal(nm.status, 304);
  } finally {
    await svc.close();
  }
});

Deno.test("GET /v1/runs/{id}/chart.svg: runs without outputs or with odd results still draw", async () => {
  const svc = await makeTestApp();
  try {
    for (
      const result of [{}, { outputs: null }, { outputs: { x: 1 } }, { outputs: [] }, {
        cautions: "not a list",
      }]
    ) {
      const run = await putFinishedRun(
        svc.store,
        "lag_correlation",
        result as Record<string, unknown>,
      );
      const res = await svc.get(`/v1/runs/${run.id}/chart.svg`);
      assert.equal(res.status, 200, JSON.stringify(result));
      checkSvg(await res.text());
    }
  } finally {
    await svc.close();
  }
});

Deno.test("GET /v1/runs/{id}/chart.svg: 404 unknown, 409 unfinished, 422 bad id", async () => {
  const svc = await makeTestApp();
  try {
    await assertProblem(await svc.get(`/v1/runs/${uuidv7()}/chart.svg`), 404);
    const queued = await putFinishedRun(svc.store, "anything", {}, "queued");
    const res = await svc.get(`/v1/runs/${queued.id}/chart.svg`);
    await assertProblem(res, 409);
    assert.equal(res.headers.get("cache-control"), "no-store");
    await assertProblem(await svc.get(`/v1/runs/not-a-run/chart.svg`), 422);
  } finally {
    await svc.close();
  }
});

/** A sunspot-like monthly series and a temperature that follows it by 18 months, with noise. */
function solarAndClimate() {
  const n = 600;
  let z = 0.3;
  const noise = (i: number) => {
    // deterministic pseudo-noise (sine hash), enough to keep r < 1
    z = (Math.sin(i * 12.9898 + z * 78.233) * 43758.5453) % 1;
    return z;
  };
  const spots = monthlySeries(
    "Spots",
    "sunspot_number",
    "1",
    1950,
    n,
    (i) => 80 + 70 * Math.sin((2 * Math.PI * i) / 132),
    { version: "2" },
  );
  const temp = monthlySeries(
    "Station temperature anomaly",
    "temperature_anomaly",
    "K",
    1950,
    n,
    (i) => 0.1 * Math.sin((2 * Math.PI * (i - 18)) / 132) + 0.15 * noise(i),
  );
  return { spots, temp };
}

Deno.test("GET /v1/runs/{id}/chart.svg for lag-correlations: r by lag, surrogate envelope, family-wise level, best lag", async () => {
  const svc = await makeTestApp();
  try {
    const { spots, temp } = solarAndClimate();
    const solar = await uploadSeries(svc, spots), climate = await uploadSeries(svc, temp);
    const res = await svc.post("/v1/lag-correlations", {
      solar,
      climate,
      max_lag: 36,
      surrogates: 200,
      seed: 3,
    });
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run));
    const chart = await svc.get(`/v1/runs/${run.id}/chart.svg`);
    assert.equal(chart.status, 200);
    const root = checkSvg(await chart.text());
    assert.match(findAll(root, "title")[0].text, /^Lagged correlation/);
    const t = texts(root);
    assert.ok(t.includes("Correlation r"));
    assert.ok(t.some((s) => /^Lag \(months/.test(s)), t.join("|"));
    assert.ok(t.includes("surrogate null: ±1.96 SD (pointwise ~95 %)"));
    assert.ok(t.includes("family-wise 95 % threshold of max |r|"));
    const fw = run.result.monte_carlo.family_wise_threshold_95 as number;
    assert.ok(t.includes(`+${fw.toFixed(3)}`) && t.includes(`−${fw.toFixed(3)}`));
    const best = run.result.best;
    assert.ok(t.includes(`best lag ${best.lag} months`));
    assert.ok(best.lag >= 12 && best.lag <= 24, `best lag ${best.lag}`); // the series follow by 18 months
    assert.ok(t.some((s) => s.startsWith(`Best lag ${best.lag} months: r = `)));
    assert.ok(t.some((s) => s.startsWith("Correlation is not attribution")));
    const desc = findAll(root, "desc")[0].text;
    assert.match(desc, /Correlation at lags -36 to 36 months, with 200 phase surrogates/);
    // Cached: the second request is served with the same tag, and revalidates to 304
    const again = await svc.get(`/v1/runs/${run.id}/chart.svg`, {
      "If-None-Match": chart.headers.get("etag")!,
    });
    assert.equal(again.status, 304);
  } finally {
    await svc.close();
  }
});

Deno.test("a chart builder that meets an unknown result shape falls back to the generic chart", async () => {
  const svc = await makeTestApp();
  try {
    const t = [2000.5, 2001.5, 2002.5];
    const run = await putFinishedRun(svc.store, "lag-correlations", {
      lags: [{ lag: "zero" }],
      outputs: { a: { name: "a", quantity: "tsi", units: "W m-2", time: t, value: [1, 2, 3] } },
    });
    const res = await svc.get(`/v1/runs/${run.id}/chart.svg`);
    assert.equal(res.status, 200);
    const root = checkSvg(await res.text());
    assert.match(findAll(root, "title")[0].text, /^Lag correlations · run/);
    assert.ok(texts(root).includes("Total solar irradiance (W m⁻²)"));
  } finally {
    await svc.close();
  }
});
