/**
 * Ensemble benchmarks (deno bench) on the daily 1700–2025 case of ensemble_case.ts: one chunk
 * of 25 members (the unit a worker draws), the plan, and the analytic band with its error
 * model. The whole 1,000-member ensemble beside numpy: ensemble_medians.ts and
 * ensemble_numpy.py.
 */
import {
  drawReconstructionMembers,
  reconstructFromProxies,
  reconstructionEnsemblePlan,
} from "../../core/irradiance/mod.ts";
import { ensembleCase } from "./ensemble_case.ts";

const { model, cells } = ensembleCase();
const plan = reconstructionEnsemblePlan(model, cells);

Deno.bench("ensemble: 25 members × 119,069 days (one worker chunk)", () => {
  drawReconstructionMembers(plan, 1, 0, 25);
});

Deno.bench("ensemble plan: Cholesky factors and processes, 119,069 days", () => {
  reconstructionEnsemblePlan(model, cells);
});

Deno.bench("analytic band and error model, 119,069 days", () => {
  reconstructFromProxies(model, cells, 1.96);
});
