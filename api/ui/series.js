// @ts-check
/// <reference lib="dom" />
/**
 * The page's views of stored series: `#/series` (newest first, filtered by quantity, paged)
 * and `#/series/{id}` (chart, metadata, first points, lineage of a derived series).
 *
 * @module
 */
import { callout, fmt, h, metaList, runLabel, seg, table, when } from "./dom.js";
import { call, problemBox, quantities } from "./service.js";
import { show } from "./shell.js";
import { chart, keyedDownload } from "./charts.js";
import { emptyList, filterSelect, FIRST_ROWS, itemHeading, pager, pageSize } from "./lists.js";
import { snippets } from "./snippet_panel.js";

/** @typedef {import("./snippets.js").RequestSpec} RequestSpec */

/** @param {number} gen @param {URLSearchParams} query */
export async function seriesList(gen, query) {
  const offset = Math.max(0, Number(query.get("offset")) || 0);
  const quantity = query.get("quantity") ?? "";
  /** @type {RequestSpec} */
  const req = {
    method: "GET",
    path: "/v1/series",
    query: { limit: pageSize(query), offset, quantity: quantity || undefined },
    note: "List stored series, newest first",
  };
  const [r, qs] = await Promise.all([call(req), quantities()]);
  if (!r.ok) return show(gen, "Series", h("h1", null, "Stored series"), problemBox(r.data));
  const items = /** @type {any[]} */ (r.data.items);
  const rows = items.map((s) => [
    h("a", { href: `#/series/${seg(s.id)}` }, s.name),
    s.quantity,
    h("code", null, s.units),
    `${s.start_date} – ${s.end_date}`,
    s.resolution,
    s.n,
    when(s.created_at),
  ]);
  show(
    gen,
    "Series",
    h("h1", null, "Stored series"),
    h(
      "p",
      { class: "lede" },
      "Every series the service holds, newest first. Open one to see its chart and points.",
    ),
    h(
      "div",
      { class: "filters" },
      filterSelect("Quantity", "quantity", qs, quantity, "#/series", query),
      h("a", { class: "button", href: "#/upload" }, "Upload a series"),
    ),
    items.length
      ? table(["Name", "Quantity", "Units", "Time span", "Resolution", "Points", "Stored"], rows, {
        numeric: [false, false, false, false, false, true, false],
      })
      : emptyList("No series stored yet. ", "#/upload", "Upload one"),
    pager("#/series", query, offset, r.data.total, items.length),
    snippets([req]).el,
  );
}

/**
 * The CSV and chart requests of a series view, beside its JSON one.
 * @param {string} path
 */
function downloadRequests(path) {
  const csvReq = {
    method: "GET",
    path,
    query: { format: "csv" },
    save: "series.csv",
    note: "The same as CSV (metadata in # comment lines)",
  };
  const chartReq = {
    method: "GET",
    path: `${path}/chart.svg`,
    query: { width: 800, height: 400, theme: "light" },
    save: "series.svg",
    note: "Its chart as SVG",
  };
  return [csvReq, chartReq];
}

/**
 * The first points of a series as table rows (date, decimal year, value, uncertainty).
 * @param {any} s
 * @param {number} n
 * @param {boolean} hasU
 */
function firstPoints(s, n, hasU) {
  return Array.from({ length: Math.min(FIRST_ROWS, n) }, (_, i) => [
    s.date?.[i] ?? fmt(s.time[i]),
    fmt(s.time[i]),
    fmt(s.value[i]),
    ...(hasU ? [fmt(s.uncertainty[i])] : []),
  ]);
}

/**
 * For a derived series, the warnings and cautions of the run that produced it.
 * @param {any} s
 * @returns {Promise<HTMLElement | null>}
 */
async function lineage(s) {
  if (!s.derived_from) return null;
  const run = await call({
    method: "GET",
    path: `/v1/runs/${seg(s.derived_from)}`,
  });
  const cautions = run.ok ? (run.data.result?.cautions ?? []) : [];
  const warnings = run.ok ? (run.data.result?.warnings ?? []) : [];
  return h(
    "div",
    null,
    warnings.length
      ? callout(
        "warn",
        "Warnings of the run that produced it",
        h("ul", null, warnings.map((/** @type {any} */ w) => h("li", null, w))),
      )
      : null,
    cautions.length
      ? callout(
        "",
        "Cautions of the run that produced it",
        h("ul", null, cautions.map((/** @type {string} */ c) => h("li", null, c))),
      )
      : null,
  );
}

/**
 * Analyse, download as CSV, open as JSON.
 * @param {any} s
 * @param {string} path
 */
function seriesActions(s, path) {
  return h(
    "div",
    { class: "actions" },
    h(
      "a",
      { class: "button", href: `#/analyse?series=${encodeURIComponent(s.id)}` },
      "Analyse this series",
    ),
    h(
      "a",
      {
        class: "button ghost",
        href: `${path}?format=csv`,
        download: "series.csv",
        onclick: keyedDownload,
      },
      "Download CSV",
    ),
    h("a", { class: "button ghost", href: path }, "JSON"),
  );
}

/**
 * "About this series": its metadata as a list.
 * @param {any} s
 * @param {number} n
 */
function seriesAbout(s, n) {
  return metaList([
    ["Id", h("code", null, s.id)],
    ["Quantity", s.quantity],
    ["Units", h("code", null, s.units)],
    ["Index version", s.version],
    ["Resolution", s.resolution],
    ["Points", String(n)],
    [
      "Time span",
      `${s.start_date} – ${s.end_date} (decimal years ${fmt(s.start)} – ${fmt(s.end)})`,
    ],
    ["Description", s.description],
    ["Source", s.source],
    [
      "Derived from run",
      s.derived_from
        ? h("a", { href: `#/runs/${s.derived_from}`, title: s.derived_from }, [
          "run ",
          h("code", null, runLabel(s.derived_from)),
        ])
        : null,
    ],
    ["Stored", when(s.created_at)],
  ]);
}

/** @param {number} gen @param {string} id */
export async function seriesView(gen, id) {
  const path = `/v1/series/${seg(id)}`;
  /** @type {RequestSpec} */
  const req = { method: "GET", path, note: "The series with its points (JSON)" };
  const r = await call(req);
  if (!r.ok) return show(gen, "Series", h("h1", null, "Series"), problemBox(r.data));
  const s = r.data;
  const n = s.n ?? s.value?.length ?? 0;
  const hasU = Array.isArray(s.uncertainty);
  const firstRows = firstPoints(s, n, hasU);
  const derived = await lineage(s);
  show(
    gen,
    s.name,
    ...itemHeading(
      "#/series",
      "← All series",
      s.name,
      `${s.quantity} in ${s.units} · ${s.resolution} · ${n} points · ${s.start_date} – ${s.end_date}`,
    ),
    derived,
    chart(`${path}/chart.svg`, `Chart of ${s.name}`),
    seriesActions(s, path),
    h("h2", null, "About this series"),
    seriesAbout(s, n),
    h("h2", null, `First ${firstRows.length} of ${n} points`),
    table(["Date", "Decimal year", "Value", ...(hasU ? ["Uncertainty (1σ)"] : [])], firstRows, {
      numeric: [false, true, true, true],
    }),
    h(
      "p",
      null,
      h(
        "a",
        { href: `${path}?format=csv`, download: "series.csv", onclick: keyedDownload },
        "All points as CSV",
      ),
    ),
    snippets([req, ...downloadRequests(path)]).el,
  );
}
