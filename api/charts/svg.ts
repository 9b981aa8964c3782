/**
 * SVG text primitives: XML escaping, element strings, number formatting for coordinates and
 * a rough text-width estimate for layout. No DOM: charts are built as strings.
 *
 * @module
 */

/** Characters XML 1.0 forbids (C0 controls but tab/newline/return, U+FFFE, U+FFFF). */
// deno-lint-ignore no-control-regex
const INVALID_XML = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]/g;
/** Unpaired UTF-16 surrogates, which are not characters and break XML parsers. */
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g;

/**
 * Escape text for XML character data or a double-quoted attribute value (XML 1.0 §2.4):
 * `& < > " '` become entities and characters XML forbids are replaced by U+FFFD.
 *
 * @example
 * ```ts
 * import { escapeXml } from "./svg.ts";
 * import assert from "node:assert/strict";
 * assert.equal(escapeXml(`a < b & "c"`), "a &lt; b &amp; &quot;c&quot;");
 * assert.equal(escapeXml("bell\u0007"), "bell\uFFFD");
 * ```
 */
export function escapeXml(text: string): string {
  return text
    .replace(INVALID_XML, "\uFFFD")
    .replace(LONE_SURROGATE, "\uFFFD")
    .replace(/&/g, "&amp;")
    .replace(/</g, "&lt;")
    .replace(/>/g, "&gt;")
    .replace(/"/g, "&quot;")
    .replace(/'/g, "&apos;");
}

/** Attribute values: strings are escaped, numbers rounded for compact output. */
export type Attrs = Record<string, string | number | undefined | null | false>;

/** A coordinate or length rounded to 2 decimals, without trailing zeros. */
export function num(v: number): string {
  const r = Math.round(v * 100) / 100;
  return Object.is(r, -0) ? "0" : String(r);
}

function attrs(a: Attrs): string {
  let out = "";
  for (const [k, v] of Object.entries(a)) {
    if (v === undefined || v === null || v === false) continue;
    out += ` ${k}="${typeof v === "number" ? num(v) : escapeXml(v)}"`;
  }
  return out;
}

/**
 * One SVG element. `children` is raw markup (already escaped) or omitted for an empty element.
 *
 * @example
 * ```ts
 * import { el } from "./svg.ts";
 * import assert from "node:assert/strict";
 * assert.equal(el("rect", { x: 1.234, width: 5 }), `<rect x="1.23" width="5"/>`);
 * assert.equal(el("g", { class: "a" }, "<p/>"), `<g class="a"><p/></g>`);
 * ```
 */
export function el(name: string, a: Attrs, children?: string): string {
  return children === undefined || children === ""
    ? `<${name}${attrs(a)}/>`
    : `<${name}${attrs(a)}>${children}</${name}>`;
}

/** A `<text>` element whose content is escaped. */
export function text(a: Attrs, content: string): string {
  return `<text${attrs(a)}>${escapeXml(content)}</text>`;
}

/**
 * Estimated rendered width of a text in px for a sans-serif system font, on the wide side
 * (DejaVu Sans, a common fallback, is wider than most): about 0.6 em per character, less for
 * narrow letters and more for wide ones and capitals (and for digits and the letters a–f, which
 * share one width). Only used for layout (margins, legend and note wrapping), so a generous
 * estimate is enough.
 */
export function textWidth(s: string, fontSize: number, bold = false): number {
  let w = 0;
  for (const ch of s) {
    if ("il.,:;|!'ⁱ ".includes(ch)) w += 0.32;
    else if ("mwMW".includes(ch)) w += 0.92;
    // digits and the hex letters share one width, so that a run's label (8 hex digits) lays
    // the chart out the same whatever its digits
    else if (/[0-9a-f]/.test(ch)) w += 0.64;
    else if (/[A-Z]/.test(ch)) w += 0.72;
    else w += 0.6;
  }
  return w * fontSize * (bold ? 1.1 : 1);
}

/**
 * Break a text into lines no wider than `maxWidth` px (word wrap). A word wider than a line is
 * kept whole, or cut into pieces that fit when `breakWords` is true (notes that must stay
 * inside the chart, e.g. a run id in a warning).
 */
export function wrapText(
  s: string,
  fontSize: number,
  maxWidth: number,
  bold = false,
  breakWords = false,
): string[] {
  const words = s.split(/\s+/).filter(Boolean)
    .flatMap((w) => (breakWords ? splitWord(w, fontSize, maxWidth, bold) : [w]));
  const lines: string[] = [];
  let cur = "";
  for (const w of words) {
    const next = cur ? `${cur} ${w}` : w;
    if (cur && textWidth(next, fontSize, bold) > maxWidth) {
      lines.push(cur);
      cur = w;
    } else cur = next;
  }
  if (cur) lines.push(cur);
  return lines;
}

/** A word cut into pieces no wider than `maxWidth` px (at least one character each). */
function splitWord(w: string, fontSize: number, maxWidth: number, bold: boolean): string[] {
  if (textWidth(w, fontSize, bold) <= maxWidth) return [w];
  const pieces: string[] = [];
  let cur = "";
  for (const ch of w) {
    if (cur && textWidth(cur + ch, fontSize, bold) > maxWidth) {
      pieces.push(cur);
      cur = ch;
    } else cur += ch;
  }
  if (cur) pieces.push(cur);
  return pieces;
}

/** Short deterministic hash (FNV-1a, 32 bit) as base-36, for element ids. */
export function shortHash(s: string): string {
  let h = 0x811c9dc5;
  for (let i = 0; i < s.length; i++) {
    h ^= s.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return (h >>> 0).toString(36);
}
