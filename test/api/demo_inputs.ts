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
