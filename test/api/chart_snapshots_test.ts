/**
 * Byte-level snapshots of the demo's charts and results: every demo series and a run of every
 * analysis (several option sets for the solar-cycle ones) is drawn through the chart routes at
 * four sizes, themes and time ranges, and the SHA-256 of each SVG (run ids and element ids
 * replaced by fixed ones) must match `chart_snapshots.json`; the result digest of every run
 * must match too. The renderer alone is pinned the same way on specs that reach every axis
 * kind, layer type and layout branch (`chart_specs.ts`). A refactor of the renderer or of an
 * analysis therefore keeps its output byte-identical, or changes this file on purpose.
 *
 * Every run chart is also checked to show each warning of its run (own and inherited) whole in
 * its visible notes, at every size (a chart grows taller than asked rather than cut one).
 *
 * After a deliberate change to a chart or a result, rewrite the snapshot file with
 * `SUNLAG_UPDATE_SNAPSHOTS=1 deno test -A test/api/chart_snapshots_test.ts` and say why in the
 * commit.
 */
import assert from "node:assert/strict";
import { makeTestApp, type TestService, uploadSeries } from "./helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { RUN_KINDS } from "../../api/analyses/registry.ts";
import { renderChart } from "../../api/charts/chart.ts";
import { rendererCases } from "./chart_specs.ts";
import { runLabel } from "../../api/runs/label.ts";
import { noteText, squash } from "./svg_text.ts";
import { AOD, AREA, ENSO, FIELD, MG, SSN, TEMP, TSI, TSIM } from "./demo_ids.ts";

const SNAPSHOTS = new URL("./chart_snapshots.json", import.meta.url);
const UPDATE = Deno.env.get("SUNLAG_UPDATE_SNAPSHOTS") === "1";

/** Size, theme and range variants each chart is drawn with. */
const VARIANTS = [
  "",
  "?theme=dark&width=480&height=300",
  "?width=240&height=160",
  "?from=1950&to=2000&width=1200&height=500",
];

/**
 * [name, path, body] of the runs drawn; bodies may use earlier runs' ids (their results then
 * cite those ids, so their digests are not pinned: `RUN_REFS`).
 */
