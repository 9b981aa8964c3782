/**
 * Test helper: the demo series by content id (stable: fixtures/demo, invented data) and the
 * demo irradiance chain (darkening run → saved PSI series → proxy model) that several tests
 * build on.
 *
 * @module
 */
import assert from "node:assert/strict";
import type { TestService } from "./helpers.ts";
import { FIELD } from "./demo_ids.ts";

/** Content ids of the demo series loaded by `loadDemo`. */
export const DEMO = {
  /** monthly sunspot number, version 2 */
  SSN: "sha256:adebf4dd9a329b7382165cf603d02c96fa9a2c91a7ba58eb7b8e967337f2ff2b",
  /** daily total sunspot area */
  AREA: "sha256:165c80d17f315d238ae6ee0aacd536a8a8f7484217a18dfb7b7c9ede9ff27f14",
  /** daily facular index */
  MG: "sha256:d4780e80aedd5569ef8292dda45fb2f1372ae0c333d378b2a58a44de47432e10",
  /** daily TSI */
  TSI: "sha256:4de66a40b207591db1232e642ce89992bf2df2f556d26f12ada5d636c0034a0f",
  /** monthly TSI composite */
  TSIM: "sha256:dcd8d0bcd0c66f73a1a079649dbcd55d3d0e247c1329eb803a87767023e8576d",
  /** monthly temperature anomaly */
  TEMP: "sha256:dc57cafa9ebf93093645c18f5c57f2c59cb3dfc8505841586e88f241a195e480",
  /** monthly ENSO index */
  ENSO: "sha256:481ce6e1b9d72efaae13afddd39bedb997b7eebfeb98f820f0c696d890d89d39",
  /** monthly aerosol optical depth */
  AOD: "sha256:1c90d09c4d2ddc23a99dac7abac5521ad06226ec60fd89683fd85a8ff665f8d7",
  /** monthly 10° air temperature field (a gridded field, not a series) */
  FIELD,
} as const;

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
