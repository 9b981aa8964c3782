/**
 * The CF time coordinate of a NetCDF file, decoded: its calendar, units, dates, cell bounds
 * (CF conventions 1.10, §4.4 time coordinates, §7.1 `bounds`, which share the coordinate's
 * units and calendar), and its place on sunlag's time axis (decimal years on the proleptic
 * Gregorian calendar).
 *
 * Placing model calendars (noleap, all_leap, 360_day) on sunlag's axis, the inverse of
 * `calendarAxis` (core/cf):
 * - cells that are whole calendar months (from the bounds) → the middle of the same month;
 *   whole years → the middle of the same year; whole days → noon of the same date (a date
 *   the Gregorian calendar lacks, such as 30 February, is refused);
 * - no bounds, at most one time per calendar month → the same fraction of the same month
 *   (`month_position`); otherwise the same date and time of day.
 * Real-world calendars (standard, proleptic_gregorian, julian) are exact: a cell's middle, or
 * the instant when there are no bounds.
 *
 * @module
 */
import { attributeText } from "../../core/cf/netcdf_model.ts";
import { cfMaskAndScale } from "../../core/cf/cf_mask_and_scale.ts";
import {
  astronomicalYear,
  type CfCalendar,
  type CfDateTime,
  cfDateTimeToDecimalYear,
  cfDayNumber,
  CfTimeError,
  decimalYearFromEpochDays,
  decodeCfTime,
  isRealWorldCalendar,
  parseCfCalendar,
  parseCfTimeUnits,
} from "../../core/time/mod.ts";
import { periodOfKey } from "../../core/series/period_key.ts";
import { NetcdfError, shown } from "./errors.ts";
import type { NetcdfSource } from "./source.ts";
import { packingOf } from "./cf_variables.ts";

/** How the file's dates were placed on sunlag's axis. */
export type TimePlacement =
  | "exact"
  | "same_month"
  | "same_year"
  | "same_date"
  | "month_position";

/** A decoded CF time coordinate. */
export interface CfTimeAxis {
  /** The time dimension (and coordinate variable) name. */
  dimension: string;
  calendar: CfCalendar;
  /** The `units` attribute as written. */
  units: string;
  /** The `calendar` attribute as written, or null when absent (standard by default). */
  calendarAttribute: string | null;
  dates: CfDateTime[];
  /** Cell bounds from the `bounds` variable, or null. */
  bounds: [CfDateTime, CfDateTime][] | null;
  /** Name of the bounds variable, or null. */
  boundsVariable: string | null;
}

/** A time axis with its place on sunlag's axis. */
export interface CfPlacedTimeAxis extends CfTimeAxis {
  /** Each time on sunlag's axis (decimal years, proleptic Gregorian). */
  decimalYears: Float64Array;
  placement: TimePlacement;
}

function badTime(v: string, what: string, e?: unknown): NetcdfError {
  const why = e instanceof CfTimeError ? e.message : what;
  return new NetcdfError("bad_coordinate", `Time coordinate "${shown(v)}": ${why}`, {
    variable: v,
  });
}

/**
 * Read and decode the time coordinate of a dimension.
 *
 * @param src the open file
 * @param dimension the time dimension (its coordinate variable has the same name)
 * @returns the decoded axis (dates on its own calendar; see {@link placeCfTimeAxis})
 * @throws {NetcdfError} `bad_coordinate` for missing or undecodable units or calendar,
 *   non-finite or not strictly increasing times, or bounds of the wrong shape
 */
export async function readCfTimeAxis(src: NetcdfSource, dimension: string): Promise<CfTimeAxis> {
  const v = src.header.variables.find((x) => x.name === dimension);
  if (!v) throw badTime(dimension, "there is no coordinate variable for this dimension");
  const units = attributeText(v.attributes, "units");
  if (units === undefined) throw badTime(dimension, 'it has no "units" attribute');
  const calAttr = attributeText(v.attributes, "calendar") ?? null;
  let calendar: CfCalendar;
  let dates: CfDateTime[];
  let parsed;
  try {
    calendar = parseCfCalendar(calAttr);
    parsed = parseCfTimeUnits(units, calendar);
    const raw = cfMaskAndScale(await src.read(dimension), v.type, packingOf(v)).values;
    dates = decodeCfTime(raw, parsed, calendar);
  } catch (e) {
    if (e instanceof CfTimeError) throw badTime(dimension, "", e);
    throw e;
  }
  const n = dates.length;
  const day = (d: CfDateTime) => cfDayNumber(calendar, d.year, d.month, d.day) + d.seconds / 86400;
  for (let i = 1; i < n; i++) {
    if (!(day(dates[i]) > day(dates[i - 1]))) {
      throw badTime(
        dimension,
        `times must be strictly increasing; time[${i}] is not after time[${i - 1}]`,
      );
    }
  }
  const boundsName = attributeText(v.attributes, "bounds") ?? null;
  let bounds: [CfDateTime, CfDateTime][] | null = null;
  if (boundsName !== null) {
    const b = src.header.variables.find((x) => x.name === boundsName);
    if (!b || b.shape.length !== 2 || b.shape[0] !== n || b.shape[1] !== 2) {
      throw badTime(
        dimension,
        `its bounds variable "${shown(boundsName)}" is missing or not (${n}, 2)`,
      );
    }
    try {
      const raw = cfMaskAndScale(await src.read(boundsName), b.type, packingOf(b)).values;
      const d = decodeCfTime(raw, parsed, calendar);
      bounds = [];
      for (let i = 0; i < n; i++) {
        if (!(day(d[2 * i + 1]) > day(d[2 * i]))) {
          throw badTime(
            dimension,
            `cell ${i} of "${shown(boundsName)}" does not end after it starts`,
          );
        }
        bounds.push([d[2 * i], d[2 * i + 1]]);
      }
    } catch (e) {
      if (e instanceof CfTimeError) throw badTime(boundsName, "", e);
      throw e;
    }
  }
  return {
    dimension,
    calendar,
    units,
    calendarAttribute: calAttr,
    dates,
    bounds,
    boundsVariable: bounds ? boundsName : null,
  };
}