type Case = [string, string, (ids: Record<string, string>) => Record<string, unknown>];
const RUN_REFS = new Set([
  "reconstructions",
  "forcing",
  "energy-balance",
  "composites",
  "field-composites",
  "spectral-models",
  "spectral-reconstructions",
]);
/** The demo spectral record's bands with their series ids (fixtures/demo/spectral_bands.json). */
const SPECTRAL_BANDS = JSON.parse(
  await Deno.readTextFile(new URL("../../fixtures/demo/spectral_bands.json", import.meta.url)),
);
const CASES: Case[] = [
  ["resampling", "/v1/resampling", () => ({ series: TEMP, to: "annual" })],
  ["anomalies", "/v1/anomalies", () => ({ series: TEMP, base: { start: "1961", end: "1990" } })],
  ["alignments", "/v1/alignments", () => ({ series: [TEMP, ENSO], resolution: "annual" })],
  ["smoothing", "/v1/smoothing", () => ({ series: SSN })],
  ["smoothing-gaussian", "/v1/smoothing", () => ({ series: SSN, method: "gaussian", sigma: 9 })],
  ["cycles", "/v1/cycles", () => ({ series: SSN })],
  ["cycles-anchored", "/v1/cycles", () => ({
    series: SSN,
    anchor: { cycle: 24, date: "2008-12" },
    smoothing: "gaussian",
    sigma: 8,
    max_missing_weight: 0.2,
    min_separation_years: 8,
  })],
  ["cycles-running-mean", "/v1/cycles", () => ({
    series: SSN,
    smoothing: "running_mean",
    window: 24,
    prominence: 30,
  })],
  ["spectra", "/v1/spectra", () => ({ series: SSN })],
  ["spectra-monte-carlo", "/v1/spectra", () => ({
    series: SSN,
    false_alarm: "both",
    replicates: 60,
    periods: { min: 2, max: 60, count: 900 },
    seed: 7,
  })],
  ["spectra-permutation-psd", "/v1/spectra", () => ({
    series: TEMP,
    false_alarm: "monte_carlo",
    monte_carlo_null: "permutation",
    normalization: "psd",
    replicates: 40,
    periods: { min: 1, max: 40, count: 400, spacing: "period" },
  })],
  ["spectra-list", "/v1/spectra", () => ({
    series: SSN,
    period_list: [5, 8, 9, 10, 10.5, 11, 11.5, 12, 14, 20, 50],
    normalization: "standard",
  })],
  ["spectra-fft", "/v1/spectra", () => ({ series: SSN, method: "fft" })],
  ["spectra-fft-tukey", "/v1/spectra", () => ({
    series: TSIM,
    method: "fft",
    taper: "tukey",
    tukey_fraction: 0.2,
    detrend: "linear",
    periods: { min: 1, max: 30 },
    max_peaks: 8,
  })],
  ["cycle-fits", "/v1/cycle-fits", () => ({ series: SSN })],
  ["cycle-fits-b-of-a", "/v1/cycle-fits", () => ({
    series: SSN,
    width: "amplitude_dependent",
    overlap: "none",
    anchor: { cycle: 1, date: "1755-02" },
  })],
  ["cycle-forecasts", "/v1/cycle-forecasts", () => ({
    series: SSN,
    replicates: 40,
    hindcast_replicates: 20,
  })],
  ["cycle-forecasts-free", "/v1/cycle-forecasts", () => ({
    series: SSN,
    replicates: 30,
    hindcast_replicates: 20,
    width: "free",
    previous_cycle_overlap: false,
    level: 0.8,
    block_length: 1,
    seed: 3,
  })],
  ["darkening", "/v1/irradiance/darkening", () => ({ total_area: AREA })],
  ["models", "/v1/irradiance/models", (ids) => ({
    tsi: TSI,
    sunspot_number: SSN,
    terms: [
      { name: "mg_ii", series: MG, role: "facular" },
      { name: "psi", series: ids.psi, role: "sunspot_darkening" },
    ],
  })],
  ["reconstructions", "/v1/irradiance/reconstructions", (ids) => ({
    model: ids.models,
    sunspot_number: SSN,
    resolution: "annual",
    period: { start: "1700", end: "2025" },
    proxies: [{ term: "mg_ii", series: MG }, { term: "psi", series: ids.psi }],
  })],
  ["forcing", "/v1/forcing", (ids) => ({
    reconstruction: ids.reconstructions,
    reference: { kind: "period", period: { start: "1986", end: "1996" } },
  })],
  ["energy-balance", "/v1/energy-balance", (ids) => ({ forcing_run: ids.forcing })],
  ["lag-correlations", "/v1/lag-correlations", () => ({
    solar: TSIM,
    climate: TEMP,
    surrogates: 200,
  })],
  ["attributions", "/v1/attributions", () => ({
    climate: TEMP,
    regressors: [
      { name: "solar", series: TSIM, role: "solar", min_lag: 12, max_lag: 16 },
      { name: "enso", series: ENSO, role: "enso", max_lag: 3 },
      { name: "volc", series: AOD, role: "volcanic", max_lag: 8 },
    ],
  })],
  ["composites", "/v1/composites", (ids) => ({
    series: TEMP,
    cycle_run: ids.cycles,
    bootstrap: 200,
    random_sets: 200,
  })],
  ["field-area-means", "/v1/field-area-means", () => ({ field: FIELD })],
  ["solar-signal-maps", "/v1/solar-signal-maps", () => ({
    field: FIELD,
    solar: TSIM,
    surrogates: 200,
  })],
  ["field-composites", "/v1/field-composites", (ids) => ({
    field: FIELD,
    cycle_run: ids.cycles,
    random_sets: 200,
  })],
  // last, so the run ids of the cases above keep their places in the normalisation
  ["spectral-models", "/v1/irradiance/spectral-models", (ids) => ({
    tsi_model: ids.models,
    sunspot_number: SSN,
    proxies: [{ term: "mg_ii", series: MG }, { term: "psi", series: ids.psi }],
    bands: SPECTRAL_BANDS,
  })],
  ["spectral-reconstructions", "/v1/irradiance/spectral-reconstructions", (ids) => ({
    model: ids["spectral-models"],
    sunspot_number: SSN,
    resolution: "annual",
    period: { start: "1700", end: "2025" },
    proxies: [{ term: "mg_ii", series: MG }, { term: "psi", series: ids.psi }],
  })],
];

async function sha256(text: string): Promise<string> {
  const d = await crypto.subtle.digest("SHA-256", new TextEncoder().encode(text));
  return Array.from(new Uint8Array(d), (b) => b.toString(16).padStart(2, "0")).join("");
}

/**
 * The SVG with run ids, result digest and the element-id prefix replaced by fixed strings (run
 * ids are new on every run; a result that cites another run's id has a new digest too).
 */
function normalise(svg: string, runIds: string[] = [], digest?: string): string {
  const prefix = /aria-labelledby="(\S+)-title /.exec(svg)?.[1];
  let s = prefix ? svg.replaceAll(`${prefix}-`, "chart-") : svg;
  if (digest) s = s.replaceAll(digest, "DIGEST");
  runIds.forEach((id, k) => {
    s = s.replaceAll(id, `RUN-ID-${k}`).replaceAll(runLabel(id), `RUN-${k}`);
  });
  return s;
}

