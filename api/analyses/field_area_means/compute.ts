/**
 * Adapter of the "field-area-means" analysis: the region's membership, the area weights (cell
 * areas from bounds, or cos latitude) and the weighted mean with its coverage rule, from core
 * (core/field/area_weighted_mean.ts); the mean becomes a series output, saved as a stored
 * series with the run as its origin.
 *
 * @module
 */
import { InputProblem, type RunContext } from "../../runs/kind.ts";
import {
  type AreaRegion,
  areaWeightedMean,
  cosLatitudeWeights,
  fieldAreaWeights,
  type GriddedField,
} from "../../../core/field/mod.ts";
import { CAUTION_REVIEW } from "../common/cautions.ts";
import { withInputPointers } from "../common/input_problem.ts";
import { griddedFieldOf } from "../common/field_axis.ts";
import { undefinedAsNull } from "../common/undefined_as_null.ts";
import type { FieldAreaMeanParams } from "./request.ts";
import type { FieldAreaMeanResultIn } from "./result.ts";

/** The core region of the request (a mask field's first step read as shares). */
function region(p: FieldAreaMeanParams, ctx: RunContext, cells: number): AreaRegion {
  const r = p.region;
  if (r.kind !== "mask") return r;
  const m = ctx.field(r.mask_field);
  if (m.lat.length * m.lon.length !== cells) {
    throw new InputProblem(
      "/region/mask_field",
      `the mask field has ${m.lat.length} × ${m.lon.length} cells, the field ${cells}`,
    );
  }
  const mask = Float64Array.from(m.values.subarray(0, cells), (v) => (Number.isNaN(v) ? 0 : v));
  return { kind: "mask", mask };
}

function describeRegion(r: FieldAreaMeanParams["region"]): string {
  switch (r.kind) {
    case "globe":
      return "globe";
    case "band":
      return `${r.south}..${r.north}° N`;
    case "box":
      return `${r.south}..${r.north}° N, ${r.west}..${r.east}° E`;
    case "mask":
      return "mask field";
  }
}

/** Average the field over the region, step by step. */
export function computeFieldAreaMean(
  p: FieldAreaMeanParams,
  ctx: RunContext,
): FieldAreaMeanResultIn {
  const f = ctx.field(p.field);
  const field: GriddedField = griddedFieldOf(f);
  const fromBounds = p.weights === "auto" && f.lat_bounds !== null && f.lon_bounds !== null;
  const weights = fromBounds ? fieldAreaWeights(field) : cosLatitudeWeights(f.lat, f.lon.length);
  const m = withInputPointers(
    { "*": "/region" },
    () =>
      areaWeightedMean(field, {
        region: region(p, ctx, f.lat.length * f.lon.length),
        weights,
        minCoverage: p.min_coverage,
        shouldStop: ctx.cancelled,
      }),
  );
  const where = describeRegion(p.region);
  const warnings: string[] = [];
  if (m.undefinedSteps > 0) {
    warnings.push(
      `${m.undefinedSteps} of ${field.nTime} time steps cover less than ${
        100 * p.min_coverage
      } % of the region and have no mean (null)`,
    );
  }
  if (m.undefinedSteps === field.nTime) {
    throw new InputProblem(
      "/min_coverage",
      `no time step covers ${100 * p.min_coverage} % of the region; lower min_coverage or ` +
        "choose another region",
    );
  }
  const time = Array.from(f.time);
  let cover = 0;
  for (const c of m.coverage) cover += c;
  return {
    field: {
      id: f.meta.id,
      name: f.meta.name,
      units: f.meta.units,
      calendar: f.meta.info.calendar,
    },
    region: p.region,
    weights: fromBounds ? "cell_areas_from_bounds" : "cos_latitude",
    min_coverage: p.min_coverage,
    cells_in_region: m.cells,
    region_weight: m.regionWeight,
    steps: field.nTime,
    undefined_steps: m.undefinedSteps,
    mean_coverage: cover / field.nTime,
    outputs: {
      area_mean: {
        name: p.name ?? `${f.meta.name}, area mean over ${where}`,
        quantity: f.meta.quantity,
        units: f.meta.units,
        time,
        value: undefinedAsNull(m.mean),
        description:
          `Area-weighted mean (${
            fromBounds ? "cell areas from bounds" : "cos latitude weights"
          }) of field ${f.meta.id} over ${where}; missing cells skipped with the weights ` +
          `renormalised; null where under ${100 * p.min_coverage} % of the region is covered.`,
      },
      coverage: {
        name: `Covered share of ${where} in ${f.meta.name}`,
        quantity: "other",
        units: "1",
        time,
        value: Array.from(m.coverage),
        description: "Share of the region's area with a value at each time step",
      },
    },
    warnings,
    cautions: [CAUTION_REVIEW],
  };
}
