/**
 * Spreadsheet-safe CSV text. A spreadsheet that opens a CSV file runs any cell starting with
 * `=`, `+`, `-` or `@` (and some also after a tab or carriage return) as a formula, so a series
 * named `x,=HYPERLINK(...)` could plant one ("CSV injection", OWASP). Here:
 *
 * - a text cell that starts with one of those characters gets a leading apostrophe, which
 *   spreadsheets show as text (numbers are written as numbers, so a negative value stays
 *   numeric: only text cells are touched);
 * - a text cell holding a delimiter, quote or line break is quoted per RFC 4180 §2 (quotes
 *   inside doubled);
 * - a `# key: value` metadata line stays one field that starts with `#`, so it is never a
 *   formula, and pandas (`comment="#"`) and R (`comment.char = "#"`) still skip it (a quoted
 *   line would defeat both). A value with a line break, blanks at its ends or a leading quote
 *   is written as a JSON string, as before; a delimiter (`,` `;`) that a spreadsheet would
 *   split on just before a formula character (blanks between allowed, for spreadsheets that
 *   trim cells), a quote, or the end of the value is written as its `\u` escape, so no cell
 *   after it can be a formula. sunlag reads every value back exactly (api/ingest/text.ts).
 *
 * @module
 */

const FORMULA_LEAD = /^[=+\-@\t\r]/;

/**
 * One text cell, neutralised and quoted as needed.
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { csvText } from "./csv_cell.ts";
 * assert.equal(csvText("1996-08"), "1996-08");
 * assert.equal(csvText("=HYPERLINK(1)"), "'=HYPERLINK(1)");
 * assert.equal(csvText("-0500-06"), "'-0500-06");
 * assert.equal(csvText('a,"b"'), '"a,""b"""');
 * ```
 */
export function csvText(s: string): string {
  const t = FORMULA_LEAD.test(s) ? "'" + s : s;
  return /[",\r\n;]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t;
}

/** A delimiter a spreadsheet splits on, followed by a formula character or the value's end. */
const SPLIT_BEFORE_FORMULA = /[,;\t](?:(?=")|(?=\s*(?:[=+\-@]|$)))/;
const SPLIT_BEFORE_FORMULA_JSON = /[,;](?=\s*(?:[=+\-@]|"$))/g;

/**
 * The value of a `# key: value` metadata line (see the module documentation).
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { csvMetaValue } from "./csv_cell.ts";
 * assert.equal(csvMetaValue("Hilltop station, daily"), "Hilltop station, daily");
 * assert.equal(csvMetaValue("x,=HYPERLINK(1)"), '"x\\u002c=HYPERLINK(1)"');
 * assert.equal(JSON.parse(csvMetaValue("x,=HYPERLINK(1)")), "x,=HYPERLINK(1)");
 * assert.equal(JSON.parse(csvMetaValue('a\n; @b,')), 'a\n; @b,');
 * assert.ok(!/[,;]\s*[=+\-@]/.test(csvMetaValue("a,\t+1;-2, @3")));
 * ```
 */
export function csvMetaValue(v: string | null | undefined): string {
  if (v === null || v === undefined) return "";
  const danger = SPLIT_BEFORE_FORMULA.test(v);
  if (!danger && !/[\r\n]/.test(v) && v === v.trim() && !v.startsWith('"')) return v;
  const json = JSON.stringify(v);
  return danger
    ? json.replace(SPLIT_BEFORE_FORMULA_JSON, (c) => (c === "," ? "\\u002c" : "\\u003b"))
    : json;
}

/** A whole metadata line, `# key: value`. */
export function csvMetaLine(key: string, value: string | null | undefined): string {
  return `# ${key}: ${csvMetaValue(value)}`;
}
