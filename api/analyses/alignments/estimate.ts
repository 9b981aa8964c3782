/**
 * Cost model of the "alignments" analysis: period means of every series and their common
 * axis, seconds on one core of the reference machine (api/runs/estimate.ts).
 *
 * @module
 */
import type { EstimateInputs } from "../../runs/kind.ts";
import { pointsOf } from "../common/cost_model.ts";
import type { AlignParams } from "./request.ts";

/** Seconds to align the series. */
export function estimateAlignmentsSeconds(p: AlignParams, inputs: EstimateInputs): number {
  const points = p.series.reduce((sum: number, s: unknown) => sum + pointsOf(inputs, s), 0);
  return 0.001 + 1.6e-6 * points;
}
