/**
 * One column vocabulary and stated uncertainty semantics in every CSV the service writes
 * (api/export/columns.ts): stored series and run outputs start with `time` (ISO 8601) and
 * `decimal_year`; `uncertainty` is said to be the 1σ standard uncertainty; `lower`/`upper` are
 * the bounds of an interval named with its level. And the lag table's `r` and `best.r` are the
 * same r whatever the normalisation. Demo data (invented, fixtures/demo).
 *
 * @module
 */
import assert from "node:assert/strict";
import { makeTestApp, type TestService } from "./helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { DEMO, demoIrradianceModel } from "./demo_inputs.ts";

/**
 * The finished run a POST made: answered at once (201), or queued (202) when its estimate
 * passed the synchronous limit on a busy machine, then waited for.
 */
async function created(svc: TestService, path: string, body: unknown) {
  const res = await svc.post(path, body);
  const json = await res.json();
  assert.ok(res.status === 201 || res.status === 202, `${path}: ${JSON.stringify(json)}`);
  if (res.status === 201) return json;
  await svc.runs.settle();
  const run = await (await svc.get(`/v1/runs/${json.id}`)).json();
  assert.equal(run.status, "succeeded", `${path}: ${JSON.stringify(run).slice(0, 400)}`);
  return run;
}

/** The `#` lines and the header row of a CSV. */
function head(csv: string): { meta: string[]; columns: string[] } {
  const lines = csv.split("\n");
  const meta = lines.filter((l) => l.startsWith("#"));
  const columns = lines.find((l) => l && !l.startsWith("#"))!.split(",");
  return { meta, columns };
}

/** Check one CSV against the vocabulary; returns its columns. */
function checkVocabulary(csv: string, what: string): string[] {
  const { meta, columns } = head(csv);
  const described = meta.find((l) => l.startsWith("# columns:"));
  assert.ok(described, `${what}: no "# columns:" line`);
  if (columns[0] === "time") assert.equal(columns[1], "decimal_year", what);
  else assert.match(columns[0], /^(years_from_epoch|model_years)$/, what);
  if (columns.includes("uncertainty")) {
    assert.match(described, /uncertainty = 1σ standard uncertainty/, what);
  }
  if (columns.includes("lower") || columns.includes("upper")) {
    // the interval is named with its level, e.g. "95 % prediction interval"
    assert.match(described, /lower, upper = bounds of the \d+(\.\d+)? % /, what);
  }
  return columns;
}

Deno.test("every run-output and series CSV uses one column vocabulary and states its uncertainty", async () => {
  const svc = await makeTestApp();
  try {
    await loadDemo(svc.store);
    const { model, darkening } = await demoIrradianceModel(svc);
    const rec = await created(svc, "/v1/irradiance/reconstructions", {
      model: model.id,
      sunspot_number: DEMO.SSN,
      resolution: "annual",
      period: { start: "1900", end: "2020" },
    });
    const forcing = await created(svc, "/v1/forcing", {
      reconstruction: rec.id,
      reference: { kind: "period", period: { start: "1986", end: "1996" } },
    });
    const forecast = await created(svc, "/v1/cycle-forecasts", {
      series: DEMO.SSN,
      replicates: 30,
      hindcast_replicates: 20,
    });
    const composite = await created(svc, "/v1/composites", {
      series: DEMO.TEMP,
      epoch_dates: ["1958-03", "1968-11", "1979-12", "1989-11", "2001-11"],
      bootstrap: 100,
      random_sets: 100,
    });
    const seen = new Set<string>();
    for (const run of [darkening, model, rec, forcing, forecast, composite]) {
      for (const name of Object.keys(run.result.outputs)) {
        const csv = await (await svc.get(`/v1/runs/${run.id}/outputs/${name}?format=csv`)).text();
        assert.ok(csv.includes(`# run_label: ${run.id.slice(-8)}`), `${run.kind}/${name}`);
        for (const c of checkVocabulary(csv, `${run.kind}/${name}`)) seen.add(c);
      }
    }
    // the checks above met every column kind at least once
    for (const c of ["time", "uncertainty", "lower", "upper", "years_from_epoch"]) {
      assert.ok(seen.has(c), `no output with a ${c} column`);
    }
    // a stored series with uncertainty: same first columns, same words for uncertainty
    const series = await (await svc.get(`/v1/series/${DEMO.TSIM}?format=csv`)).text();
    const cols = checkVocabulary(series, "series");
    assert.deepEqual(cols.slice(0, 3), ["time", "decimal_year", "value"]);
  } finally {
    await svc.close();
  }
});

Deno.test("lag correlations: the table's r and best.r are the same r, with either normalisation", async () => {
  const svc = await makeTestApp();
  try {
    await loadDemo(svc.store);
    for (const normalisation of ["overlap", "full"]) {
      const run = await created(svc, "/v1/lag-correlations", {
        solar: DEMO.TSIM,
        climate: DEMO.TEMP,
        normalisation,
        significance: "none",
      });
      const r = run.result;
      const row = r.lags.find((x: { lag: number }) => x.lag === r.best.lag);
      assert.equal(r.best.r, row.r, normalisation);
      assert.equal(r.best.r_full, row.r_full, normalisation);
      assert.equal(r.statistic, normalisation === "full" ? "r_full" : "r");
      // the best lag maximises |statistic| over the table
      const stat = (x: { r: number; r_full: number }) => Math.abs(x[r.statistic as "r"]);
      assert.ok(r.lags.every((x: { r: number; r_full: number }) => stat(x) <= stat(row)));
    }
  } finally {
    await svc.close();
  }
});
