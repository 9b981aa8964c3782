/**
 * Records and proxies on calendar cells, as the proxy-model calibrations read them (TSI, and
 * spectral irradiance per band): a record's cell means inside a span, and each proxy averaged
 * into the same cells (core/series period means).
 *
 * @module
 */
import {
  type PeriodMeansByKey,
  periodMeansByKey,
  resampledAtPeriodKeys,
} from "../../../core/series/mod.ts";
import type { CalendarResolution } from "../../../core/time/mod.ts";
import type { StoredSeries } from "../../store/types.ts";
import type { YearSpan } from "./time_period.ts";

/** Means of a series per cell, over its points inside a span (decimal years, end exclusive). */
export function cellMeansWithin(
  s: StoredSeries,
  r: CalendarResolution,
  span: YearSpan,
): PeriodMeansByKey {
  const inside = (t: number) => t >= span.start && t < span.end;
  return periodMeansByKey({
    time: s.time.filter(inside),
    value: s.value.filter((_, i) => inside(s.time[i])),
  }, r);
}

/**
 * Each proxy series averaged into the cells `keys` with the coverage rule of core/series (a
 * monthly cell from daily values needs 20 of them; NaN where a proxy has no covered cell), and
 * the indices of the cells where every proxy has one.
 */
export function proxiesAtCells(
  termSeries: readonly StoredSeries[],
  resolution: CalendarResolution,
  keys: Int32Array,
): { values: Float64Array[]; complete: number[] } {
  const values = termSeries.map((s) => resampledAtPeriodKeys(s, s.resolution, resolution, keys));
  const complete: number[] = [];
  for (let i = 0; i < keys.length; i++) {
    if (values.every((v) => Number.isFinite(v[i]))) complete.push(i);
  }
  return { values, complete };
}
