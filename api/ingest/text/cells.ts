/**
 * Cells of a text table: numbers written with a decimal point, missing-value sentinels, and
 * the test that tells a header cell from a data cell.
 *
 * @module
 */
import { parseIsoTime } from "../../../core/time/mod.ts";
import { DEFAULT_MISSING } from "../types.ts";

/** A finite decimal number as text (a `.` decimal point, optional exponent). */
export const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const INFINITY = /^[+-]?(?:inf|infinity)$/i;

/**
 * A test for missing-value cells: the default sentinels (empty, `NaN`, `NA`) and `extra`,
 * compared case-insensitively; numeric sentinels also match equal numbers (`-999.0` matches
 * `-999`). Cells are compared trimmed.
 *
 * @example
 * ```ts
 * import { missingTest } from "./cells.ts";
 * import assert from "node:assert/strict";
 * const isMissing = missingTest(["-999"]);
 * assert.deepEqual(["na", "-999.0", "", "0"].map(isMissing), [true, true, true, false]);
 * ```
 */
export function missingTest(extra: readonly string[] = []): (cell: string) => boolean {
  const sentinelText = new Set<string>(DEFAULT_MISSING.map((s) => s.toLowerCase()));
  const sentinelNum = new Set<number>();
  for (const s of extra) {
    const t = s.trim();
    sentinelText.add(t.toLowerCase());
    if (NUMBER.test(t)) sentinelNum.add(Number(t));
  }
  let longest = 0;
  for (const s of sentinelText) longest = Math.max(longest, s.length);
  return (c: string) =>
    (c.length <= longest && (sentinelText.has(c) || sentinelText.has(c.toLowerCase()))) ||
    (sentinelNum.size > 0 && NUMBER.test(c) && sentinelNum.has(Number(c)));
}

/** Parse a finite number, reporting why not through `bad` (then returns NaN). */
export function readNumber(c: string, bad: (msg: string) => void, what: string): number {
  if (INFINITY.test(c)) {
    bad(`${what} "${short(c)}" is infinite; only finite numbers are allowed`);
    return NaN;
  }
  if (!NUMBER.test(c)) {
    const hint = /^[+-]?\d+,\d+$/.test(c)
      ? " (decimal comma? write numbers with a decimal point)"
      : "";
    bad(`non-numeric ${what} "${short(c)}"${hint}`);
    return NaN;
  }
  const x = Number(c);
  if (!Number.isFinite(x)) {
    bad(`${what} "${short(c)}" overflows to infinity; only finite numbers are allowed`);
    return NaN;
  }
  return x;
}

/** Parse an integer in lo..hi, reporting why not through `bad` (then returns null). */
export function readInt(
  c: string,
  bad: (msg: string) => void,
  what: string,
  lo: number,
  hi: number,
): number | null {
  if (!/^[+-]?\d+$/.test(c) || Number(c) < lo || Number(c) > hi) {
    bad(`${what} must be an integer in ${lo}..${hi}, got "${short(c)}"`);
    return null;
  }
  return Number(c);
}

/** Whether a cell reads as data (a number, infinity, NaN/NA, empty, or an ISO time). */
export function looksLikeData(c: string): boolean {
  const t = c.trim();
  if (t === "" || NUMBER.test(t) || INFINITY.test(t) || /^(nan|na)$/i.test(t)) return true;
  try {
    parseIsoTime(t);
    return true;
  } catch {
    return false;
  }
}

/** A cell cut to 40 characters for messages. */
export function short(s: string): string {
  return s.length > 40 ? `${s.slice(0, 40)}…` : s;
}
