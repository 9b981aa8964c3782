/**
 * Parse ISO 8601 times into decimal years, with the middle-of-period rule for reduced
 * precision (ISO 8601-1:2019 §5.2 "reduced precision"; reading a reduced-precision date as
 * the middle of its period is common practice for period means).
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
import { decimalYearFromEpochDays } from "./decimal_year.ts";

/** How precise an ISO time is: a whole year, a month, a day, or an instant (date-time). */
export type IsoPrecision = "year" | "month" | "day" | "instant" | "interval";

/** A parsed ISO 8601 time. */
export interface ParsedIsoTime {
  /** The decimal year sunlag uses for the time: the middle of the period it names. */
  decimalYear: number;
  precision: IsoPrecision;
  /** Start of the period named, decimal years (equal to `decimalYear` for an instant). */
  start: number;
  /** End of the period named (exclusive), decimal years (equal to `decimalYear` for an instant). */
  end: number;
}

const YEAR = String.raw`([+-]\d{4,6}|\d{4})`;
const RE_YEAR = new RegExp(`^${YEAR}$`);
const RE_MONTH = new RegExp(`^${YEAR}-(\\d{2})$`);
const RE_DAY = new RegExp(`^${YEAR}-(\\d{2})-(\\d{2})$`);
const RE_ORDINAL = new RegExp(`^${YEAR}-(\\d{3})$`);
const RE_INSTANT = new RegExp(
  `^${YEAR}-(\\d{2})-(\\d{2})[T ](\\d{2}):(\\d{2})(?::(\\d{2})(?:[.,](\\d+))?)?` +
    String.raw`(Z|z|[+-]\d{2}(?::?\d{2})?)?$`,
);

/**
 * Parse an ISO 8601 calendar time into a decimal year.
 *
 * Accepted forms (extended format; 4-digit years, or signed 4–6 digit expanded years):
 * - `YYYY`: the middle of the year, year + 0.5 (e.g. `1996` → 1996.5);
 * - `YYYY-MM`: the middle of the month (`1996-08` → 1996 + (213 + 15.5) / 366);
 * - `YYYY-MM-DD` and ordinal `YYYY-DDD`: noon UTC of that day;
 * - date-times `YYYY-MM-DDThh:mm[:ss[.s…]]` with optional `Z` or `±hh[:mm]` offset (a space
 *   may replace `T`; `24:00` means the end of the day): that instant, converted to UTC.
 *   A date-time without offset is read as UTC.
 *
 * - time intervals `start/end` and `start/duration` (ISO 8601-1:2019 §5.5, e.g.
 *   `1996-08/P1M` for a monthly mean): the middle of the interval. The interval runs from the
 *   start of the period the start names to the end of the period the end names (so
 *   `1961/1990` is 30 whole years, as climatologists read it), or to start + duration, with
 *   durations `PnYnMnWnDTnHnMnS` (integers; seconds may have a fraction) added on the
 *   calendar (a day past the end of a month is clamped to its last day).
 *
 * Basic format (`19960815`) and week dates are not accepted, because a bare number is read as
 * a decimal year elsewhere in sunlag.
 *
 * @param text the time string (surrounding whitespace ignored)
 * @returns the decimal year, the precision and the bounds of the period named
 * @throws {RangeError} naming what is wrong when the text is not such a time or the date does
 *   not exist (e.g. `2023-02-29`)
 * @example
 * ```ts
 * import { parseIsoTime } from "./parse_iso_time.ts";
 * import assert from "node:assert/strict";
 * assert.equal(parseIsoTime("1996").decimalYear, 1996.5);
 * // 2023-03-01 noon: day of year 60 (31 + 28 + 1); (60 − 1 + 0.5) / 365
 * assert.equal(parseIsoTime("2023-03-01").decimalYear, 2023 + 59.5 / 365);
 * assert.equal(parseIsoTime("2024-01-01T00:00:00Z").decimalYear, 2024);
 * assert.equal(parseIsoTime("2024-01-01T02:00+02:00").decimalYear, 2024);
 * ```
 */
