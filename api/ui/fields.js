// @ts-check
/// <reference lib="dom" />
/**
 * The page's views of gridded fields: `#/fields` (stored fields, newest first) and
 * `#/fields/{id}` (a time slice as a map chart with a time picker, the series of a chosen cell
 * with a link to save it as a stored series, metadata, downloads, and the analyses that take a
 * field). Like the rest of the page, every number comes from the public API and every view
 * shows its requests as snippets.
 *
 * The views get the page's shared pieces (show, chart, pager, snippets, keyed downloads) from
 * kit.js as `ui`, so they look and behave like the other views.
 *
 * @module
 */
import { fmt, h, metaList, seg, table, when } from "./dom.js";
import { call, problemBox } from "./service.js";
import { itemHeading } from "./lists.js";

/**
 * @typedef {{
 *   show: (gen: number, title: string, ...content: any[]) => unknown,
 *   chart: (path: string, label: string) => HTMLElement,
 *   pager: (base: string, query: URLSearchParams, offset: number, total: number, shown: number) => HTMLElement | null,
 *   snippets: (reqs: any[]) => { el: HTMLElement },
 *   keyedDownload: (e: MouseEvent) => void,
 *   pageSize: (query: URLSearchParams) => number,
 * }} Ui
 */

/** @param {number} gen @param {URLSearchParams} query @param {Ui} ui */
export async function fieldList(gen, query, ui) {
  const offset = Math.max(0, Number(query.get("offset")) || 0);
  const req = {
    method: "GET",
    path: "/v1/fields",
    query: { limit: ui.pageSize(query), offset },
    note: "List stored gridded fields, newest first",
  };
  const r = await call(req);
  if (!r.ok) return ui.show(gen, "Fields", h("h1", null, "Gridded fields"), problemBox(r.data));
  const items = /** @type {any[]} */ (r.data.items);
  const rows = items.map((f) => [
    h("a", { href: `#/fields/${seg(f.id)}` }, f.name),
    f.quantity,
    h("code", null, f.units),
    `${f.n_lat} × ${f.n_lon}`,
    `${f.start_date} – ${f.end_date}`,
    f.resolution,
    f.n_time,
    when(f.created_at),
  ]);
  ui.show(
    gen,
    "Fields",
    h("h1", null, "Gridded fields"),
    h(
      "p",
      { class: "lede" },
      "Fields on a latitude–longitude grid (uploaded as NetCDF-CF with POST /v1/fields). " +
        "Open one to see its maps and the series of any cell.",
    ),
    items.length
      ? table(
        ["Name", "Quantity", "Units", "Grid", "Time span", "Resolution", "Steps", "Stored"],
        rows,
        { numeric: [false, false, false, false, false, false, true, false] },
      )
      : h("p", { class: "muted", id: "empty" }, "No field stored yet."),
    ui.pager("#/fields", query, offset, r.data.total, items.length),
    ui.snippets([req]).el,
  );
}

/**
 * The time and cell picker: a submit navigates to the view with them in its query.
 * @param {string} id
 * @param {string} time
 * @param {string} lat
 * @param {string} lon
 */
function slicePicker(id, time, lat, lon) {
  return h(
    "form",
    {
      class: "filters",
      onsubmit: (/** @type {SubmitEvent} */ e) => {
        e.preventDefault();
        const form = /** @type {HTMLFormElement} */ (e.currentTarget);
        const q = new URLSearchParams(
          /** @type {any} */ (new FormData(form)),
        );
        location.hash = `#/fields/${seg(id)}?${q}`;
      },
    },
    h(
      "div",
      null,
      h("label", { for: "field-time" }, "Time (ISO month or decimal year)"),
      h("input", { id: "field-time", name: "time", value: time, size: 12 }),
    ),
    h(
      "div",
      null,
      h("label", { for: "field-lat" }, "Cell latitude"),
      h("input", { id: "field-lat", name: "lat", value: lat, size: 6 }),
    ),
    h(
      "div",
      null,
      h("label", { for: "field-lon" }, "Cell longitude"),
      h("input", { id: "field-lon", name: "lon", value: lon, size: 6 }),
    ),
    h("button", { type: "submit" }, "Show"),
  );
}

/**
 * The chosen cell's series: first rows, save as a stored series, CSV; or why there is none.
 * @param {string} path The field's path.
 * @param {string} lat
 * @param {string} lon
 * @param {{ ok: boolean, data: any }} cell The answer of `GET {path}/cells`.
 * @param {Ui} ui
 * @returns {any[]}
 */
