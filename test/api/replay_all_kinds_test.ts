/**
 * Every run kind the service offers replays to the same result digest, on the demo data.
 * The list of cases must name every registered kind, so a new kind without a replay case
 * fails here.
 */
import assert from "node:assert/strict";
import { makeTestApp } from "./helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { RUN_KINDS } from "../../api/analyses/registry.ts";
import { canonicalJson } from "../../api/canonical.ts";
import { DEMO } from "./demo_inputs.ts";

const { SSN, AREA, MG, TSI, TSIM, TEMP, ENSO, AOD, FIELD } = DEMO;
/** The demo spectral record's bands with their series ids (fixtures/demo/spectral_bands.json). */
const SPECTRAL_BANDS = JSON.parse(
  await Deno.readTextFile(new URL("../../fixtures/demo/spectral_bands.json", import.meta.url)),
);

Deno.test("replay: every run kind recomputes to the stored digest", async (t) => {
  const svc = await makeTestApp();
  const ids = await loadDemo(svc.store);
  for (const id of [SSN, AREA, MG, TSI, TSIM, TEMP, ENSO, AOD]) assert.ok(ids.includes(id), id);
  const runIds: Record<string, string> = {};
  const covered = new Set<string>();

  async function check(path: string, body: Record<string, unknown>): Promise<string> {
    const res = await svc.post(path, body);
    let run = await res.json();
    assert.ok(res.status === 201 || res.status === 202, `${path}: ${JSON.stringify(run)}`);
    if (res.status === 202) {
      await svc.runs.settle();
      run = await (await svc.get(`/v1/runs/${run.id}`)).json();
    }
    assert.equal(run.status, "succeeded", `${path}: ${JSON.stringify(run.error)}`);
    // The result schema describes the stored result exactly: it parses, and nothing is stripped.
    const kind = RUN_KINDS.find((k) => k.kind === run.kind)!;
    const parsed = kind.result.safeParse(run.result);
    assert.ok(parsed.success, `${path}: ${JSON.stringify(parsed.error?.issues.slice(0, 3))}`);
    assert.equal(canonicalJson(parsed.data), canonicalJson(run.result), `${path}: schema strips`);
    const rep = await (await svc.post(`/v1/runs/${run.id}/replay`, {})).json();
    assert.equal(rep.identical, true, `${path} replays identically`);
    assert.equal(rep.replay_digest, run.result_digest);
    covered.add(run.kind);
    return run.id;
  }

  const cases: [string, () => Record<string, unknown>][] = [
    ["/v1/resampling", () => ({ series: TEMP, to: "annual" })],
    ["/v1/anomalies", () => ({ series: TEMP, base: { start: "1961", end: "1990" } })],
    ["/v1/alignments", () => ({ series: [TEMP, ENSO], resolution: "annual" })],
    ["/v1/smoothing", () => ({ series: SSN })],
    ["/v1/cycles", () => ({ series: SSN })],
    ["/v1/spectra", () => ({ series: SSN })],
    ["/v1/cycle-fits", () => ({ series: SSN })],
    ["/v1/cycle-forecasts", () => ({ series: SSN, replicates: 40, hindcast_replicates: 20 })],
    ["/v1/irradiance/darkening", () => ({ total_area: AREA })],
    ["/v1/irradiance/models", () => ({
      tsi: TSI,
      sunspot_number: SSN,
      terms: [
        { name: "mg_ii", series: MG, role: "facular" },
        { name: "psi", series: runIds.psi, role: "sunspot_darkening" },
      ],
    })],
    ["/v1/irradiance/reconstructions", () => ({
      model: runIds["/v1/irradiance/models"],
      sunspot_number: SSN,
      resolution: "annual",
      period: { start: "1700", end: "2025" },
      proxies: [{ term: "mg_ii", series: MG }, { term: "psi", series: runIds.psi }],
    })],
    ["/v1/irradiance/spectral-models", () => ({
      tsi_model: runIds["/v1/irradiance/models"],
      sunspot_number: SSN,
      proxies: [{ term: "mg_ii", series: MG }, { term: "psi", series: runIds.psi }],
      bands: SPECTRAL_BANDS,
      ranges: [{ lower: 200, upper: 400 }],
    })],
    ["/v1/irradiance/spectral-reconstructions", () => ({
      model: runIds["/v1/irradiance/spectral-models"],
      sunspot_number: SSN,
      resolution: "annual",
      period: { start: "1900", end: "2025" },
      proxies: [{ term: "mg_ii", series: MG }, { term: "psi", series: runIds.psi }],
      ranges: [{ lower: 200, upper: 400 }],
    })],
    ["/v1/forcing", () => ({
      reconstruction: runIds["/v1/irradiance/reconstructions"],
      reference: { kind: "period", period: { start: "1986", end: "1996" } },
    })],
    ["/v1/energy-balance", () => ({ forcing_run: runIds["/v1/forcing"] })],
    ["/v1/lag-correlations", () => ({ solar: TSIM, climate: TEMP, surrogates: 200 })],
    ["/v1/attributions", () => ({
      climate: TEMP,
      regressors: [
        { name: "solar", series: TSIM, role: "solar", min_lag: 12, max_lag: 16 },
        { name: "enso", series: ENSO, role: "enso", max_lag: 3 },
        { name: "volc", series: AOD, role: "volcanic", max_lag: 8 },
      ],
    })],
    ["/v1/composites", () => ({
      series: TEMP,
      cycle_run: runIds["/v1/cycles"],
      bootstrap: 200,
      random_sets: 200,
    })],
    [
      "/v1/field-area-means",
      () => ({ field: FIELD, region: { kind: "band", south: 20, north: 60 } }),
    ],
    ["/v1/solar-signal-maps", () => ({
      field: FIELD,
      solar: TSIM,
      controls: [{ name: "enso", series: ENSO }],
      max_lag: 12,
      surrogates: 200,
    })],
    ["/v1/field-composites", () => ({
      field: FIELD,
      cycle_run: runIds["/v1/cycles"],
      random_sets: 200,
    })],
  ];
  for (const [path, body] of cases) {
    await t.step(path, async () => {
      runIds[path] = await check(path, body());
      if (path === "/v1/irradiance/darkening") {
        const run = await (await svc.get(`/v1/runs/${runIds[path]}`)).json();
        // The saved PSI series of the darkening run feeds the model.
        const saved = await svc.post(`/v1/runs/${run.id}/outputs/psi/series`, {});
        runIds.psi = (await saved.json()).id;
      }
    });
  }
  assert.deepEqual([...covered].sort(), RUN_KINDS.map((k) => k.kind).sort());

  await t.step("a bundle carries a run's chain of input runs and verifies elsewhere", async () => {
    const forcing = runIds["/v1/forcing"];
    const bundle = await (await svc.get(`/v1/runs/${forcing}/bundle`)).json();
    const kinds = bundle.input_runs.map((r: { kind: string }) => r.kind);
    // Dependencies first: the model before the reconstruction that cites it.
    assert.ok(kinds.indexOf("irradiance-models") < kinds.indexOf("irradiance-reconstructions"));
    assert.ok(kinds.indexOf("irradiance-models") >= 0);
    assert.ok(bundle.input_runs.length >= 2, "model and reconstruction travel with it");
    const other = await makeTestApp();
    const answer = await (await other.post("/v1/bundles", bundle)).json();
    assert.deepEqual(answer.differences, []);
    assert.equal(answer.verified, true);
    const copied = await (await other.get(`/v1/runs/${forcing}`)).json();
    assert.equal(copied.result_digest, bundle.run.result_digest);
    await other.close();
  });
  await svc.close();
});
