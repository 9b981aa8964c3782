/**
 * A monthly or annual series on its gap-free calendar grid (core/cycles/regular_grid.ts), the
 * form the solar-cycle analyses (smoothing, cycles, spectra) work on; other resolutions are
 * refused with a pointer at the series.
 *
 * @module
 */
import { InputProblem } from "../../runs/kind.ts";
import type { StoredSeries } from "../../store/types.ts";
import { type RegularGrid, toRegularGrid } from "../../../core/cycles/mod.ts";
import { withInputPointers } from "./input_problem.ts";

/** The series on a gap-free monthly or annual grid (NaN = missing). */
export function activityGrid(s: StoredSeries): RegularGrid {
  if (s.resolution !== "monthly" && s.resolution !== "annual") {
    throw new InputProblem(
      "/series",
      `series resolution is ${s.resolution}; solar-cycle analyses need monthly or annual ` +
        "values (average daily values first with POST /v1/resampling)",
      { resolution: s.resolution },
    );
  }
  const resolution = s.resolution;
  return withInputPointers({ "*": "/series" }, () => toRegularGrid(s.time, s.value, resolution));
}