function cellSection(path, lat, lon, cell, ui) {
  if (!cell.ok) return [problemBox(cell.data, "The cell's series")];
  const c = cell.data;
  const n = c.value.length;
  const rows = Array.from({ length: Math.min(12, n) }, (_, i) => [c.date[i], fmt(c.value[i])]);
  const save = h("button", {
    type: "button",
    class: "ghost",
    onclick: async () => {
      const s = await call({
        method: "POST",
        path: `${path}/cells/series`,
        query: { lat, lon },
      });
      if (s.ok) location.hash = `#/series/${seg(s.data.series.id)}`;
      else save.replaceWith(problemBox(s.data));
    },
  }, "Save as a stored series");
  return [
    h("h2", null, `Cell at ${c.cell.lat}° N, ${c.cell.lon}° E`),
    table(["Date", `Value (${c.units})`], rows, { numeric: [false, true] }),
    h(
      "div",
      { class: "actions" },
      save,
      h("a", {
        class: "button ghost",
        href: `${path}/cells?lat=${encodeURIComponent(lat)}&lon=${
          encodeURIComponent(lon)
        }&format=csv`,
        download: "cell.csv",
        onclick: ui.keyedDownload,
      }, "Download the cell's CSV"),
    ),
  ];
}

/**
 * The analyses that take this field, and the shown map's CSV.
 * @param {any} f
 * @param {string} path
 * @param {string} time
 * @param {Ui} ui
 */
function fieldActions(f, path, time, ui) {
  /** @param {string} kind */
  const analyse = (kind) =>
    `#/analyse?kind=${encodeURIComponent(`/v1/${kind}`)}&field=${encodeURIComponent(f.id)}`;
  return h(
    "div",
    { class: "actions" },
    h("a", { class: "button", href: analyse("solar-signal-maps") }, "Map the solar signal"),
    h("a", { class: "button ghost", href: analyse("field-composites") }, "Composite maps"),
    h("a", { class: "button ghost", href: analyse("field-area-means") }, "Area mean"),
    h("a", {
      class: "button ghost",
      href: `${path}/slices?time=${encodeURIComponent(time)}&format=csv`,
      download: "slice.csv",
      onclick: ui.keyedDownload,
    }, "Download this map's CSV"),
  );
}

/** @param {any} f "About this field": its metadata as a list. */
function fieldAbout(f) {
  return metaList([
    ["Id", h("code", null, f.id)],
    ["Variable", h("code", null, f.variable)],
    ["Units", h("code", null, f.units)],
    ["Calendar", `${f.info.calendar} (${f.info.time_units})`],
    ["Times placed", f.info.time_placement],
    ["Missing values", `${f.missing}`],
    ["Range", `${fmt(f.info.min)} … ${fmt(f.info.max)}`],
    ["Uploaded as", f.info.format],
    ["Holder", `${f.owner} (${f.visibility})`],
    ["Stored", when(f.created_at)],
  ]);
}

/**
 * @param {number} gen
 * @param {string} id
 * @param {URLSearchParams} query
 * @param {Ui} ui
 */
export async function fieldView(gen, id, query, ui) {
  const path = `/v1/fields/${seg(id)}`;
  const req = { method: "GET", path, note: "The field's metadata and coordinates" };
  const r = await call(req);
  if (!r.ok) return ui.show(gen, "Field", h("h1", null, "Field"), problemBox(r.data));
  const f = r.data;
  const time = query.get("time") ?? f.date[f.date.length - 1];
  const lat = query.get("lat") ?? String(f.lat[Math.floor(f.lat.length / 2)]);
  const lon = query.get("lon") ?? String(f.lon[Math.floor(f.lon.length / 2)]);
  const slice = `${path}/slices/chart.svg?time=${encodeURIComponent(time)}`;
  const cellReq = {
    method: "GET",
    path: `${path}/cells`,
    query: { lat, lon },
    note: "The series of the cell nearest to lat/lon",
  };
  const cell = await call(cellReq);
  ui.show(
    gen,
    f.name,
    ...itemHeading(
      "#/fields",
      "← All fields",
      f.name,
      `${f.quantity} in ${f.units} · ${f.resolution} · ${f.n_lat} × ${f.n_lon} cells · ` +
        `${f.n_time} steps · ${f.start_date} – ${f.end_date} · ${f.info.calendar} calendar`,
    ),
    slicePicker(id, time, lat, lon),
    ui.chart(slice, `Map of ${f.name} at ${time}`),
    fieldActions(f, path, time, ui),
    cellSection(path, lat, lon, cell, ui),
    h("h2", null, "About this field"),
    fieldAbout(f),
    ui.snippets([req, cellReq, {
      method: "GET",
      path: `${path}/slices/chart.svg`,
      query: { time },
      save: "slice.svg",
      note: "The map as SVG",
    }]).el,
  );
}

/**
 * Download links of a run's map (NetCDF-CF and CSV of cells), for runs whose result has one.
 * @param {string} runId
 * @param {Ui} ui
 */
export function mapDownloads(runId, ui) {
  const base = `/v1/runs/${seg(runId)}/map`;
  return h(
    "div",
    { class: "actions" },
    h("a", {
      class: "button",
      href: `${base}?format=netcdf`,
      download: "map.nc",
      onclick: ui.keyedDownload,
    }, "Download the map (NetCDF-CF)"),
    h("a", {
      class: "button ghost",
      href: `${base}?format=csv`,
      download: "map.csv",
      onclick: ui.keyedDownload,
    }, "Cells as CSV"),
  );
}