export function parseIsoTime(text: string): ParsedIsoTime {
  const s = text.trim();
  if (s.includes("/")) return parseInterval(text, s);
  let m: RegExpExecArray | null;
  if ((m = RE_YEAR.exec(s))) {
    const y = Number(m[1]);
    return { decimalYear: y + 0.5, precision: "year", start: y, end: y + 1 };
  }
  if ((m = RE_MONTH.exec(s))) {
    const y = Number(m[1]), mo = Number(m[2]);
    if (mo < 1 || mo > 12) throw bad(text, `month must be 01..12, got ${m[2]}`);
    const diy = daysInYear(y);
    const a = daysBeforeMonth(y, mo), len = daysInMonth(y, mo);
    return {
      decimalYear: y + (a + len / 2) / diy,
      precision: "month",
      start: y + a / diy,
      end: mo === 12 ? y + 1 : y + (a + len) / diy,
    };
  }
  if ((m = RE_DAY.exec(s))) {
    const y = Number(m[1]), mo = Number(m[2]), d = Number(m[3]);
    return dayPeriod(y, dayIndex(text, y, mo, d));
  }
  if ((m = RE_ORDINAL.exec(s))) {
    const y = Number(m[1]), doy = Number(m[2]);
    const diy = daysInYear(y);
    if (doy < 1 || doy > diy) throw bad(text, `ordinal day must be 001..${diy}, got ${m[2]}`);
    return dayPeriod(y, doy - 1);
  }
  if ((m = RE_INSTANT.exec(s))) {
    const y = Number(m[1]), mo = Number(m[2]), d = Number(m[3]);
    dayIndex(text, y, mo, d);
    const hh = Number(m[4]), mm = Number(m[5]), ss = m[6] === undefined ? 0 : Number(m[6]);
    const frac = m[7] === undefined ? 0 : Number(`0.${m[7]}`);
    if (hh > 24 || (hh === 24 && (mm !== 0 || ss !== 0 || frac !== 0))) {
      throw bad(text, `hour must be 00..23 (or 24:00 for the end of the day), got ${m[4]}`);
    }
    if (mm > 59) throw bad(text, `minute must be 00..59, got ${m[5]}`);
    if (ss > 59) throw bad(text, `second must be 00..59, got ${m[6]}`);
    let offsetMinutes = 0;
    const z = m[8];
    if (z !== undefined && z !== "Z" && z !== "z") {
      const sign = z[0] === "-" ? -1 : 1;
      const oh = Number(z.slice(1, 3));
      const om = z.length > 3 ? Number(z.slice(-2)) : 0;
      if (oh > 23 || om > 59) throw bad(text, `offset must be within ±23:59, got ${z}`);
      offsetMinutes = sign * (oh * 60 + om);
    }
    const seconds = hh * 3600 + mm * 60 + ss + frac - offsetMinutes * 60;
    const t = decimalYearFromEpochDays(daysFromCivil(y, mo, d) + seconds / 86400);
    return { decimalYear: t, precision: "instant", start: t, end: t };
  }
  throw bad(
    text,
    "expected ISO 8601 YYYY, YYYY-MM, YYYY-MM-DD, YYYY-DDD or YYYY-MM-DDThh:mm[:ss][Z|±hh:mm]",
  );
}

const RE_DURATION =
  /^P(?:(\d+)Y)?(?:(\d+)M)?(?:(\d+)W)?(?:(\d+)D)?(?:T(?:(\d+)H)?(?:(\d+)M)?(?:(\d+(?:[.,]\d+)?)S)?)?$/;

function parseInterval(text: string, s: string): ParsedIsoTime {
  const parts = s.split("/");
  if (parts.length !== 2 || parts[0] === "" || parts[1] === "") {
    throw bad(text, "an interval is start/end or start/duration, e.g. 1996-08/P1M");
  }
  if (parts[0].startsWith("P")) {
    throw bad(text, "duration/end intervals are not accepted; write start/duration or start/end");
  }
  const a = parseIsoTime(parts[0]);
  const startDays = epochDays(a.start);
  let endDays: number;
  if (parts[1].startsWith("P")) {
    const m = RE_DURATION.exec(parts[1]);
    if (!m || parts[1] === "P" || parts[1].endsWith("T")) {
      throw bad(text, `unparseable duration "${parts[1]}": expected PnYnMnWnDTnHnMnS`);
    }
    const [Y, Mo, W, D, H, Mi] = [1, 2, 3, 4, 5, 6].map((k) => (m[k] ? Number(m[k]) : 0));
    const S = m[7] ? Number(m[7].replace(",", ".")) : 0;
    const c = civilFromDays(Math.floor(startDays));
    const frac = startDays - Math.floor(startDays);
    const months = c.month - 1 + Mo;
    const y2 = c.year + Y + Math.floor(months / 12);
    const m2 = (months % 12) + 1;
    const d2 = Math.min(c.day, daysInMonth(y2, m2));
    endDays = daysFromCivil(y2, m2, d2) + frac + 7 * W + D + (H * 3600 + Mi * 60 + S) / 86400;
  } else {
    endDays = epochDays(parseIsoTime(parts[1]).end);
  }
  if (!(endDays > startDays)) throw bad(text, "the interval must end after it starts");
  return {
    decimalYear: decimalYearFromEpochDays((startDays + endDays) / 2),
    precision: "interval",
    start: a.start,
    end: decimalYearFromEpochDays(endDays),
  };
}

