// @ts-check
/// <reference lib="dom" />
/**
 * DOM helpers of the built-in page: elements built from text (never parsed as HTML), tables,
 * definition lists, callouts and number formatting.
 *
 * @module
 */

/** @typedef {Node | string | number | null | undefined | false} Child */

/**
 * Create an element; strings become text nodes (never HTML).
 * @param {string} tag
 * @param {Record<string, unknown> | null} [props]
 * @param {...(Child | Child[])} children
 * @returns {HTMLElement}
 */
export function h(tag, props, ...children) {
  const el = document.createElement(tag);
  for (const [k, v] of Object.entries(props ?? {})) {
    if (v === undefined || v === null || v === false) continue;
    if (k.startsWith("on") && typeof v === "function") {
      el.addEventListener(k.slice(2), /** @type {EventListener} */ (v));
    } else if (k === "class") el.className = String(v);
    else if (k === "value" || k === "checked" || k === "selected" || k === "disabled") {
      /** @type {any} */ (el)[k] = v;
    } else el.setAttribute(k, v === true ? "" : String(v));
  }
  append(el, children);
  return el;
}

/**
 * @param {HTMLElement} el
 * @param {(Child | Child[])[]} children
 */
export function append(el, children) {
  for (const c of children.flat()) {
    if (c === null || c === undefined || c === false) continue;
    el.append(typeof c === "number" ? String(c) : c);
  }
}

/**
 * One path segment, percent-encoded, keeping ":" (allowed in a segment, RFC 3986 §3.3) so ids
 * like "sha256:…" stay readable.
 * @param {string} s
 */
export function seg(s) {
  return encodeURIComponent(s).replace(/%3A/gi, ":");
}

/** @param {unknown} v */
export function isObject(v) {
  return typeof v === "object" && v !== null && !Array.isArray(v);
}

/** @param {unknown} v */
export function isScalar(v) {
  return v === null || ["number", "string", "boolean"].includes(typeof v);
}

/**
 * A number for people: integers as they are, others to 6 significant digits.
 * @param {unknown} v
 * @returns {string}
 */
export function fmt(v) {
  if (v === null || v === undefined) return "—";
  if (typeof v === "number") {
    if (Number.isInteger(v)) return String(v);
    const a = Math.abs(v);
    if (a !== 0 && (a < 1e-4 || a >= 1e7)) return v.toExponential(4);
    return String(Number(v.toPrecision(6)));
  }
  if (typeof v === "boolean") return v ? "yes" : "no";
  if (typeof v === "string") return v;
  return JSON.stringify(v);
}

/**
 * The short label of a run, as chart titles and CSV headers show it: the last 8 hex digits of
 * its UUIDv7 id (the random part; the first digits are the creation time). The same rule as
 * `api/runs/label.ts` (test/api/ui_test.ts checks that they agree).
 * @param {string} id
 */
export function runLabel(id) {
  return /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/.test(id)
    ? id.slice(-8)
    : id;
}

/** @param {string} iso */
export function when(iso) {
  if (!iso) return "—";
  return iso.replace("T", " ").replace(/\.\d+Z$/, "Z").replace(/Z$/, " UTC");
}

const ACRONYMS = new Set(["tsi", "psi", "aic", "bic", "id", "ar1", "enso", "aod", "csv", "json"]);

/**
 * A machine name for people: "quietLevel" → "Quiet level", "psi_reference" → "PSI reference".
 * @param {string} s
 */
export function pretty(s) {
  const words = s.replace(/([a-z0-9])([A-Z])/g, "$1 $2").replace(/[_-]+/g, " ").trim()
    .split(/\s+/).map((w) => (ACRONYMS.has(w.toLowerCase()) ? w.toUpperCase() : w.toLowerCase()));
  const t = words.join(" ");
  return t.charAt(0).toUpperCase() + t.slice(1);
}

/** @param {string} status */
export function badge(status) {
  return h("span", { class: `badge ${status}`, "data-status": status }, status);
}

/**
 * Right-align only what reads as a number (a long text in a number column must wrap).
 * @param {Child} c
 */
function looksNumeric(c) {
  return typeof c === "number" ||
    (typeof c === "string" &&
      /^(—|[-+]?(\d[\d,]*\.?\d*|\.\d+)(e[-+]?\d+)?|[-+]?Infinity)$/i.test(c));
}

/**
 * A scrolling table.
 * @param {string[]} head
 * @param {Child[][]} rows
 * @param {{ caption?: string, numeric?: boolean[] }} [opts]
 */
export function table(head, rows, opts = {}) {
  return h(
    "div",
    { class: "scroll" },
    h(
      "table",
      null,
      opts.caption ? h("caption", { class: "muted" }, opts.caption) : null,
      h("thead", null, h("tr", null, head.map((c) => h("th", { scope: "col" }, c)))),
      h(
        "tbody",
        null,
        rows.map((r) =>
          h(
            "tr",
            null,
            r.map((c, i) =>
              h("td", opts.numeric?.[i] && looksNumeric(c) ? { class: "num" } : null, c)
            ),
          )
        ),
      ),
    ),
  );
}

/**
 * Definition list of label/value pairs (values already nodes or text); empty values left out.
 * @param {[string, Child | Child[]][]} pairs
 */
export function metaList(pairs) {
  return h(
    "dl",
    { class: "meta" },
    pairs.filter(([, v]) => v !== null && v !== undefined && v !== "").flatMap((
      [k, v],
    ) => [h("dt", null, k), h("dd", null, ...(Array.isArray(v) ? v : [v]))]),
  );
}

/** @param {string} kind @param {string} title @param {(Child | Child[])[]} body */
export function callout(kind, title, ...body) {
  return h("div", { class: `callout ${kind}`, role: kind === "bad" ? "alert" : null }, [
    h("strong", null, title),
    ...body.flat(),
  ]);
}
