/**
 * `Content-Disposition` values built from stored data: a quoted ASCII `filename` for old
 * clients, with anything outside printable ASCII and the characters that end or escape a
 * quoted string replaced, and the exact name as `filename*` in UTF-8 percent-encoding
 * (RFC 6266 §4.3, RFC 8187 §3.2). No value can end the header or add a parameter.
 *
 * @module
 */

/** RFC 8187 `attr-char`s that encodeURIComponent leaves alone but must be encoded. */
const NOT_ATTR_CHAR = /['()*]/g;

/**
 * The header value for a download named `filename`.
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { contentDisposition } from "./content_disposition.ts";
 * assert.equal(
 *   contentDisposition('run "ä";\r\nX: y.json'),
 *   `attachment; filename="run ______X_ y.json"; filename*=UTF-8''run%20%22%C3%A4%22%3B%0D%0AX%3A%20y.json`,
 * );
 * ```
 */
export function contentDisposition(filename: string, type = "attachment"): string {
  const ascii = filename.replace(/[^\x20-\x7e]|["\\;:]/g, "_");
  const encoded = encodeURIComponent(filename).replace(
    NOT_ATTR_CHAR,
    (c) => "%" + c.charCodeAt(0).toString(16).toUpperCase(),
  );
  return `${type}; filename="${ascii}"; filename*=UTF-8''${encoded}`;
}
