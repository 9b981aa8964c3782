/**
 * From decimal years back to ISO 8601: formatting at a resolution and calendar period bounds.
 *
 * @module
 */
import {
  civilFromDays,
  daysBeforeMonth,
  daysFromCivil,
  daysInMonth,
  daysInYear,
} from "./calendar.ts";
import { calendarInstant } from "./decimal_year.ts";
import type { TimeResolution } from "./resolution.ts";

/**
 * Format a decimal year as an ISO 8601 string at a resolution: `YYYY` (annual), `YYYY-MM`
 * (monthly), `YYYY-MM-DD` (daily), or a UTC date-time `YYYY-MM-DDThh:mm:ss[.sss]Z` rounded to
 * the millisecond (irregular). Each names the calendar period that contains the time, so
 * `parseIsoTime(formatIsoTime(t, r))` returns the period's middle, which is `t` itself for a
 * series at that resolution. Years outside 0..9999 use the signed expanded form `±YYYYYY`.
 *
 * @param t decimal year; finite
 * @param resolution the resolution to format at
 * @returns the ISO 8601 string
 * @throws {RangeError} when t is not finite
 * @example
 * ```ts
 * import { formatIsoTime } from "./format_iso_time.ts";
 * import assert from "node:assert/strict";
 * assert.equal(formatIsoTime(1996.5, "annual"), "1996");
 * assert.equal(formatIsoTime(1996.62, "monthly"), "1996-08");
 * assert.equal(formatIsoTime(2024 + 60.5 / 366, "daily"), "2024-03-01");
 * assert.equal(formatIsoTime(2024 + 0.25 / 366, "irregular"), "2024-01-01T06:00:00Z");
 * ```
 */
export function formatIsoTime(t: number, resolution: TimeResolution): string {
  const c = calendarInstant(t);
  const y = formatYear(c.year);
  if (resolution === "annual") return y;
  if (resolution === "monthly") return `${y}-${pad(c.month, 2)}`;
  if (resolution === "daily") return `${y}-${pad(c.month, 2)}-${pad(c.day, 2)}`;
  let days = daysFromCivil(c.year, c.month, c.day);
  let ms = Math.round(c.fractionOfDay * 86_400_000);
  if (ms >= 86_400_000) {
    days += 1;
    ms -= 86_400_000;
  }
  const d = civilFromDays(days);
  const hh = Math.floor(ms / 3_600_000), mm = Math.floor(ms / 60_000) % 60;
  const ss = Math.floor(ms / 1000) % 60, milli = ms % 1000;
  return `${formatYear(d.year)}-${pad(d.month, 2)}-${pad(d.day, 2)}T${pad(hh, 2)}:${pad(mm, 2)}:${
    pad(ss, 2)
  }${milli === 0 ? "" : `.${pad(milli, 3)}`}Z`;
}

/**
 * Bounds of the calendar period (year, month or day) that contains a decimal year.
 *
 * @param t decimal year; finite
 * @param resolution `annual`, `monthly` or `daily`; for `irregular` the bounds are `[t, t]`
 * @returns `{ start, end, middle }` in decimal years, `end` exclusive
 * @throws {RangeError} when t is not finite
 * @example
 * ```ts
 * import { periodBounds } from "./format_iso_time.ts";
 * import assert from "node:assert/strict";
 * const b = periodBounds(2023.1, "monthly"); // February 2023: days 31..59 of 365
 * assert.equal(b.start, 2023 + 31 / 365);
 * assert.equal(b.end, 2023 + 59 / 365);
 * assert.equal(b.middle, 2023 + 45 / 365);
 * assert.deepEqual(periodBounds(1996.3, "annual"), { start: 1996, end: 1997, middle: 1996.5 });
 * ```
 */
export function periodBounds(
  t: number,
  resolution: TimeResolution,
): { start: number; end: number; middle: number } {
  const c = calendarInstant(t);
  const diy = daysInYear(c.year);
  if (resolution === "annual") return { start: c.year, end: c.year + 1, middle: c.year + 0.5 };
  if (resolution === "monthly") {
    const a = daysBeforeMonth(c.year, c.month), len = daysInMonth(c.year, c.month);
    return {
      start: c.year + a / diy,
      end: c.month === 12 ? c.year + 1 : c.year + (a + len) / diy,
      middle: c.year + (a + len / 2) / diy,
    };
  }
  if (resolution === "daily") {
    const i = daysBeforeMonth(c.year, c.month) + c.day - 1;
    return {
      start: c.year + i / diy,
      end: i + 1 === diy ? c.year + 1 : c.year + (i + 1) / diy,
      middle: c.year + (i + 0.5) / diy,
    };
  }
  return { start: t, end: t, middle: t };
}

function formatYear(y: number): string {
  if (y >= 0 && y <= 9999) return pad(y, 4);
  return `${y < 0 ? "-" : "+"}${pad(Math.abs(y), 6)}`;
}

function pad(n: number, width: number): string {
  return String(n).padStart(width, "0");
}