/** Days since 1970-01-01 of a decimal year. */
function epochDays(t: number): number {
  const y = Math.floor(t);
  const d = daysFromCivil(y, 1, 1) + (t - y) * daysInYear(y);
  const r = Math.round(d);
  return Math.abs(d - r) < 1e-6 ? r : d; // period bounds are whole days: undo rounding error
}

function dayIndex(text: string, y: number, mo: number, d: number): number {
  if (mo < 1 || mo > 12) throw bad(text, `month must be 01..12, got ${mo}`);
  const dim = daysInMonth(y, mo);
  if (d < 1 || d > dim) {
    throw bad(
      text,
      `day must be 01..${dim} in ${String(y).padStart(4, "0")}-${pad2(mo)}, got ${d}`,
    );
  }
  return daysBeforeMonth(y, mo) + d - 1;
}

function dayPeriod(y: number, index: number): ParsedIsoTime {
  const diy = daysInYear(y);
  return {
    decimalYear: y + (index + 0.5) / diy,
    precision: "day",
    start: y + index / diy,
    end: index + 1 === diy ? y + 1 : y + (index + 1) / diy,
  };
}

function pad2(n: number): string {
  return String(n).padStart(2, "0");
}

function bad(text: string, why: string): RangeError {
  const shown = text.length > 40 ? `${text.slice(0, 40)}…` : text;
  return new RangeError(`Cannot parse time "${shown}": ${why}`);
}

/**
 * The decimal year of an ISO 8601 time: the same number as `parseIsoTime(text).decimalYear`,
 * with a fast path (no regular expression, no allocation) for the common `YYYY`, `YYYY-MM` and
 * `YYYY-MM-DD` forms, for ingesting long tables.
 *
 * @param text the time string
 * @returns the decimal year (middle of the period named)
 * @throws {RangeError} as {@link parseIsoTime}
 * @example
 * ```ts
 * import { parseIsoDecimalYear, parseIsoTime } from "./parse_iso_time.ts";
 * import assert from "node:assert/strict";
 * for (const s of ["1996", "1996-08", "2024-03-01", "2024-03-01T06:00Z"]) {
 *   assert.equal(parseIsoDecimalYear(s), parseIsoTime(s).decimalYear);
 * }
 * ```
 */
export function parseIsoDecimalYear(text: string): number {
  const n = text.length;
  if (n === 4 || n === 7 || n === 10) {
    const y = digits(text, 0, 4);
    if (y >= 0) {
      if (n === 4) return y + 0.5;
      if (text.charCodeAt(4) === 45) {
        const mo = digits(text, 5, 2);
        if (mo >= 1 && mo <= 12) {
          const diy = daysInYear(y);
          if (n === 7) return y + (daysBeforeMonth(y, mo) + daysInMonth(y, mo) / 2) / diy;
          if (text.charCodeAt(7) === 45) {
            const d = digits(text, 8, 2);
            if (d >= 1 && d <= daysInMonth(y, mo)) {
              return y + (daysBeforeMonth(y, mo) + d - 1 + 0.5) / diy;
            }
          }
        }
      }
    }
  }
  return parseIsoTime(text).decimalYear;
}

/** The non-negative integer written by `len` ASCII digits at `at`, or −1. */
function digits(s: string, at: number, len: number): number {
  let v = 0;
  for (let i = at; i < at + len; i++) {
    const c = s.charCodeAt(i) - 48;
    if (c < 0 || c > 9) return -1;
    v = v * 10 + c;
  }
  return v;
}
