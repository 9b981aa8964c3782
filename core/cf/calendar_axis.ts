/**
 * A series' time axis on a target CF calendar: the cell bounds and time coordinate of each
 * period mean (or instant) of a proleptic Gregorian series, as day numbers on the target
 * calendar (CF conventions 1.10, §4.4.1 calendars, §7.1 cell boundaries).
 *
 * Rules (sunlag's, stated so they can be checked):
 * - real-world targets (standard, proleptic_gregorian, julian): the same days. A monthly mean
 *   over Gregorian March 1600 keeps exactly those days; on `julian` its bounds read
 *   1600-02-20..1600-03-21. Nothing is dropped.
 * - idealised targets (noleap, all_leap, 360_day), monthly and annual series: calendar-month
 *   regridding. Each period mean is assigned to the same month (year) of the target calendar,
 *   its value unchanged, its bounds that calendar's month (year): a 360_day month is 30 days,
 *   a noleap February 28. This is how period-mean forcing is moved onto model calendars
 *   (xarray's `convert_calendar(..., align_on="date")` keeps the same months the same way).
 * - idealised targets, daily series and instants: the same calendar date. noleap has no
 *   29 February: those values are dropped and counted. all_leap keeps every date (its
 *   29 February of common years stays empty). 360_day cannot hold daily data without
 *   inventing or deleting days (it has 30 February and no 31st): refused.
 *
 * @module
 */
import {
  calendarInstant,
  type CalendarResolution,
  type CfCalendar,
  cfDayNumber,
  cfMonthBounds,
  CfTimeError,
  cfYearBounds,
  daysFromCivil,
  isRealWorldCalendar,
  type TimeResolution,
} from "../time/mod.ts";
import { periodKey } from "../series/period_key.ts";

/** A series' time axis placed on a CF calendar. */
export interface CalendarAxis {
  calendar: CfCalendar;
  /** Indices of the input points kept, increasing. */
  kept: Int32Array;
  /** Time coordinate of each kept point (cell middle, or the instant), day numbers. */
  time: Float64Array;
  /** Cell bounds `[start, end)` of each kept point as day numbers, or null for instants. */
  start: Float64Array | null;
  end: Float64Array | null;
  /** Input indices dropped because the target calendar lacks their date. */
  dropped: number[];
  /** One or two sentences saying how the axis was made, for the output's metadata. */
  method: string;
}

const MONTH_LENGTH_NOTE: Partial<Record<CfCalendar, string>> = {
  noleap: "365-day years, February of 28 days",
  all_leap: "366-day years, February of 29 days",
  "360_day": "twelve 30-day months",
};

/**
 * Place a proleptic Gregorian series on a target CF calendar (rules in the module doc).
 *
 * @param time decimal years (proleptic Gregorian), strictly increasing, finite
 * @param resolution the series' resolution (`inferResolution`); monthly and annual series are
 *   period means, daily series day means, irregular series instants
 * @param calendar the target calendar
 * @returns the axis, with the method described
 * @throws {CfTimeError} code `not_representable` (field `calendar`) when the target cannot hold
 *   the series' resolution (daily or finer data on 360_day), or when nothing is left
 * @example
 * ```ts
 * import { calendarAxis } from "./calendar_axis.ts";
 * import { cfDayNumber } from "../time/mod.ts";
 * import assert from "node:assert/strict";
 * // February 2000 (a monthly mean, mid-February) on 360_day: 30 days, value kept.
 * const a = calendarAxis([2000 + 45.5 / 366], "monthly", "360_day");
 * assert.equal(a.start![0], cfDayNumber("360_day", 2000, 2, 1));
 * assert.equal(a.end![0] - a.start![0], 30);
 * assert.equal(a.time[0], a.start![0] + 15);
 * ```
 */
