/**
 * Analysis "irradiance-darkening": sunspot group records (or a daily total spot area) in, the
 * daily Photometric Sunspot Index and sunspot darkening in W m-2 out, saved as series
 * (core/irradiance/photometric_sunspot_index.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { DarkeningRequest } from "./request.ts";
import { DarkeningResult } from "./result.ts";
import { computeDarkening } from "./compute.ts";
import { estimateDarkeningSeconds } from "./estimate.ts";

export const irradianceDarkening = defineAnalysis({
  kind: "irradiance-darkening",
  path: "/v1/irradiance/darkening",
  algorithmVersion: "2",
  tag: "Irradiance",
  summary: "Sunspot darkening: daily Photometric Sunspot Index and ΔS in W m-2",
  description: "PSI = Σ C·A·μ(3μ + 2)/2 per day (Hudson et al. 1982; Fröhlich, Pap & Hudson " +
    "1994), from group records with true or projected areas and positions as heliocentric " +
    "angle, μ or heliographic coordinates (disc geometry from Meeus 1998 ch. 29), with " +
    "constant or area-dependent contrast; or from a total daily area with the disc-average " +
    "factor 1. Darkening ΔS = −S_Q·PSI. Outputs `psi` and `darkening` are saved as series.",
  request: DarkeningRequest,
  result: DarkeningResult,
  autoSave: ["psi", "darkening"],
  estimateSeconds: estimateDarkeningSeconds,
  compute: computeDarkening,
});