async function chartHash(
  svc: TestService,
  path: string,
  runIds?: string[],
  digest?: string,
  run?: FinishedRun,
): Promise<string> {
  const res = await svc.get(path);
  const body = await res.text();
  assert.equal(res.status, 200, `${path}: ${body.slice(0, 400)}`);
  if (run) assertWarningsWhole(body, run, path);
  return await sha256(normalise(body, runIds, digest));
}

/**
 * Every warning of the run, its own and those it inherits, appears whole in the chart's
 * visible notes (not only in its description), at every size.
 */
function assertWarningsWhole(svg: string, run: FinishedRun, path: string) {
  const shown = noteText(svg);
  const warnings = [
    ...(run.result.warnings ?? []),
    ...(run.result.inherited ?? []).filter((n) => n.level === "warning").map((n) => n.text),
  ];
  for (const w of warnings) {
    assert.ok(shown.includes(squash(w)), `${path}: warning not shown whole: "${w}"`);
  }
  const h = Number(/<svg[^>]* height="([\d.]+)"/.exec(svg)?.[1]);
  const asked = Number(new URL(path, "http://x").searchParams.get("height") ?? 400);
  assert.ok(h >= asked, `${path}: height ${h} below the asked ${asked}`);
}

interface FinishedRun {
  id: string;
  kind: string;
  result_digest: string;
  result: { warnings?: string[]; inherited?: { level: string; text: string }[] };
}

async function finishedRun(
  svc: TestService,
  path: string,
  body: Record<string, unknown>,
): Promise<FinishedRun> {
  const res = await svc.post(path, body);
  let run = await res.json();
  assert.ok(res.status === 201 || res.status === 202, `${path}: ${JSON.stringify(run)}`);
  if (res.status === 202) {
    await svc.runs.settle();
    run = await (await svc.get(`/v1/runs/${run.id}`)).json();
  }
  assert.equal(run.status, "succeeded", `${path}: ${JSON.stringify(run.error)}`);
  return run as FinishedRun;
}

Deno.test("charts and results of the demo are byte-identical to their snapshots", async () => {
  const svc = await makeTestApp();
  const got = { digests: {} as Record<string, string>, charts: {} as Record<string, string> };
  try {
    const seriesIds = await loadDemo(svc.store);
    for (const id of seriesIds) {
      for (const v of VARIANTS) {
        got.charts[`series ${id.slice(7, 19)} ${v}`] = await chartHash(
          svc,
          `/v1/series/${id}/chart.svg${v}`,
        );
      }
    }
    const ids: Record<string, string> = {};
    const kinds = new Set<string>();
    for (const [name, path, body] of CASES) {
      const run = await finishedRun(svc, path, body(ids));
      ids[name] = run.id;
      kinds.add(run.kind);
      if (!RUN_REFS.has(name)) got.digests[name] = run.result_digest;
      for (const v of VARIANTS) {
        got.charts[`${name} ${v}`] = await chartHash(
          svc,
          `/v1/runs/${run.id}/chart.svg${v}`,
          [run.id, ...Object.values(ids)],
          run.result_digest,
          run,
        );
      }
      if (name === "darkening") {
        // uploaded as a plain series (a saved output's id depends on the run id)
        const o = await (await svc.get(`/v1/runs/${run.id}/outputs/psi`)).json();
        const { name, quantity, units, time, value } = o;
        ids.psi = await uploadSeries(svc, { name, quantity, units, time, value });
      }
    }
    assert.deepEqual([...kinds].sort(), RUN_KINDS.map((k) => k.kind).sort(), "every kind drawn");
  } finally {
    await svc.close();
  }
  await compareOrUpdate("digests", got.digests);
  await compareOrUpdate("charts", got.charts);
});

Deno.test("renderChart() output of every branch is byte-identical to its snapshot", async () => {
  const got: Record<string, string> = {};
  for (const [name, spec, opts] of rendererCases()) {
    got[name] = await sha256(renderChart(spec, opts));
  }
  await compareOrUpdate("renderer", got);
});

/** Compare a section of the snapshot file with `got`, or rewrite that section in update mode. */
async function compareOrUpdate(section: string, got: Record<string, string>) {
  const file = JSON.parse(await Deno.readTextFile(SNAPSHOTS).catch(() => "{}"));
  if (UPDATE) {
    file[section] = got;
    await Deno.writeTextFile(SNAPSHOTS, JSON.stringify(file, null, 2) + "\n");
    return;
  }
  const want: Record<string, string> = file[section] ?? {};
  const differ = [...new Set([...Object.keys(got), ...Object.keys(want)])]
    .filter((k) => got[k] !== want[k]);
  assert.deepEqual(differ, [], `${section} differ from their snapshots`);
}