export function calendarAxis(
  time: ArrayLike<number>,
  resolution: TimeResolution,
  calendar: CfCalendar,
): CalendarAxis {
  const n = time.length;
  const real = isRealWorldCalendar(calendar);
  if (!real && calendar === "360_day" && (resolution === "daily" || resolution === "irregular")) {
    throw new CfTimeError(
      "not_representable",
      "calendar",
      calendar,
      `Cannot write a ${resolution} series on the 360_day calendar: it has 30 February and no ` +
        "31st, so daily values would have to be moved, invented or deleted; choose noleap, " +
        "all_leap or a real-world calendar, or resample the series to monthly means first",
    );
  }
  const kept: number[] = [], dropped: number[] = [];
  const t: number[] = [], s: number[] = [], e: number[] = [];
  const bounded = resolution !== "irregular";
  for (let i = 0; i < n; i++) {
    const cell = bounded
      ? cellOn(time[i], resolution as CalendarResolution, calendar, real)
      : instantOn(time[i], calendar, real);
    if (cell === null) {
      dropped.push(i);
      continue;
    }
    kept.push(i);
    s.push(cell[0]);
    e.push(cell[1]);
    t.push(bounded ? (cell[0] + cell[1]) / 2 : cell[0]);
  }
  if (kept.length === 0) {
    throw new CfTimeError(
      "not_representable",
      "calendar",
      calendar,
      `Cannot write the series on the ${calendar} calendar: none of its ${n} dates exist there`,
    );
  }
  return {
    calendar,
    kept: Int32Array.from(kept),
    time: Float64Array.from(t),
    start: bounded ? Float64Array.from(s) : null,
    end: bounded ? Float64Array.from(e) : null,
    dropped,
    method: describe(calendar, resolution, dropped.length, n > 0 ? time[0] : 0),
  };
}

function cellOn(
  t: number,
  resolution: CalendarResolution,
  calendar: CfCalendar,
  real: boolean,
): [number, number] | null {
  const key = periodKey(t, resolution);
  if (resolution === "annual") {
    if (real) return [daysFromCivil(key, 1, 1), daysFromCivil(key + 1, 1, 1)];
    const b = cfYearBounds(calendar, key);
    return [b.start, b.end];
  }
  if (resolution === "monthly") {
    const y = Math.floor(key / 12), m = key - 12 * y + 1;
    if (real) {
      return [
        daysFromCivil(y, m, 1),
        m === 12 ? daysFromCivil(y + 1, 1, 1) : daysFromCivil(y, m + 1, 1),
      ];
    }
    const b = cfMonthBounds(calendar, y, m);
    return [b.start, b.end];
  }
  if (real) return [key, key + 1];
  const c = calendarInstant(t);
  if (calendar === "noleap" && c.month === 2 && c.day === 29) return null;
  const d = cfDayNumber(calendar, c.year, c.month, c.day);
  return [d, d + 1];
}

function instantOn(t: number, calendar: CfCalendar, real: boolean): [number, number] | null {
  const c = calendarInstant(t);
  const g = daysFromCivil(c.year, c.month, c.day);
  if (real) return [g + c.fractionOfDay, g + c.fractionOfDay];
  if (calendar === "noleap" && c.month === 2 && c.day === 29) return null;
  const d = cfDayNumber(calendar, c.year, c.month, c.day) + c.fractionOfDay;
  return [d, d];
}

function describe(cal: CfCalendar, res: TimeResolution, dropped: number, t0: number): string {
  const what = res === "monthly"
    ? "monthly mean"
    : res === "annual"
    ? "annual mean"
    : res === "daily"
    ? "daily value"
    : "instant";
  if (cal === "proleptic_gregorian") {
    return "No calendar conversion: sunlag's time axis is the proleptic Gregorian calendar.";
  }
  if (cal === "standard") {
    return "Same days: each " + what + " keeps the days it covers on sunlag's proleptic " +
      "Gregorian axis; the mixed Julian/Gregorian calendar has the same dates from 1582-10-15 on" +
      (t0 < 1582.79 ? " and shows earlier days with their Julian dates." : ".");
  }
  if (cal === "julian") {
    return "Same days: each " + what + " keeps the days it covers on sunlag's proleptic " +
      "Gregorian axis, shown with their Julian dates (10 to 13 days earlier from 1582 to 2099).";
  }
  if (res === "monthly" || res === "annual") {
    const unit = res === "monthly" ? "month" : "year";
    return `Calendar-${unit} regridding: each ${what} is assigned to the same ${unit} of the ` +
      `${cal} calendar (${MONTH_LENGTH_NOTE[cal]}) with its value unchanged; time_bnds are ` +
      `that calendar's ${unit} bounds.`;
  }
  if (cal === "noleap") {
    return `Same calendar date: each ${what} keeps its date and time of day; ${dropped} ` +
      "value(s) on 29 February were dropped (the noleap calendar has no 29 February).";
  }
  return `Same calendar date: each ${what} keeps its date and time of day; 29 February of ` +
    "common years has no value.";
}
