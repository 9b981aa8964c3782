/**
 * Test helper: the demo series by content id (stable: fixtures/demo, invented data) and the
 * demo irradiance chain (darkening run → saved PSI series → proxy model) that several tests
 * build on.
 *
 * @module
 */
import assert from "node:assert/strict";
import type { TestService } from "./helpers.ts";
import { DEMO_SERIES } from "../../api/schemas/examples.ts";
import { FIELD } from "./demo_ids.ts";
import { loadDemo } from "../../api/demo.ts";
import { RUN_KINDS } from "../../api/analyses/registry.ts";

/** Content ids of the demo series loaded by `loadDemo` (api/schemas/examples.ts), and the field. */
export const DEMO = { ...DEMO_SERIES, FIELD } as const;

/** The model request terms of the demo chain, given the saved PSI series id. */
export function demoModelRequest(psi: string) {
  return {
    tsi: DEMO.TSI,
    sunspot_number: DEMO.SSN,
    terms: [
      { name: "mg_ii", series: DEMO.MG, role: "facular" },
      { name: "psi", series: psi, role: "sunspot_darkening" },
    ],
  };
}

/** Run the demo chain synchronously: darkening run, its PSI output saved, the proxy model. */
export async function demoIrradianceModel(svc: TestService) {
  const created = async (path: string, body: unknown) => {
    const res = await svc.post(path, body);
    const json = await res.json();
    assert.ok(res.status === 201 || res.status === 200, `${path}: ${JSON.stringify(json)}`);
    return json;
  };
  const darkening = await created("/v1/irradiance/darkening", { total_area: DEMO.AREA });
  const psi: string = (await created(`/v1/runs/${darkening.id}/outputs/psi/series`, {})).id;
  const model = await created("/v1/irradiance/models", demoModelRequest(psi));
  return { darkening, psi, model };
}

/** The demo's spectral bands (fixtures/demo/spectral_bands.json, invented). */
export const DEMO_BANDS = JSON.parse(
  await Deno.readTextFile(new URL("../../fixtures/demo/spectral_bands.json", import.meta.url)),
);

/** POST a run that must be created synchronously (201) with a result its kind's schema accepts. */
export async function createdRun(svc: TestService, path: string, body: unknown) {
  const res = await svc.post(path, body);
  const json = await res.json();
  assert.equal(res.status, 201, `${path}: ${JSON.stringify(json).slice(0, 600)}`);
  const kind = RUN_KINDS.find((k) => k.kind === json.kind)!;
  const parsed = kind.result.safeParse(json.result);
  assert.ok(parsed.success, `${path}: result schema ${JSON.stringify(parsed.error?.issues)}`);
  return json;
}

/**
 * The demo loaded and its chain up to a spectral model of the demo bands; `extra` adds request
 * members (e.g. `ranges`).
 */
export async function demoSpectralModel(svc: TestService, extra: Record<string, unknown> = {}) {
  await loadDemo(svc.store);
  const { psi, model } = await demoIrradianceModel(svc);
  const proxies = [{ term: "mg_ii", series: DEMO.MG }, { term: "psi", series: psi }];
  const spectral = await createdRun(svc, "/v1/irradiance/spectral-models", {
    tsi_model: model.id,
    sunspot_number: DEMO.SSN,
    proxies,
    bands: DEMO_BANDS,
    ...extra,
  });
  return { psi, model, proxies, spectral };
}