/**
 * Place a decoded time axis on sunlag's axis (rules in the module doc).
 *
 * @param axis the decoded axis
 * @returns the axis with its decimal years and the rule used
 * @throws {NetcdfError} `bad_coordinate` for a date with no place on sunlag's axis (e.g. a
 *   daily 360_day axis, whose 30 February has no Gregorian twin)
 */
export function placeCfTimeAxis(axis: CfTimeAxis): CfPlacedTimeAxis {
  const { decimalYears, placement } = place(axis.dimension, axis.dates, axis.bounds, axis.calendar);
  return { ...axis, decimalYears, placement };
}

function isMonthStart(d: CfDateTime): boolean {
  return d.day === 1 && d.seconds === 0;
}

function place(
  name: string,
  dates: CfDateTime[],
  bounds: [CfDateTime, CfDateTime][] | null,
  cal: CfCalendar,
): { decimalYears: Float64Array; placement: TimePlacement } {
  const n = dates.length;
  const out = new Float64Array(n);
  const guard = (f: () => void) => {
    try {
      f();
    } catch (e) {
      if (e instanceof CfTimeError) throw badTime(name, "", e);
      throw e;
    }
  };
  if (isRealWorldCalendar(cal)) {
    guard(() => {
      for (let i = 0; i < n; i++) {
        if (bounds) {
          const [a, b] = bounds[i];
          const da = cfDayNumber(cal, a.year, a.month, a.day) + a.seconds / 86400;
          const db = cfDayNumber(cal, b.year, b.month, b.day) + b.seconds / 86400;
          out[i] = decimalYearFromEpochDays((da + db) / 2);
        } else out[i] = cfDateTimeToDecimalYear(dates[i], cal);
      }
    });
    return { decimalYears: out, placement: "exact" };
  }
  if (bounds) {
    const months = bounds.every(([a, b]) =>
      isMonthStart(a) && isMonthStart(b) &&
      astronomicalYear(cal, b.year) * 12 + b.month -
            (astronomicalYear(cal, a.year) * 12 + a.month) === 1
    );
    if (months) {
      for (let i = 0; i < n; i++) {
        const a = bounds[i][0];
        out[i] = periodOfKey(astronomicalYear(cal, a.year) * 12 + a.month - 1, "monthly").middle;
      }
      return { decimalYears: out, placement: "same_month" };
    }
    const years = bounds.every(([a, b]) =>
      isMonthStart(a) && a.month === 1 && isMonthStart(b) && b.month === 1 && b.year === a.year + 1
    );
    if (years) {
      for (let i = 0; i < n; i++) out[i] = astronomicalYear(cal, bounds[i][0].year) + 0.5;
      return { decimalYears: out, placement: "same_year" };
    }
    const days = bounds.every(([a, b]) =>
      a.seconds === 0 && b.seconds === 0 &&
      cfDayNumber(cal, b.year, b.month, b.day) - cfDayNumber(cal, a.year, a.month, a.day) === 1
    );
    if (days) {
      guard(() => {
        for (let i = 0; i < n; i++) {
          const a = bounds[i][0];
          out[i] = cfDateTimeToDecimalYear({ ...a, seconds: 43200 }, cal, "date");
        }
      });
      return { decimalYears: out, placement: "same_date" };
    }
  }
  let monthly = n >= 2;
  for (let i = 1; i < n && monthly; i++) {
    const a = dates[i - 1], b = dates[i];
    if (a.year === b.year && a.month === b.month) monthly = false;
  }
  guard(() => {
    for (let i = 0; i < n; i++) {
      out[i] = cfDateTimeToDecimalYear(dates[i], cal, monthly ? "month_position" : "date");
    }
  });
  return { decimalYears: out, placement: monthly ? "month_position" : "same_date" };
}

/** Text for reports: how a placement maps the file's calendar onto sunlag's axis. */
export function describePlacement(p: TimePlacement, cal: CfCalendar): string {
  switch (p) {
    case "exact":
      return `exact: ${cal} dates name real days`;
    case "same_month":
      return `monthly cells on the ${cal} calendar placed at the middle of the same month`;
    case "same_year":
      return `annual cells on the ${cal} calendar placed at the middle of the same year`;
    case "same_date":
      return `${cal} dates kept as the same date and time of day`;
    case "month_position":
      return `${cal} times placed at the same fraction of the same month`;
  }
}
