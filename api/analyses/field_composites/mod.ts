/**
 * Analysis "field-composites": superposed-epoch composite maps of a gridded field around key
 * dates such as solar-cycle maxima and minima, with field significance by the false discovery
 * rate and by Monte Carlo with random epoch sets (core/field/field_composite.ts).
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import { FieldCompositeRequest } from "./request.ts";
import { FieldCompositeResult } from "./result.ts";
import { computeFieldComposite } from "./compute.ts";
import { fieldCompositeChart } from "./chart.ts";
import { fieldCompositeTasks } from "./tasks.ts";
import { estimateFieldCompositesSeconds } from "./estimate.ts";

export const fieldCompositeKind = defineAnalysis({
  kind: "field-composites",
  path: "/v1/field-composites",
  algorithmVersion: "1",
  tag: "Gridded fields",
  summary: "Composite maps of a gridded field around solar maxima/minima, with field significance",
  description: "Averages every cell over a window after each epoch (dates, or the maxima or " +
    "minima of a cycle table run), maps the mean over epochs (or the difference between two " +
    "sets, e.g. maxima minus minima) with Student's t per cell, and tests the map as a whole " +
    "by the false discovery rate (Benjamini & Hochberg 1995 at α_FDR = 2·α_global, Wilks " +
    "2016) and by Monte Carlo after Livezey & Chen (1983) with random epoch sets of the same " +
    "sizes and spacing, the same set for every cell (seeded; independent of the number of " +
    "workers). Download the map from /v1/runs/{id}/map.",
  request: FieldCompositeRequest,
  result: FieldCompositeResult,
  runRefs: (p) => (p.cycle_run ? [p.cycle_run] : []),
  fieldRefs: (p) => [{ id: p.field, pointer: "/field" }],
  estimateSeconds: estimateFieldCompositesSeconds,
  compute: computeFieldComposite,
  chart: fieldCompositeChart,
  tasks: fieldCompositeTasks,
});
