/**
 * Analysis "energy-balance": temperature response of a one-box or two-box energy-balance
 * model to a forcing series or to a sinusoidal test forcing, with the analytic sinusoid
 * amplitude and lag beside the numerical ones (core/climate/energy_balance.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { EnergyBalanceRequest } from "./request.ts";
import { EnergyBalanceResult } from "./result.ts";
import { computeEnergyBalance } from "./compute.ts";
import { estimateEnergyBalanceSeconds } from "./estimate.ts";

export const energyBalanceKind = defineAnalysis({
  kind: "energy-balance",
  path: "/v1/energy-balance",
  // 3: the stated sources of the one-box defaults cite published work
  algorithmVersion: "3",
  tag: "Solar–climate linkage",
  summary: "Energy-balance temperature response to a forcing (one-box or two-box)",
  description: "Integrates C dT/dt = F − λT (one-box) or the two-box model with a deep ocean " +
    "(C dT/dt = F − λT − γ(T − T_d), C_d dT_d/dt = γ(T − T_d)) through a forcing series, " +
    "exactly for forcing linear between samples. Always reports the analytic steady-state " +
    "response to an 11-year (or the given) sinusoid; with a sinusoidal forcing the numerical " +
    "amplitude and lag are measured and reported beside the analytic ones.",
  request: EnergyBalanceRequest,
  result: EnergyBalanceResult,
  runRefs: (p) => (p.forcing_run ? [p.forcing_run] : []),
  estimateSeconds: estimateEnergyBalanceSeconds,
  compute: computeEnergyBalance,
});
