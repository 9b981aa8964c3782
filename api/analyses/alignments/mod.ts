/**
 * Analysis "alignments": several series on one calendar axis, via same-period means and a
 * stated rule, reporting what was dropped (core/series/align_series.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { AlignRequest, MAX_ALIGNED } from "./request.ts";
import { AlignResult } from "./result.ts";
import { computeAlignments } from "./compute.ts";
import { estimateAlignmentsSeconds } from "./estimate.ts";

export const alignKind = defineAnalysis({
  kind: "alignments",
  path: "/v1/alignments",
  algorithmVersion: "1",
  tag: "Series operations",
  summary: "Align several series on one calendar time axis",
  description: "Turns each series into same-period means at the chosen resolution (with the " +
    "coverage rules of resampling), then keeps the periods the rule allows. The result " +
    "reports, per series, the periods dropped outside the common span and by the " +
    "intersection, and per period the count behind each value. Outputs `aligned_0`, " +
    "`aligned_1`, ... (in request order) are saved as new series.",
  request: AlignRequest,
  result: AlignResult,
  autoSave: Array.from({ length: MAX_ALIGNED }, (_, k) => `aligned_${k}`),
  estimateSeconds: estimateAlignmentsSeconds,
  compute: computeAlignments,
});
