/**
 * Analysis "cycle-fits": the Hathaway, Wilson & Reichmann (1994) shape function fitted to every
 * complete cycle, with parameter uncertainties, and the Waldmeier relation across cycles
 * (core/cycles/cycle_shape_fit.ts, cycle_sequence_fit.ts, waldmeier_relation.ts). Its chart is
 * the generic one (the summed fitted curves).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { CycleFitsRequest } from "./request.ts";
import { CycleFitsResult } from "./result.ts";
import { computeCycleFits } from "./compute.ts";
import { estimateCycleFitsSeconds } from "./estimate.ts";

export const cycleFitsKind = defineAnalysis({
  kind: "cycle-fits",
  path: "/v1/cycle-fits",
  algorithmVersion: "2",
  tag: "Solar cycles",
  summary: "Cycle-shape fits with uncertainties and the Waldmeier relation",
  description: "Fits F(t) = a (t − t0)^3 / [exp((t − t0)^2 / b^2) − c], c = 0.71 (Hathaway, " +
    "Wilson & Reichmann 1994, Sol. Phys. 151, 177) to the monthly values of each complete " +
    "cycle of the table (as from POST /v1/cycles) by Levenberg–Marquardt least squares. " +
    "Parameter standard errors come from the Jacobian at the solution, (JᵀJ)⁻¹s², and are also " +
    "given inflated for the residuals' lag-1 autocorrelation. The Waldmeier relation (rise " +
    "time against amplitude) is fitted across cycles, both for the observed smoothed cycles and " +
    "for the fitted curves. For version 2 sunspot numbers, b(a) and the published relation are " +
    "evaluated on the version 1 scale (0.6 × the values).",
  request: CycleFitsRequest,
  result: CycleFitsResult,
  estimateSeconds: estimateCycleFitsSeconds,
  compute: computeCycleFits,
});
