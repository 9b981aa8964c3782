/**
 * Analysis "forcing": solar radiative forcing ΔF = ΔTSI·(1 − α)/4 relative to a stated
 * reference period, from a TSI series or a reconstruction run
 * (core/irradiance/radiative_forcing.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { ForcingRequest } from "./request.ts";
import { ForcingResult } from "./result.ts";
import { computeForcing } from "./compute.ts";
import { estimateForcingSeconds } from "./estimate.ts";

export const forcing = defineAnalysis({
  kind: "forcing",
  path: "/v1/forcing",
  algorithmVersion: "2",
  tag: "Irradiance",
  summary: "Solar radiative forcing ΔF = ΔTSI·(1 − α)/4 relative to a reference period",
  description: "Converts TSI to radiative forcing relative to the mean TSI of a reference " +
    "period (a period, or a window around a cycle minimum), with albedo α = 0.29 by default " +
    "(IPCC AR6 WG1 §7.3.4.4). The one-sigma uncertainty of a reconstruction is carried: " +
    "σ_F = (1 − α)/4·√(σ(t)² + σ_ref²), σ_ref the mean σ in the reference period (errors " +
    "there taken as fully correlated, an upper bound).",
  request: ForcingRequest,
  result: ForcingResult,
  runRefs: (p) => (p.reconstruction ? [p.reconstruction] : []),
  estimateSeconds: estimateForcingSeconds,
  compute: computeForcing,
});
