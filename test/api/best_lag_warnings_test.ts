/**
 * Where the best lag of a lag correlation lies: at an edge of the window, or at a negative lag
 * (the climate series leading the solar one). R's nhtemp (annual temperatures, °F, 1912–1971)
 * against R's sunspot.year (fixtures/datasets/PROVENANCE.md): the best lag is −5, at the edge of
 * the default ±5-year window.
 */
import assert from "node:assert/strict";
import { makeTestApp, uploadSeries } from "./helpers.ts";
import { loadDataset } from "../core/cycles/load_dataset.ts";

// R's ccf on the same pair (fixtures/reference/ccf_r.R, overlap normalisation)
const CCF = JSON.parse(
  Deno.readTextFileSync(new URL("../../fixtures/reference/ccf_r.json", import.meta.url)),
);

Deno.test("lag correlations warn when the best lag is at the window's edge or negative", async () => {
  const svc = await makeTestApp();
  try {
    const sy = loadDataset("sunspot_year"), nh = loadDataset("nhtemp");
    const solar = await uploadSeries(svc, {
      name: "R sunspot.year",
      quantity: "sunspot_number",
      units: "1",
      version: "1",
      time: sy.date,
      value: sy.value,
    });
    const climate = await uploadSeries(svc, {
      name: "R nhtemp",
      quantity: "temperature",
      units: "degF",
      time: nh.date,
      value: nh.value,
    });
    const run = async (body: Record<string, unknown>) => {
      const res = await svc.post("/v1/lag-correlations", { solar, climate, ...body });
      const j = await res.json();
      assert.equal(res.status, 201, JSON.stringify(j).slice(0, 400));
      return j.result;
    };
    // before: best lag −5 with no warning at all
    const r = await run({});
    assert.equal(r.best.lag, -5);
    assert.equal(r.lags[0].lag, -5);
    assert.equal(r.seasonal_cycle.deseasonalise, false); // annual axis
    const edge = r.warnings.filter((w: string) => /lower edge of the lag window -5 to 5/.test(w));
    const lead = r.warnings.filter((w: string) => /best lag is negative \(-5 years\)/.test(w));
    assert.equal(edge.length, 1);
    assert.equal(lead.length, 1);
    assert.match(lead[0], /climate series leads the solar one/);
    // a wider window: the best lag moves away from the edge; still negative, still warned
    const wide = await run({ max_lag: 12 });
    assert.ok(wide.best.lag > -12 && wide.best.lag < 12);
    assert.ok(!wide.warnings.some((w: string) => /edge of the lag window/.test(w)));
    assert.equal(
      wide.warnings.some((w: string) => /best lag is negative/.test(w)),
      wide.best.lag < 0,
    );
    // a window of non-negative lags: the best lag sits at an edge but is not negative
    const pos = await run({ min_lag: 0, max_lag: 5 });
    assert.ok(!pos.warnings.some((w: string) => /best lag is negative/.test(w)));
    const atEdge = pos.best.lag === 0 || pos.best.lag === 5;
    assert.equal(pos.warnings.some((w: string) => /edge of the lag window/.test(w)), atEdge);
    // a single fixed lag has no edge to warn about
    const one = await run({ min_lag: 2, max_lag: 2 });
    assert.ok(!one.warnings.some((w: string) => /edge/.test(w)));
    // the same with only the means removed: the best lag and r are R's (ccf_r.json, overlap r)
    const c = CCF.cases.find((x: { name: string }) => x.name === "sunspot.year vs nhtemp");
    let bestR = 0, bestLag = 0;
    c.sunlag_lag.forEach((k: number, i: number) => {
      if (Math.abs(k) <= 5 && Math.abs(c.overlap[i]) > Math.abs(bestR)) {
        bestR = c.overlap[i];
        bestLag = k;
      }
    });
    const mean = await run({ preprocess: "mean" });
    assert.equal(mean.best.lag, bestLag);
    assert.ok(Math.abs(mean.best.r - bestR) < 1e-10);
    assert.equal(
      mean.warnings.some((w: string) => /edge of the lag window/.test(w)),
      Math.abs(bestLag) === 5,
    );
  } finally {
    await svc.close();
  }
});
