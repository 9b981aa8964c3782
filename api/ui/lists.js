// @ts-check
/// <reference lib="dom" />
/**
 * The pieces every list view shares: page size from the view's query, paging links, and
 * filters that navigate with a query parameter.
 *
 * @module
 */
import { h } from "./dom.js";

const PAGE_SIZE = 20;

/**
 * Rows per page: `limit` in the view's query (1–100), else 20.
 * @param {URLSearchParams} query
 */
export function pageSize(query) {
  const n = Math.floor(Number(query.get("limit")));
  return Number.isFinite(n) && n >= 1 ? Math.min(100, n) : PAGE_SIZE;
}

/**
 * Paging links for a list.
 * @param {string} base Hash path, e.g. "#/series".
 * @param {URLSearchParams} query
 * @param {number} offset
 * @param {number} total
 * @param {number} shown
 */
export function pager(base, query, offset, total, shown) {
  /** @param {number} o */
  const link = (o) => {
    const q = new URLSearchParams(query);
    if (o > 0) q.set("offset", String(o));
    else q.delete("offset");
    const s = q.toString();
    return base + (s ? "?" + s : "");
  };
  if (!total) return null;
  const from = offset + 1;
  return h(
    "nav",
    { class: "pager", "aria-label": "Pages" },
    offset > 0
      ? h(
        "a",
        { class: "button ghost", href: link(Math.max(0, offset - pageSize(query))), rel: "prev" },
        "← Newer",
      )
      : null,
    h("span", { class: "muted" }, `${from}–${offset + shown} of ${total}`),
    offset + shown < total
      ? h(
        "a",
        { class: "button ghost", href: link(offset + pageSize(query)), rel: "next" },
        "Older →",
      )
      : null,
  );
}

/**
 * A select that navigates with a query parameter.
 * @param {string} label
 * @param {string} name
 * @param {string[]} options
 * @param {string} current
 * @param {string} base
 * @param {URLSearchParams} query
 */
export function filterSelect(label, name, options, current, base, query) {
  const id = `filter-${name}`;
  const sel = h(
    "select",
    {
      id,
      onchange: (/** @type {Event} */ e) => {
        const q = new URLSearchParams(query);
        const v = /** @type {HTMLSelectElement} */ (e.target).value;
        if (v) q.set(name, v);
        else q.delete(name);
        q.delete("offset");
        const s = q.toString();
        location.hash = base + (s ? "?" + s : "");
      },
    },
    h("option", { value: "" }, "any"),
    options.map((o) => h("option", { value: o, selected: o === current }, o)),
  );
  return h("div", null, h("label", { for: id }, label), sel);
}

/** Rows a view shows of a long table before pointing at the full download. */
export const FIRST_ROWS = 12;

/**
 * What a list shows when it holds nothing yet: a sentence and a link to add the first item.
 * @param {string} text
 * @param {string} href
 * @param {string} action
 */
export function emptyList(text, href, action) {
  return h("p", { class: "muted", id: "empty" }, text, h("a", { href }, action), ".");
}

/**
 * The top of one item's view: a link back to its list, its title and a one-line summary.
 * @param {string} back Hash path of the list, e.g. "#/series".
 * @param {string} backText
 * @param {string} title
 * @param {import("./dom.js").Child | import("./dom.js").Child[]} summary
 */
export function itemHeading(back, backText, title, summary) {
  return [
    h("p", { class: "muted" }, h("a", { href: back }, backText)),
    h("h1", null, title),
    h("p", { class: "lede" }, summary),
  ];
}
