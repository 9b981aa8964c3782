/**
 * Checks of the series an irradiance analysis takes: a sunspot-number series must declare its
 * version (version 2 differs from version 1 by about 1/0.6: Clette et al. 2014), and
 * calendar-cell analyses need a daily, monthly or annual axis.
 *
 * @module
 */
import type { CalendarResolution } from "../../../core/time/mod.ts";
import type { StoredSeries } from "../../store/types.ts";
import { InputProblem } from "../../runs/kind.ts";

/** The version of a sunspot-number series, or a 422 at `pointer`. */
export function requireSunspotVersion(s: StoredSeries, pointer: string): string {
  if (s.quantity !== "sunspot_number" && s.quantity !== "sunspot_group_number") {
    throw new InputProblem(
      pointer,
      `series ${s.id} has quantity ${s.quantity}; a sunspot_number (or sunspot_group_number) series is needed`,
      { quantity: s.quantity },
    );
  }
  if (!s.version) {
    throw new InputProblem(
      pointer,
      `series ${s.id} ("${s.name}") does not declare its version (e.g. "1" or "2" for the international sunspot number); version 2 differs from version 1 by a factor of about 1/0.6`,
    );
  }
  return s.version;
}

/** The calendar resolution of a stored series, or a 422 at `pointer` for irregular axes. */
export function calendarResolutionOf(s: StoredSeries, pointer: string): CalendarResolution {
  if (s.resolution === "irregular") {
    throw new InputProblem(
      pointer,
      `series ${s.id} ("${s.name}") has an irregular time axis; daily, monthly or annual series are needed`,
      { resolution: s.resolution },
    );
  }
  return s.resolution;
}

/** A series of a given quantity, or a 422 at `pointer`. */
export function requireQuantity(s: StoredSeries, quantity: string, pointer: string): StoredSeries {
  if (s.quantity !== quantity) {
    throw new InputProblem(
      pointer,
      `series ${s.id} has quantity ${s.quantity}; a ${quantity} series is needed`,
      { quantity: s.quantity },
    );
  }
  return s;
}
