/**
 * Analysis "field-area-means": the area-weighted mean of a gridded field over the globe, a
 * zonal band, a latitude/longitude box or a mask field, with a coverage rule; the mean is saved
 * as a stored series with the run as its lineage, usable by every series analysis.
 *
 * @module
 */
import { defineAnalysis } from "../../runs/kind.ts";
import type { FieldRef } from "../../runs/kind.ts";
import { FieldAreaMeanRequest } from "./request.ts";
import { FieldAreaMeanResult } from "./result.ts";
import { computeFieldAreaMean } from "./compute.ts";
import { estimateFieldAreaMeansSeconds } from "./estimate.ts";

export const fieldAreaMeanKind = defineAnalysis({
  kind: "field-area-means",
  path: "/v1/field-area-means",
  algorithmVersion: "1",
  tag: "Gridded fields",
  summary: "Area-weighted mean of a gridded field over a region, saved as a series",
  description: "Weights each cell by its area (from the latitude and longitude bounds when the " +
    "field has them, else cos latitude), takes the cells of the region (globe, zonal band, " +
    "box, or the shares of a mask field), skips missing cells and renormalises the weights at " +
    "each time step, and gives a mean only where the covered share of the region reaches " +
    "min_coverage. The mean (output `area_mean`) is stored as a series derived from this run, " +
    "with its coverage as a second output.",
  request: FieldAreaMeanRequest,
  result: FieldAreaMeanResult,
  autoSave: ["area_mean"],
  fieldRefs(p) {
    const refs: FieldRef[] = [{ id: p.field, pointer: "/field" }];
    if (p.region.kind === "mask") {
      refs.push({ id: p.region.mask_field, pointer: "/region/mask_field", firstSteps: 1 });
    }
    return refs;
  },
  estimateSeconds: estimateFieldAreaMeansSeconds,
  compute: computeFieldAreaMean,
});
