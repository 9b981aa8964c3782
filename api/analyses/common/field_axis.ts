/**
 * A gridded field and series on one calendar axis, for the field analyses: the series are
 * brought onto the field's monthly or annual axis with the same alignment as the
 * single-series analyses (analysis_axis.ts: same-period means, then the longest stretch where
 * every input has a value), and the field is cut to that stretch without a copy.
 *
 * How it works: the field takes part in the alignment as a series whose value is its time
 * step's index, so the aligned values say which steps form the common stretch (a field with
 * two steps in one period is refused rather than averaged).
 *
 * @module
 */
import { InputProblem, type LoadedField } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import type { GriddedField } from "../../../core/field/mod.ts";
import { type AnalysisAxis, analysisAxis } from "./analysis_axis.ts";

/** A field and series on one axis. */
export interface FieldOnAxis {
  /** The common axis; `values` holds the series given, in order (not the field). */
  axis: AnalysisAxis;
  /** The field over the axis (a view into the loaded values). */
  field: GriddedField;
  /** Stored step indices of the axis' first and one-past-last steps. */
  steps: [number, number];
}

/**
 * A loaded field as core's GriddedField (a view, no copy): its loaded steps, or `nTime` steps
 * of `values` when given, with the cell bounds when the field has both.
 */
export function griddedFieldOf(
  f: LoadedField,
  values: Float32Array = f.values,
  nTime = f.time.length,
): GriddedField {
  return {
    values,
    nTime,
    lat: f.lat,
    lon: f.lon,
    ...(f.lat_bounds && f.lon_bounds ? { latBounds: f.lat_bounds, lonBounds: f.lon_bounds } : {}),
  };
}

/** The calendar resolution of a field's axis, or a problem at `pointer`. */
export function fieldResolution(f: LoadedField, pointer: string): "monthly" | "annual" {
  const r = f.meta.resolution;
  if (r !== "monthly" && r !== "annual") {
    throw new InputProblem(
      pointer,
      `field ${f.meta.id} is ${r}; the field analyses take monthly or annual fields ` +
        "(average a daily field to monthly means first)",
    );
  }
  return r;
}

/**
 * Put a loaded field and series on the field's calendar axis.
 *
 * @param f the loaded field
 * @param fieldPointer where the request names the field
 * @param series the series (e.g. the solar series, then controls)
 * @param pointers where the request names each series
 * @param coverage the alignment's coverage rules
 * @param minPoints fewest common periods
 * @throws {InputProblem} when the field is not monthly or annual, a series is coarser, or the
 *   inputs overlap in fewer than `minPoints` periods
 */
export function fieldOnAxis(
  f: LoadedField,
  fieldPointer: string,
  series: StoredSeries[],
  pointers: string[],
  coverage: { min_days_per_month: number; min_months_per_year: number },
  minPoints: number,
): FieldOnAxis {
  const resolution = fieldResolution(f, fieldPointer);
  const index: StoredSeries = {
    id: `${f.meta.id}#steps`,
    name: f.meta.name,
    quantity: "other",
    units: "1",
    description: null,
    source: null,
    version: null,
    resolution,
    n: f.time.length,
    start: f.time[0],
    end: f.time[f.time.length - 1],
    derived_from: null,
    created_at: f.meta.created_at,
    time: f.time,
    value: Float64Array.from(f.time, (_, k) => k),
    uncertainty: null,
  };
  const axis = analysisAxis(
    [...series, index],
    [...pointers, fieldPointer],
    resolution,
    coverage,
    minPoints,
  );
  const idx = axis.values[axis.values.length - 1];
  for (let k = 0; k < idx.length; k++) {
    if (idx[k] !== idx[0] + k) {
      throw new InputProblem(
        fieldPointer,
        `field ${f.meta.id} has more than one time step in the ${resolution} period ` +
          `${k}; the field analyses need one step per period`,
      );
    }
  }
  const a = idx[0], n = idx.length;
  const cells = f.lat.length * f.lon.length;
  return {
    axis: { ...axis, values: axis.values.slice(0, -1) },
    field: griddedFieldOf(f, f.values.subarray(a * cells, (a + n) * cells), n),
    steps: [f.stepStart + a, f.stepStart + a + n],
  };
}

/**
 * The span of time a field analysis needs: where all the given series overlap (decimal
 * years), widened by a year on each side so that the periods at the ends are whole.
 */
export function seriesSpan(series: StoredSeries[]): { from: number; to: number } {
  let from = -Infinity, to = Infinity;
  for (const s of series) {
    from = Math.max(from, s.start);
    to = Math.min(to, s.end);
  }
  return { from: from - 1, to: to + 1 };
}
