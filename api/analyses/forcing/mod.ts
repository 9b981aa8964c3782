/**
 * Analysis "forcing": solar radiative forcing ΔF = ΔTSI·(1 − α)/4 relative to a stated
 * reference period, from a TSI series, a reconstruction run or a spectral reconstruction run's
 * integral
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
  // 3: σ_F from Var(x_t − m̄) with the reference mean's covariance (a reconstruction's error
  // model, or independent point errors of a series) instead of an upper bound; ensembles.
  algorithmVersion: "3",
  tag: "Irradiance",
  summary: "Solar radiative forcing ΔF = ΔTSI·(1 − α)/4 relative to a reference period",
  description: "Converts TSI to radiative forcing relative to the mean TSI of a reference " +
    "period (a period, or a window around a cycle minimum), with albedo α = 0.29 by default " +
    "(IPCC AR6 WG1 §7.3.4.4). The uncertainty is that of the difference from the reference " +
    "mean, σ_F = (1 − α)/4·√(Var(x_t) + Var(m̄) − 2Cov(x_t, m̄)): from a reconstruction's " +
    "error model (so the quiet-Sun level's error, shared with the reference, cancels), or " +
    "from a series' uncertainties taken as independent. A reconstruction with an ensemble " +
    "gives one forcing member per member, each against its own reference mean, and the band " +
    "of those members; the reconstruction's statement of what its band contains is passed on. A spectral " +
    "reconstruction run's integral (over the covered range or a requested range) is converted " +
    "the same way, member by member when the run has an ensemble; a band integral over part " +
    "of the spectrum is not TSI, and the result states the range and that the rest of the " +
    "spectrum's variation is not included.",
  request: ForcingRequest,
  result: ForcingResult,
  runRefs: (p) =>
    p.reconstruction
      ? [p.reconstruction]
      : p.spectral_reconstruction
      ? [p.spectral_reconstruction.run]
      : [],
  estimateSeconds: estimateForcingSeconds,
  compute: computeForcing,
});
