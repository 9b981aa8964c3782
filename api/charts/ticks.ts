/**
 * Axis ticks: calendar ticks for a decimal-year axis (whole years, months or days, labelled
 * as ISO 8601 dates) and numeric ticks from d3-scale with plain (ungrouped) labels.
 *
 * @module
 */
import { decimalYear } from "../../core/time/mod.ts";

export interface Tick {
  value: number;
  label: string;
}

const YEAR_STEPS = [1, 2, 5, 10, 20, 25, 50, 100, 200, 250, 500, 1000];
const MONTH_STEPS = [1, 2, 3, 6];
const DAY_STEPS = [1, 2, 5, 7, 14];

function pad(n: number, w = 2): string {
  return String(n).padStart(w, "0");
}

/**
 * Ticks for a decimal-year axis from `t0` to `t1` (at most about `count` ticks): whole
 * years labelled "1996" when the span is a few years or more, first days of months
 * ("1996-08") for shorter spans, days ("1996-08-15") below two months.
 *
 * @example
 * ```ts
 * import { yearTicks } from "./ticks.ts";
 * import assert from "node:assert/strict";
 * assert.deepEqual(yearTicks(1990.2, 2011, 5).map((t) => t.label), ["1995", "2000", "2005", "2010"]);
 * assert.equal(yearTicks(2001, 2001.5, 6)[0].label, "2001-01");
 * ```
 */
export function yearTicks(t0: number, t1: number, count: number): Tick[] {
  const lo = Math.min(t0, t1), hi = Math.max(t0, t1);
  const span = hi - lo;
  const n = Math.max(2, count);
  if (!(span > 0) || !Number.isFinite(span)) {
    return Number.isFinite(lo) ? [{ value: lo, label: String(Math.round(lo)) }] : [];
  }
  if (span >= 2.5) {
    const step = YEAR_STEPS.find((s) => span / s <= n) ??
      Math.pow(10, Math.ceil(Math.log10(span / n)));
    const out: Tick[] = [];
    for (let y = Math.ceil(lo / step) * step; y <= hi + 1e-9; y += step) {
      out.push({ value: y, label: String(y) });
    }
    return out;
  }
  if (span >= 2 / 12) {
    const months = span * 12;
    const step = MONTH_STEPS.find((s) => months / s <= n) ?? 12;
    const out: Tick[] = [];
    let y = Math.floor(lo), m = 1;
    // first month start at or after lo on the step grid
    while (decimalYear(y, m) < lo - 1e-12) {
      m += 1;
      if (m > 12) (m = 1), (y += 1);
    }
    while ((m - 1) % step !== 0) {
      m += 1;
      if (m > 12) (m = 1), (y += 1);
    }
    for (let t = decimalYear(y, m); t <= hi + 1e-12; t = decimalYear(y, m)) {
      out.push({ value: t, label: `${y}-${pad(m)}` });
      m += step;
      while (m > 12) (m -= 12), (y += 1);
    }
    return out;
  }
  const days = span * 365.25;
  const step = DAY_STEPS.find((s) => days / s <= n) ?? 28;
  const out: Tick[] = [];
  const startYear = Math.floor(lo);
  const diy = (yy: number) => (yy % 4 === 0 && (yy % 100 !== 0 || yy % 400 === 0) ? 366 : 365);
  let y = startYear;
  let d = Math.ceil((lo - y) * diy(y)); // day index in year, 0-based
  let guard = 0;
  while (guard++ < 1000) {
    if (d >= diy(y)) (d -= diy(y)), (y += 1);
    const t = y + d / diy(y);
    if (t > hi + 1e-12) break;
    const date = new Date(Date.UTC(y, 0, 1 + d));
    out.push({
      value: t,
      label: `${date.getUTCFullYear()}-${pad(date.getUTCMonth() + 1)}-${pad(date.getUTCDate())}`,
    });
    d += step;
  }
  return out;
}

/**
 * Plain number label: no digit grouping, no trailing zeros, exponent form for very large
 * or very small magnitudes. `step` (the tick spacing) sets the decimals.
 *
 * @example
 * ```ts
 * import { numberLabel } from "./ticks.ts";
 * import assert from "node:assert/strict";
 * assert.equal(numberLabel(1361.5, 0.5), "1361.5");
 * assert.equal(numberLabel(0.0002, 0.0001), "2e-4");
 * assert.equal(numberLabel(-0, 1), "0");
 * ```
 */
export function numberLabel(v: number, step: number): string {
  if (v === 0 || Object.is(v, -0)) return "0";
  const a = Math.abs(v);
  if (a >= 1e6 || a < 1e-3) {
    const digits = Math.max(0, Math.min(6, Math.ceil(-Math.log10(Math.abs(step) / a) - 1e-9)));
    return v.toExponential(digits).replace(/\.?0+e/, "e").replace("e+", "e");
  }
  const decimals = step > 0 ? Math.max(0, Math.min(10, Math.ceil(-Math.log10(step) - 1e-9))) : 2;
  const s = v.toFixed(decimals);
  return s.includes(".") ? s.replace(/\.?0+$/, "") : s;
}
