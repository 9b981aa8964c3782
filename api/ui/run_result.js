// @ts-check
/// <reference lib="dom" />
/**
 * A finished run's result on the page: its scalar numbers, its tables (first rows), and each
 * series output (first defined rows, full CSV, save as a stored series).
 *
 * @module
 */
import { fmt, h, isObject, isScalar, pretty, seg, table } from "./dom.js";
import { call, problemBox } from "./service.js";
import { keyedDownload } from "./charts.js";
import { FIRST_ROWS } from "./lists.js";

/**
 * The result's scalar fields and tables (arrays of records), outputs excluded.
 * @param {Record<string, unknown>} result
 */
export function resultParts(result) {
  /** @type {[string, unknown][]} */
  const scalars = [];
  /** @type {[string, Record<string, unknown>[]][]} */
  const tables = [];
  /**
   * @param {string} key
   * @param {unknown} v
   * @param {number} depth
   */
  const visit = (key, v, depth) => {
    if (isScalar(v)) scalars.push([key, v]);
    else if (Array.isArray(v)) {
      if (v.length && v.every(isObject)) tables.push([key, /** @type {any} */ (v)]);
      else if (v.every(isScalar)) {
        scalars.push([
          key,
          v.length <= 6
            ? v.map(fmt).join(", ")
            : `${v.length} values: ${v.slice(0, 4).map(fmt).join(", ")}, …`,
        ]);
      } else scalars.push([key, `${v.length} items (see the run JSON)`]);
    } else if (isObject(v)) {
      if (depth >= 2) scalars.push([key, JSON.stringify(v).slice(0, 120)]);
      else {for (const [k, x] of Object.entries(/** @type {any} */ (v))) {
          visit(`${key}.${k}`, x, depth + 1);
        }}
    }
  };
  for (const [k, v] of Object.entries(result)) {
    if (["outputs", "warnings", "cautions", "inherited"].includes(k)) continue;
    visit(k, v, 0);
  }
  return { scalars, tables };
}

/**
 * First rows of an array of records.
 * @param {string} name
 * @param {Record<string, unknown>[]} rows
 */
export function recordTable(name, rows) {
  // Nested records (e.g. a cycle's start {date, value}) become "start.date", "start.value".
  /** @param {Record<string, unknown>} r */
  const flatten = (r) => {
    /** @type {Record<string, unknown>} */
    const out = {};
    for (const [k, v] of Object.entries(r)) {
      if (isObject(v)) {
        for (const [k2, v2] of Object.entries(/** @type {any} */ (v))) out[`${k}.${k2}`] = v2;
      } else out[k] = v;
    }
    return out;
  };
  const flat = rows.slice(0, 50).map(flatten);
  const cols = [...new Set(flat.flatMap((r) => Object.keys(r)))]
    .filter((c) => flat.some((r) => r[c] !== null && r[c] !== undefined))
    .slice(0, 12);
  const first = flat.slice(0, FIRST_ROWS);
  return h(
    "div",
    { class: "result-table" },
    h("h3", null, pretty(name)),
    table(
      cols,
      first.map((r) => cols.map((c) => fmt(isScalar(r[c]) ? r[c] : JSON.stringify(r[c])))),
      { numeric: cols.map(() => true) },
    ),
    rows.length > first.length
      ? h(
        "p",
        { class: "muted" },
        `${first.length} of ${rows.length} rows shown; all are in the run's JSON.`,
      )
      : null,
  );
}

/**
 * First rows of one series-like output, with its CSV link.
 * @param {string} runId
 * @param {string} name
 * @param {any} o
 */
export function outputTable(runId, name, o) {
  const cols = ["value", "uncertainty", "lower", "upper"].filter((c) => Array.isArray(o[c]));
  const n = o.time?.length ?? 0;
  // Start at the first defined value: leading undefined rows (e.g. the ends of a 13-month
  // smoothing) are counted, not shown.
  const firstDefined = Array.isArray(o.value)
    ? o.value.findIndex((/** @type {unknown} */ v) => v !== null)
    : 0;
  const from = Math.max(0, firstDefined);
  const rows = Array.from(
    { length: Math.max(0, Math.min(FIRST_ROWS, n - from)) },
    (_, k) => [fmt(o.time[from + k]), ...cols.map((c) => fmt(o[c][from + k]))],
  );
  const href = `/v1/runs/${runId}/outputs/${seg(name)}?format=csv`;
  return h(
    "div",
    { class: "output" },
    h("h3", null, `${pretty(name)} `, h("span", { class: "muted" }, `(${o.quantity}, ${o.units})`)),
    o.description ? h("p", { class: "muted" }, o.description) : null,
    o.interval ? h("p", { class: "muted" }, `Interval: ${o.interval}`) : null,
    from > 0
      ? h(
        "p",
        { class: "muted" },
        `The first ${from} rows have no value; shown from row ${from + 1}.`,
      )
      : null,
    firstDefined < 0 && n ? h("p", { class: "muted" }, "No row of this output has a value.") : null,
    table(["Decimal year", ...cols], rows, { numeric: [true, true, true, true, true] }),
    h(
      "div",
      { class: "actions" },
      h("a", { href, download: `${name}.csv`, onclick: keyedDownload }, `All ${n} rows as CSV`),
      saveButton(runId, name),
    ),
  );
}

/**
 * "Save as a stored series" for one output (lineage kept in `derived_from`).
 * @param {string} runId
 * @param {string} name
 */
function saveButton(runId, name) {
  const out = h("span", { "aria-live": "polite" });
  const button = h("button", {
    type: "button",
    class: "ghost",
    onclick: async () => {
      button.setAttribute("disabled", "");
      const r = await call({
        method: "POST",
        path: `/v1/runs/${runId}/outputs/${seg(name)}/series`,
      });
      button.removeAttribute("disabled");
      out.replaceChildren(
        r.ok
          ? h("a", { href: `#/series/${seg(r.data.id)}` }, "Open the stored series")
          : problemBox(r.data, "Not saved"),
      );
    },
  }, "Save as a stored series");
  return h("span", null, button, " ", out);
}
