/**
 * A scan of the problems that bad requests produce: every 422 names at least one field, every
 * field error with a non-empty JSON Pointer (a text body's errors may instead name a row, or be
 * about the whole body), and no problem may carry an internal phrase (a core function's precondition
 * message, a JavaScript error name, "undefined", a stack frame). Bad input never gets a 500.
 *
 * The requests: for every run kind, a valid demo request (as in the replay test) mutated field
 * by field (each top-level field removed, or set to a wrong type, an empty array, zero, a
 * negative or huge number), plus edge cases found by users (a one-period `period_list`, a
 * series of two points, a constant series), and bad series uploads.
 */
import assert from "node:assert/strict";
import { makeTestApp, monthlySeries, type TestService } from "./helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { DEMO, demoIrradianceModel, demoModelRequest } from "./demo_inputs.ts";
import { RUN_KINDS } from "../../api/analyses/registry.ts";

const { SSN, AREA, TSIM, TEMP, ENSO } = DEMO;

/** Phrases that belong to the code, not to a message for the user. */
const INTERNAL = [
  /not name the field at fault/, // a core precondition no request check caught (asProblem)
  /\b(?:Type|Range|Reference|Syntax)Error\b/,
  /\bundefined\b/,
  /Cannot read propert/,
  /is not a function/,
  /\[object Object\]/,
  /\bat [\w.<>]+ \(/, // a stack frame
  /\b(?:Float64Array|Int32Array|Uint8Array)\b/,
  /was not loaded/,
  /unexpectedly/,
];

interface Problem {
  status: number;
  detail: string;
  errors?: { pointer: string; message: string; in?: string; row?: number }[];
}

interface Finding {
  request: string;
  why: string;
}

/** Check one answer; returns what is wrong with it. */
function inspect(request: string, status: number, p: Problem, textBody: boolean): Finding[] {
  const out: Finding[] = [];
  if (status >= 500) out.push({ request, why: `status ${status}: ${p.detail}` });
  if (status < 400) return out;
  for (const re of INTERNAL) {
    if (re.test(p.detail)) out.push({ request, why: `internal phrase in detail: ${p.detail}` });
  }
  if (status === 422 && !(p.errors ?? []).length) {
    out.push({ request, why: `no field named: ${p.detail}` });
  }
  for (const e of p.errors ?? []) {
    const wholeTextBody = textBody && e.in === "body";
    if (e.pointer === "" && !wholeTextBody) {
      out.push({ request, why: `empty pointer: ${e.message}` });
    }
    for (const re of INTERNAL) {
      if (re.test(e.message)) out.push({ request, why: `internal phrase: ${e.message}` });
    }
  }
  return out;
}

/** Bad variants of a valid body: each field removed, or replaced by wrong values. */
function mutations(body: Record<string, unknown>): [string, Record<string, unknown>][] {
  const out: [string, Record<string, unknown>][] = [["{}", {}]];
  const wrong: [string, unknown][] = [
    ["null", null],
    ["string", "x"],
    ["empty array", []],
    ["zero", 0],
    ["negative", -1],
    ["huge", 1e308],
    ["object", { a: 1 }],
  ];
  for (const k of Object.keys(body)) {
    const { [k]: _, ...rest } = body;
    out.push([`without ${k}`, rest]);
    for (const [label, v] of wrong) out.push([`${k}: ${label}`, { ...body, [k]: v }]);
  }
  return out;
}

async function post(svc: TestService, path: string, body: unknown) {
  const res = await svc.post(path, body);
  const json = await res.json();
  return { status: res.status, json };
}

Deno.test("problems of bad requests name their field and speak to the user", async () => {
  const svc = await makeTestApp();
  const findings: Finding[] = [];
  const seenKinds = new Set<string>();
  try {
    await loadDemo(svc.store);
    // valid requests that later requests refer to
    const run = async (path: string, body: unknown) => {
      const r = await post(svc, path, body);
      assert.ok(r.status === 201, `${path}: ${JSON.stringify(r.json).slice(0, 300)}`);
      return r.json;
    };
    const { psi, model } = await demoIrradianceModel(svc);
    const rec = await run("/v1/irradiance/reconstructions", {
      model: model.id,
      sunspot_number: SSN,
      resolution: "annual",
      period: { start: "1900", end: "2025" },
    });
    const reference = { kind: "period", period: { start: "1986", end: "1996" } };
    const forcing = await run("/v1/forcing", { reconstruction: rec.id, reference });
    const cycles = await run("/v1/cycles", { series: SSN });
    const bands = JSON.parse(
      await Deno.readTextFile(new URL("../../fixtures/demo/spectral_bands.json", import.meta.url)),
    ).slice(0, 6);
    const proxies = [{ term: "mg_ii", series: DEMO.MG }, { term: "psi", series: psi }];
    const spectralModel = { tsi_model: model.id, sunspot_number: SSN, proxies, bands };
    const spectral = await run("/v1/irradiance/spectral-models", spectralModel);

    const valid: [string, Record<string, unknown>][] = [
      ["/v1/resampling", { series: TEMP, to: "annual" }],
      ["/v1/anomalies", { series: TEMP, base: { start: "1961", end: "1990" } }],
      ["/v1/alignments", { series: [TEMP, ENSO], resolution: "annual" }],
      ["/v1/smoothing", { series: SSN }],
      ["/v1/cycles", { series: SSN }],
      ["/v1/spectra", { series: SSN }],
      ["/v1/cycle-fits", { series: SSN }],
      ["/v1/cycle-forecasts", { series: SSN, replicates: 20, hindcast_replicates: 10 }],
      ["/v1/irradiance/darkening", { total_area: AREA }],
      ["/v1/irradiance/models", demoModelRequest(psi)],
      ["/v1/irradiance/reconstructions", {
        model: model.id,
        sunspot_number: SSN,
        resolution: "annual",
        period: { start: "1900", end: "2025" },
      }],
      ["/v1/irradiance/spectral-models", spectralModel],
      ["/v1/irradiance/spectral-reconstructions", {
        model: spectral.id,
        sunspot_number: SSN,
        proxies,
        resolution: "annual",
        period: { start: "1900", end: "2025" },
        ranges: [{ lower: 200, upper: 300 }],
      }],
      ["/v1/forcing", { reconstruction: rec.id, reference }],
      ["/v1/energy-balance", { forcing_run: forcing.id }],
      ["/v1/lag-correlations", { solar: TSIM, climate: TEMP, surrogates: 50 }],
      ["/v1/attributions", {
        climate: TEMP,
        regressors: [{ name: "solar", series: TSIM, role: "solar", max_lag: 3 }],
      }],
      ["/v1/composites", { series: TEMP, cycle_run: cycles.id, bootstrap: 50, random_sets: 50 }],
      ["/v1/field-area-means", {
        field: DEMO.FIELD,
        region: { kind: "box", south: 0, north: 40, west: 20, east: 90 },
      }],
      ["/v1/solar-signal-maps", { field: DEMO.FIELD, solar: TSIM, max_lag: 6, surrogates: 99 }],
      ["/v1/field-composites", { field: DEMO.FIELD, cycle_run: cycles.id, random_sets: 99 }],
    ];
    const kindOfPath = new Map(RUN_KINDS.map((k) => [k.path, k.kind]));
    const tiny = monthlySeries("two months", "sunspot_number", "1", 2000, 2, (i) => 10 + i, {
      version: "2",
    });
    const flat = monthlySeries("flat", "sunspot_number", "1", 1950, 240, () => 50, {
      version: "2",
    });
    for (const [path, body] of valid) {
      seenKinds.add(kindOfPath.get(path)!);
      const bad = mutations(body);
      // every series reference replaced by a two-point or a constant series
      for (const [k, v] of Object.entries(body)) {
        if (typeof v === "string" && v.startsWith("sha256:")) {
          bad.push([`${k}: two points`, { ...body, [k]: tiny }]);
          bad.push([`${k}: constant`, { ...body, [k]: flat }]);
        }
      }
      for (const [label, b] of bad) {
        const r = await post(svc, path, b);
        findings.push(...inspect(`${path} ${label}`, r.status, r.json, false));
      }
    }
    assert.deepEqual([...seenKinds].sort(), RUN_KINDS.map((k) => k.kind).sort());

    // edge cases users met
    const edges: [string, Record<string, unknown>][] = [
      ["/v1/spectra", { series: SSN, period_list: [11] }],
      ["/v1/spectra", { series: SSN, period_list: [] }],
      ["/v1/spectra", { series: SSN, period_list: [11, 11] }],
      ["/v1/spectra", { series: SSN, periods: { min: 20, max: 5 } }],
      ["/v1/lag-correlations", { solar: TSIM, climate: TEMP, min_lag: 10, max_lag: -10 }],
      ["/v1/lag-correlations", { solar: TSIM, climate: TEMP, min_lag: -10000 }],
      ["/v1/smoothing", { series: SSN, window: 1 }],
      ["/v1/anomalies", { series: TEMP, base: { start: "1990", end: "1961" } }],
      ["/v1/resampling", { series: TEMP, to: "daily" }],
    ];
    for (const [path, b] of edges) {
      const r = await post(svc, path, b);
      findings.push(...inspect(`${path} ${JSON.stringify(b)}`, r.status, r.json, false));
    }

    // bad series uploads, JSON and text
    const base = { name: "x", quantity: "sunspot_number", units: "1" };
    const uploads: [string, unknown][] = [
      ["one point", { ...base, time: ["2001-01"], value: [1] }],
      ["all missing", { ...base, time: ["2001-01", "2001-02"], value: [null, null] }],
      ["one kept", { ...base, time: ["2001-01", "2001-02"], value: [1, null] }],
      ["bad units", { ...base, units: "W m-2", time: ["2001", "2002"], value: [1, 2] }],
      ["duplicate time", { ...base, time: ["2001", "2001"], value: [1, 2] }],
    ];
    for (const [label, b] of uploads) {
      const r = await post(svc, "/v1/series", b);
      findings.push(...inspect(`POST /v1/series ${label}`, r.status, r.json, false));
    }
    const texts: [string, string][] = [
      ["one row", "time,value\n2001-01,1\n"],
      ["bad cell", "time,value\n2001-01,1\n2001-02,x\n"],
      ["header only", "time,value\n"],
      ["no delimiter", "abc\ndef\n"],
    ];
    for (const [label, text] of texts) {
      const res = await svc.app.request("/v1/series?name=x&quantity=other&units=1", {
        method: "POST",
        headers: { "content-type": "text/csv" },
        body: text,
      });
      findings.push(
        ...inspect(`POST /v1/series text ${label}`, res.status, await res.json(), true),
      );
    }
    // the scan itself must have seen problems (a scan of nothing proves nothing)
    assert.ok(findings.length === 0, findings.map((f) => `${f.request}: ${f.why}`).join("\n"));
  } finally {
    await svc.close();
  }
});
