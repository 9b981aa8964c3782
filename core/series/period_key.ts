/**
 * Calendar periods as integer keys: the bins of resampling and alignment.
 *
 * @module
 */
import {
  calendarInstant,
  type CalendarResolution,
  daysFromCivil,
  decimalYear,
  decimalYearFromEpochDays,
  periodBounds,
} from "../time/mod.ts";

/**
 * Integer key of the calendar period (day, month or year) holding a decimal year: days since
 * 1970-01-01 (daily), year × 12 + month − 1 (monthly), or the year (annual). Consecutive
 * periods have consecutive keys.
 *
 * @param t decimal year; finite
 * @param resolution the period length
 * @returns the integer key
 * @example
 * ```ts
 * import { periodKey } from "./period_key.ts";
 * import assert from "node:assert/strict";
 * assert.equal(periodKey(1996.62, "monthly"), 1996 * 12 + 7); // August 1996
 * assert.equal(periodKey(1996.62, "annual"), 1996);
 * assert.equal(periodKey(1970 + 0.5 / 365, "daily"), 0);
 * ```
 */
export function periodKey(t: number, resolution: CalendarResolution): number {
  const c = calendarInstant(t);
  if (resolution === "annual") return c.year;
  if (resolution === "monthly") return c.year * 12 + c.month - 1;
  return daysFromCivil(c.year, c.month, c.day);
}

/**
 * Bounds and middle (decimal years) of the period with a key (inverse of {@link periodKey}).
 *
 * @param key integer period key
 * @param resolution the period length
 * @returns `{ start, end, middle }`, end exclusive
 * @example
 * ```ts
 * import { periodOfKey } from "./period_key.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(periodOfKey(1996, "annual"), { start: 1996, end: 1997, middle: 1996.5 });
 * assert.equal(periodOfKey(0, "daily").middle, 1970 + 0.5 / 365);
 * ```
 */
export function periodOfKey(
  key: number,
  resolution: CalendarResolution,
): { start: number; end: number; middle: number } {
  if (resolution === "annual") return { start: key, end: key + 1, middle: key + 0.5 };
  if (resolution === "monthly") {
    const y = Math.floor(key / 12);
    return periodBounds(decimalYear(y, key - y * 12 + 1, 1), "monthly");
  }
  const start = decimalYearFromEpochDays(key);
  return {
    start,
    end: decimalYearFromEpochDays(key + 1),
    middle: decimalYearFromEpochDays(key + 0.5),
  };
}
