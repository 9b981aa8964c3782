// @ts-check
/// <reference lib="dom" />
/**
 * The built-in page: a small client of the public API, served as a plain ES module (no build
 * step, no framework). Every view is drawn from the same requests a script would make, and
 * shows them as `curl` and Python `requests` snippets. Text from the service is always set as
 * text, never parsed as HTML; charts (SVG from the service) are parsed as XML and stripped of
 * scripts and event handlers before they are shown.
 *
 * Views (in the URL fragment): #/series, #/series/{id}, #/fields, #/fields/{id} (fields.js),
 * #/runs, #/runs/{id}, #/upload, #/analyse.
 *
 * @module
 */
import { curlScript, pythonSnippet } from "./snippets.js";
import { fieldList, fieldView, mapDownloads } from "./fields.js";
import {
  append,
  badge,
  callout,
  fmt,
  h,
  isObject,
  isScalar,
  metaList,
  pretty,
  runLabel,
  seg,
  table,
  when,
} from "./dom.js";
import {
  apiKey,
  authFetch,
  call,
  deref,
  objectSchema,
  openApi,
  problemBox,
  quantities,
  setApiKey,
  whenUnauthorized,
} from "./service.js";
import { buildFields, collect, markFields, nonNull } from "./forms.js";

/** @typedef {import("./snippets.js").RequestSpec} RequestSpec */
/** @typedef {import("./dom.js").Child} Child */
/** @typedef {import("./forms.js").Field} Field */

const PAGE_SIZE = 20;

/**
 * Rows per page: `limit` in the view's query (1–100), else 20.
 * @param {URLSearchParams} query
 */
function pageSize(query) {
  const n = Math.floor(Number(query.get("limit")));
  return Number.isFinite(n) && n >= 1 ? Math.min(100, n) : PAGE_SIZE;
}
const FIRST_ROWS = 12;
const FINAL = new Set(["succeeded", "failed", "cancelled"]);
/** Analyses offered first, by POST path. */
const BASE = location.origin;

// ---------------------------------------------------------------------------------------------
// Snippets panel

/**
 * "From a script": the view's requests as curl and Python.
 * @param {RequestSpec[]} reqs
 */
function snippets(reqs) {
  // Panels take focus so a keyboard can scroll their long lines.
  const curl = h("pre", {
    id: "snippet-curl",
    role: "tabpanel",
    "aria-labelledby": "tab-curl",
    tabindex: "0",
  });
  const py = h("pre", {
    id: "snippet-python",
    role: "tabpanel",
    "aria-labelledby": "tab-python",
    tabindex: "0",
    hidden: true,
  });
  /**
   * @param {"curl" | "python"} which
   * @param {boolean} [focus]
   */
  const select = (which, focus = false) => {
    curl.hidden = which !== "curl";
    py.hidden = which !== "python";
    for (const [tab, on] of [[tabCurl, which === "curl"], [tabPy, which === "python"]]) {
      const t = /** @type {HTMLElement} */ (tab);
      t.setAttribute("aria-selected", String(on));
      t.tabIndex = on ? 0 : -1; // one tab stop for the tab list (WAI-ARIA tabs pattern)
      if (on && focus) t.focus();
    }
  };
  const tabCurl = h("button", {
    type: "button",
    role: "tab",
    id: "tab-curl",
    "aria-selected": "true",
    "aria-controls": "snippet-curl",
    onclick: () => select("curl"),
  }, "curl");
  const tabPy = h("button", {
    type: "button",
    role: "tab",
    id: "tab-python",
    "aria-selected": "false",
    "aria-controls": "snippet-python",
    tabindex: "-1",
    onclick: () => select("python"),
  }, "Python requests");
  const copy = h("button", {
    type: "button",
    class: "ghost",
    onclick: async () => {
      const text = (curl.hidden ? py : curl).textContent ?? "";
      try {
        await navigator.clipboard.writeText(text);
        copy.textContent = "Copied";
      } catch {
        copy.textContent = "Select the text to copy";
      }
      setTimeout(() => (copy.textContent = "Copy"), 1500);
    },
  }, "Copy");
  const tablist = h(
    "div",
    { role: "tablist", "aria-label": "Snippet language", class: "tablist" },
    tabCurl,
    tabPy,
  );
  // Arrow keys, Home and End move between the tabs.
  tablist.addEventListener("keydown", (e) => {
    if (!["ArrowLeft", "ArrowRight", "Home", "End"].includes(e.key)) return;
    e.preventDefault();
    // Two tabs: an arrow key goes to the other one.
    const next = e.key === "Home"
      ? "curl"
      : e.key === "End"
      ? "python"
      : py.hidden
      ? "python"
      : "curl";
    select(next, true);
  });
  const section = h(
    "section",
    { class: "snippets", "aria-labelledby": "snippets-title" },
    h("h2", { id: "snippets-title" }, "From a script"),
    h("p", { class: "lede" }, "The same requests this view makes, to run from a shell or Python."),
    h("div", { class: "tabs" }, tablist, copy),
    curl,
    py,
  );
  /** @param {RequestSpec[]} r */
  const update = (r) => {
    curl.textContent = curlScript(BASE, r);
    py.textContent = pythonSnippet(BASE, r);
  };
  update(reqs);
  return { el: section, update };
}

// ---------------------------------------------------------------------------------------------
// Charts

/** "light" or "dark", as the page is drawn now. */
function effectiveTheme() {
  const t = document.documentElement.dataset.theme;
  if (t === "light" || t === "dark") return t;
  return matchMedia("(prefers-color-scheme: dark)").matches ? "dark" : "light";
}

/**
 * Remove anything executable from an SVG document before showing it inline.
 * @param {Element} root
 */
function sanitizeSvg(root) {
  for (const bad of root.querySelectorAll("script, foreignObject, iframe, object, embed")) {
    bad.remove();
  }
  for (const el of [root, ...root.querySelectorAll("*")]) {
    for (const a of [...el.attributes]) {
      const v = a.value.trim().toLowerCase();
      if (
        /^on/i.test(a.name) ||
        ((a.name === "href" || a.name.endsWith(":href")) && v.startsWith("javascript:"))
      ) {
        el.removeAttribute(a.name);
      }
    }
  }
}

/**
 * Draw the service's chart at `path` into `box` (width fitted to the box, page theme).
 * @param {HTMLElement} box
 */
async function drawChart(box) {
  const path = box.dataset.src ?? "";
  const width = Math.max(320, Math.min(1000, Math.round((box.clientWidth || 800) - 18)));
  const height = Math.max(240, Math.round(width * (width < 500 ? 0.75 : 0.5)));
  const url = `${path}${
    path.includes("?") ? "&" : "?"
  }width=${width}&height=${height}&theme=${effectiveTheme()}`;
  let res;
  try {
    res = await authFetch(url);
  } catch (e) {
    box.replaceChildren(h("p", { class: "muted" }, `Chart unavailable: ${e}`));
    return;
  }
  if (!res.ok) {
    const p = await res.json().catch(() => null);
    box.replaceChildren(
      h("p", { class: "muted" }, `Chart unavailable: ${p?.detail ?? res.status}`),
    );
    return;
  }
  const doc = new DOMParser().parseFromString(await res.text(), "image/svg+xml");
  const svg = doc.documentElement;
  if (svg.localName !== "svg" || doc.querySelector("parsererror")) {
    box.replaceChildren(h("p", { class: "muted" }, "Chart unavailable: the service sent no SVG"));
    return;
  }
  sanitizeSvg(svg);
  box.replaceChildren(document.importNode(svg, true));
  box.dataset.drawn = "true";
}

/**
 * A download link's click with a key set: a plain link cannot send the key, so fetch the file
 * with it and save that.
 * @param {MouseEvent} e
 */
async function keyedDownload(e) {
  if (!apiKey()) return;
  e.preventDefault();
  const a = /** @type {HTMLAnchorElement} */ (e.currentTarget);
  const res = await authFetch(a.href);
  if (!res.ok) return;
  const url = URL.createObjectURL(await res.blob());
  const tmp = h("a", { href: url, download: a.download || "download" });
  document.body.append(tmp);
  tmp.click();
  tmp.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

/**
 * A chart box for a service chart path; drawn once attached.
 * @param {string} path
 * @param {string} label
 */
function chart(path, label) {
  const box = h(
    "figure",
    { class: "chart", "data-src": path, "aria-label": label },
    h("p", { class: "muted" }, "Drawing the chart…"),
  );
  requestAnimationFrame(() => drawChart(box));
  return box;
}

function redrawCharts() {
  for (const el of document.querySelectorAll("figure.chart[data-src]")) {
    drawChart(/** @type {HTMLElement} */ (el));
  }
}

/** The shared pieces the views of fields.js draw with. */
function ui() {
  return { show, chart, pager, snippets, keyedDownload, pageSize };
}

// ---------------------------------------------------------------------------------------------
// Router

/** Functions to run when the view changes (close event streams, stop timers). */
let cleanups = /** @type {(() => void)[]} */ ([]);
let generation = 0;
const view = /** @type {HTMLElement} */ (document.getElementById("view"));

function parseHash() {
  const raw = location.hash.replace(/^#/, "") || "/series";
  const q = raw.indexOf("?");
  const path = q < 0 ? raw : raw.slice(0, q);
  const parts = path.split("/").filter(Boolean).map(decodeURIComponent);
  return { parts, query: new URLSearchParams(q < 0 ? "" : raw.slice(q + 1)) };
}

/**
 * Replace the view's content (only if no newer navigation happened).
 * @param {number} gen
 * @param {string} title
 * @param {(Child | Child[])[]} content
 */
function show(gen, title, ...content) {
  if (gen !== generation) return false;
  document.title = `${title} · sunlag`;
  view.replaceChildren();
  append(view, content);
  return true;
}

/**
 * Draw the view named by the URL fragment.
 * @param {boolean} [navigated] True after the user moved to another view: focus goes to the
 *   new content (not on the first load, and not when a view redraws itself).
 */
async function render(navigated = false) {
  for (const f of cleanups) f();
  cleanups = [];
  const gen = ++generation;
  const { parts, query } = parseHash();
  const section = parts[0] ?? "series";
  for (const a of document.querySelectorAll("[data-nav]")) {
    if (a.getAttribute("data-nav") === section) a.setAttribute("aria-current", "page");
    else a.removeAttribute("aria-current");
  }
  try {
    if (section === "series" && parts[1]) await seriesView(gen, parts[1]);
    else if (section === "series") await seriesList(gen, query);
    else if (section === "runs" && parts[1]) await runView(gen, parts[1]);
    else if (section === "runs") await runList(gen, query);
    else if (section === "fields" && parts[1]) await fieldView(gen, parts[1], query, ui());
    else if (section === "fields") await fieldList(gen, query, ui());
    else if (section === "upload") await uploadView(gen);
    else if (section === "analyse") await analyseView(gen, query);
    else {show(
        gen,
        "Not found",
        h("h1", null, "No such view"),
        h("p", null, h("a", { href: "#/series" }, "Go to the series")),
      );}
  } catch (e) {
    show(gen, "Error", callout("bad", "The page hit an error", h("p", null, String(e))));
  }
  if (navigated && gen === generation) view.focus({ preventScroll: false });
}

/**
 * Paging links for a list.
 * @param {string} base Hash path, e.g. "#/series".
 * @param {URLSearchParams} query
 * @param {number} offset
 * @param {number} total
 * @param {number} shown
 */
function pager(base, query, offset, total, shown) {
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
function filterSelect(label, name, options, current, base, query) {
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

// ---------------------------------------------------------------------------------------------
// Series

/** @param {number} gen @param {URLSearchParams} query */
async function seriesList(gen, query) {
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
      : h(
        "p",
        { class: "muted", id: "empty" },
        "No series stored yet. ",
        h("a", { href: "#/upload" }, "Upload one"),
        ".",
      ),
    pager("#/series", query, offset, r.data.total, items.length),
    snippets([req]).el,
  );
}

/** @param {number} gen @param {string} id */
async function seriesView(gen, id) {
  const path = `/v1/series/${seg(id)}`;
  /** @type {RequestSpec} */
  const req = { method: "GET", path, note: "The series with its points (JSON)" };
  const r = await call(req);
  if (!r.ok) return show(gen, "Series", h("h1", null, "Series"), problemBox(r.data));
  const s = r.data;
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
  const n = s.n ?? s.value?.length ?? 0;
  const hasU = Array.isArray(s.uncertainty);
  const firstRows = Array.from({ length: Math.min(FIRST_ROWS, n) }, (_, i) => [
    s.date?.[i] ?? fmt(s.time[i]),
    fmt(s.time[i]),
    fmt(s.value[i]),
    ...(hasU ? [fmt(s.uncertainty[i])] : []),
  ]);
  /** @type {HTMLElement | null} */
  let lineage = null;
  if (s.derived_from) {
    const run = await call({
      method: "GET",
      path: `/v1/runs/${seg(s.derived_from)}`,
    });
    const cautions = run.ok ? (run.data.result?.cautions ?? []) : [];
    const warnings = run.ok ? (run.data.result?.warnings ?? []) : [];
    lineage = h(
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
  show(
    gen,
    s.name,
    h("p", { class: "muted" }, h("a", { href: "#/series" }, "← All series")),
    h("h1", null, s.name),
    h(
      "p",
      { class: "lede" },
      `${s.quantity} in ${s.units} · ${s.resolution} · ${n} points · ${s.start_date} – ${s.end_date}`,
    ),
    lineage,
    chart(`${path}/chart.svg`, `Chart of ${s.name}`),
    h(
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
    ),
    h("h2", null, "About this series"),
    metaList([
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
    ]),
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
    snippets([req, csvReq, chartReq]).el,
  );
}

// ---------------------------------------------------------------------------------------------
// Runs

/** @param {number} gen @param {URLSearchParams} query */
async function runList(gen, query) {
  const offset = Math.max(0, Number(query.get("offset")) || 0);
  const kind = query.get("kind") ?? "";
  const status = query.get("status") ?? "";
  /** @type {RequestSpec} */
  const req = {
    method: "GET",
    path: "/v1/runs",
    query: {
      limit: pageSize(query),
      offset,
      kind: kind || undefined,
      status: status || undefined,
    },
    note: "List runs, newest first",
  };
  const [r, version] = await Promise.all([call(req), call({ method: "GET", path: "/v1/version" })]);
  if (!r.ok) return show(gen, "Runs", h("h1", null, "Runs"), problemBox(r.data));
  const kinds = Object.keys(version.data?.algorithms ?? {}).sort();
  const items = /** @type {any[]} */ (r.data.items);
  const rows = items.map((run) => [
    h("a", { href: `#/runs/${run.id}`, title: run.id }, h("code", null, runLabel(run.id))),
    pretty(run.kind),
    badge(run.status),
    run.status === "running" ? `${Math.round(run.progress * 100)} %` : "",
    when(run.created_at),
    run.result_digest
      ? h("code", { title: run.result_digest }, run.result_digest.slice(0, 12) + "…")
      : "—",
  ]);
  show(
    gen,
    "Runs",
    h("h1", null, "Runs"),
    h(
      "p",
      { class: "lede" },
      "Every recorded analysis, newest first. A finished run can be replayed and verified.",
    ),
    h(
      "div",
      { class: "filters" },
      filterSelect("Kind", "kind", kinds, kind, "#/runs", query),
      filterSelect(
        "Status",
        "status",
        ["queued", "running", "succeeded", "failed", "cancelled"],
        status,
        "#/runs",
        query,
      ),
      h("a", { class: "button", href: "#/analyse" }, "Start an analysis"),
    ),
    items.length
      ? table(["Run", "Kind", "Status", "Progress", "Created", "Result digest"], rows)
      : h(
        "p",
        { class: "muted", id: "empty" },
        "No runs yet. ",
        h("a", { href: "#/analyse" }, "Start an analysis"),
        ".",
      ),
    pager("#/runs", query, offset, r.data.total, items.length),
    snippets([req]).el,
  );
  // Keep the list fresh while runs on it are still going.
  if (items.some((run) => !FINAL.has(run.status))) {
    const t = setTimeout(() => gen === generation && render(), 2000);
    cleanups.push(() => clearTimeout(t));
  }
}

/**
 * The result's scalar fields and tables (arrays of records), outputs excluded.
 * @param {Record<string, unknown>} result
 */
function resultParts(result) {
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
function recordTable(name, rows) {
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
function outputTable(runId, name, o) {
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

/** @param {number} gen @param {string} id */
async function runView(gen, id) {
  const path = `/v1/runs/${seg(id)}`;
  /** @type {RequestSpec} */
  const req = {
    method: "GET",
    path,
    note: "The run: parameters, inputs, versions, status, result and digest",
  };
  const r = await call(req);
  if (!r.ok) return show(gen, "Run", h("h1", null, "Run"), problemBox(r.data));
  const run = r.data;
  const reqs = [req];
  const final = FINAL.has(run.status);
  const statusLine = h(
    "p",
    { class: "lede" },
    badge(run.status),
    ` · created ${when(run.created_at)}`,
  );

  /** @type {HTMLElement | null} */
  let live = null;
  if (!final) {
    reqs.push({
      method: "GET",
      path: `${path}/events`,
      stream: true,
      note: "Follow its progress (Server-Sent Events)",
    });
    reqs.push({ method: "POST", path: `${path}/cancel`, note: "Cancel it" });
    live = liveProgress(gen, run);
  }

  const result = isObject(run.result) ? run.result : {};
  // The run's own warnings and cautions, then those of the runs it is built on (linked).
  const inherited = Array.isArray(result.inherited) ? result.inherited : [];
  /** @param {"warning" | "caution"} level */
  const fromRuns = (level) =>
    inherited.filter((/** @type {any} */ n) => n.level === level).map((/** @type {any} */ n) => [
      h("a", { href: `#/runs/${seg(n.run)}` }, `From ${pretty(n.kind)} run ${runLabel(n.run)}`),
      ": ",
      n.text,
    ]);
  const warnings = [
    ...(Array.isArray(result.warnings) ? result.warnings : []),
    ...fromRuns("warning"),
  ];
  const cautions = [
    ...(Array.isArray(result.cautions) ? result.cautions : []),
    ...fromRuns("caution"),
  ];
  const outputs = isObject(result.outputs) ? Object.entries(result.outputs) : [];
  const { scalars, tables } = resultParts(result);
  if (run.status === "succeeded") {
    reqs.push({
      method: "POST",
      path: `${path}/replay`,
      note: "Recompute it from the stored inputs and compare digests",
    });
    reqs.push({
      method: "GET",
      path: `${path}/chart.svg`,
      query: { width: 800, height: 400, theme: "light" },
      save: "run.svg",
      note: "Its chart as SVG",
    });
    for (const [name] of outputs) {
      reqs.push({
        method: "GET",
        path: `${path}/outputs/${seg(name)}`,
        query: { format: "csv" },
        save: `${name}.csv`,
        note: `Output "${name}" as CSV`,
      });
    }
  }

  // Name the input series (one listing request; ids stand in for any not on it).
  const listed = (run.input_series ?? []).length || run.status === "succeeded"
    ? await call({ method: "GET", path: "/v1/series", query: { limit: 1000 } })
    : null;
  const saved = (listed?.ok ? listed.data.items : []).filter((/** @type {any} */ x) =>
    x.derived_from === run.id
  );
  /** @type {Map<string, string>} */
  const names = new Map(
    (listed?.ok ? listed.data.items : []).map((/** @type {any} */ x) => [x.id, x.name]),
  );
  const inputs = [
    ...(run.input_series ?? []).map((/** @type {string} */ s) =>
      h(
        "a",
        { href: `#/series/${seg(s)}`, title: s },
        names.get(s) ?? h("code", null, s),
      )
    ),
    ...(run.input_runs ?? []).map((/** @type {string} */ s) =>
      h("a", { href: `#/runs/${s}`, title: s }, h("code", null, `run ${runLabel(s)}`))
    ),
  ];

  show(
    gen,
    `${pretty(run.kind)} run`,
    h("p", { class: "muted" }, h("a", { href: "#/runs" }, "← All runs")),
    h("h1", null, `${pretty(run.kind)} run ${runLabel(run.id)}`),
    statusLine,
    live,
    run.status === "failed" && run.error ? problemBox(run.error, "The run failed") : null,
    run.status === "cancelled"
      ? callout("warn", "The run was cancelled", h("p", null, "It has no result."))
      : null,
    warnings.length
      ? callout(
        "warn",
        "Warnings",
        h("ul", null, warnings.map((/** @type {any} */ w) => h("li", null, w))),
      )
      : null,
    cautions.length
      ? callout(
        "",
        "Cautions",
        h("ul", { class: "cautions" }, cautions.map((/** @type {any} */ c) => h("li", null, c))),
      )
      : null,
    run.status === "succeeded"
      ? chart(`${path}/chart.svg`, `Chart of the ${pretty(run.kind)} run`)
      : null,
    run.status === "succeeded" && isObject(result.map) ? mapDownloads(run.id, ui()) : null,
    run.status === "succeeded" ? replayPanel(path) : null,
    scalars.length
      ? [
        h("h2", null, "Result"),
        table(["Quantity", "Value"], scalars.map(([k, v]) => [h("code", null, k), fmt(v)]), {
          numeric: [false, true],
        }),
      ]
      : null,
    tables.map(([k, rows]) => recordTable(k, rows)),
    outputs.length ? h("h2", null, "Series outputs") : null,
    outputs.map(([name, o]) => outputTable(run.id, name, o)),
    h("h2", null, "Record"),
    metaList([
      ["Run id", h("code", null, run.id)],
      ["Kind", run.kind],
      ["Status", run.status],
      ["Created", when(run.created_at)],
      ["Updated", when(run.updated_at)],
      ["Inputs", inputs.length ? inputs.flatMap((a, i) => (i ? [h("br"), a] : [a])) : "none"],
      [
        "Saved as series",
        saved.length
          ? saved.flatMap((/** @type {any} */ x, /** @type {number} */ i) => [
            i ? h("br") : null,
            h("a", { href: `#/series/${seg(x.id)}` }, x.name),
          ])
          : null,
      ],
      ["Algorithm version", run.algorithm_version],
      ["Service version", run.service_version],
      ["Seed", run.seed === null ? "none (not random)" : String(run.seed)],
      [
        "Result digest",
        run.result_digest
          ? h("code", { class: "digest" }, run.result_digest)
          : final
          ? "none"
          : "not yet",
      ],
    ]),
    h(
      "details",
      null,
      h("summary", null, "Parameters (every default filled in)"),
      h("pre", null, JSON.stringify(run.params, null, 2)),
    ),
    snippets(reqs).el,
  );
}

/**
 * Progress bar fed by the run's event stream, with cancel.
 * @param {number} gen
 * @param {any} run
 */
function liveProgress(gen, run) {
  const bar = /** @type {HTMLProgressElement} */ (h("progress", {
    id: "run-progress",
    max: "1",
    value: String(run.progress ?? 0),
    "aria-label": "Run progress",
  }));
  const text = h(
    "span",
    { id: "run-progress-text", class: "muted" },
    `${run.status} · ${Math.round((run.progress ?? 0) * 100)} %`,
  );
  const cancel = h("button", {
    type: "button",
    class: "ghost",
    id: "cancel",
    onclick: async () => {
      cancel.setAttribute("disabled", "");
      const res = await call({ method: "POST", path: `/v1/runs/${run.id}/cancel` });
      if (!res.ok) box.append(problemBox(res.data, "Could not cancel"));
    },
  }, "Cancel run");
  const box = h("div", { class: "panel" }, h("div", { class: "progress" }, bar, text, cancel));
  let done = false;
  const finish = () => {
    if (done) return;
    done = true;
    if (gen === generation) render();
  };
  /** @param {MessageEvent} e */
  const onEvent = (e) => {
    let d;
    try {
      d = JSON.parse(e.data);
    } catch {
      return;
    }
    if (typeof d.progress === "number") {
      bar.value = d.progress;
      const eta = typeof d.eta_seconds === "number"
        ? ` · about ${Math.max(0, Math.round(d.eta_seconds))} s left`
        : "";
      text.textContent = `${d.status ?? "running"} · ${Math.round(d.progress * 100)} %${eta}`;
    }
    if (FINAL.has(d.status)) {
      es?.close();
      finish();
    }
  };
  // An EventSource cannot send the key: with a key, the page polls the run instead.
  const es = apiKey() ? null : new EventSource(`/v1/runs/${run.id}/events`);
  es?.addEventListener("progress", onEvent);
  es?.addEventListener("status", onEvent);
  // If the stream drops, fall back to polling the run until it finishes.
  const poller = () => {
    if (done) return;
    es?.close();
    const poll = setInterval(async () => {
      const r = await call({ method: "GET", path: `/v1/runs/${run.id}` });
      if (r.ok) onEvent(new MessageEvent("status", { data: JSON.stringify(r.data) }));
      if (!r.ok || FINAL.has(r.data.status)) {
        clearInterval(poll);
        finish();
      }
    }, 1000);
    cleanups.push(() => clearInterval(poll));
  };
  if (es) es.onerror = poller;
  else poller();
  cleanups.push(() => {
    done = true;
    es?.close();
  });
  return box;
}

/** @param {string} path */
function replayPanel(path) {
  const out = h("div", { id: "replay-result", "aria-live": "polite" });
  const button = h("button", {
    type: "button",
    id: "replay",
    onclick: async () => {
      button.setAttribute("disabled", "");
      out.replaceChildren(h("p", { class: "muted" }, "Recomputing from the stored inputs…"));
      const r = await call({ method: "POST", path: `${path}/replay` });
      button.removeAttribute("disabled");
      if (!r.ok) return out.replaceChildren(problemBox(r.data, "Replay failed"));
      const d = r.data;
      const digests = metaList([
        ["Stored digest", h("code", null, d.stored_digest)],
        ["Replay digest", h("code", null, d.replay_digest ?? "none")],
        [
          "Algorithm version",
          d.algorithm_version
            ? `${d.algorithm_version.recorded} recorded, ${d.algorithm_version.current} now`
            : null,
        ],
      ]);
      out.replaceChildren(
        d.identical
          ? callout(
            "ok",
            "Verified: the replay reproduced the stored result byte for byte",
            h("p", { class: "verified", "data-verified": "true" }, "verified"),
            digests,
            d.note ? h("p", null, d.note) : null,
          )
          : callout(
            "bad",
            "Not verified: the replay gave a different result",
            h("p", { class: "verified", "data-verified": "false" }, "not verified"),
            digests,
            d.note ? h("p", null, d.note) : null,
          ),
      );
    },
  }, "Replay and verify");
  return h(
    "div",
    { class: "panel" },
    h(
      "div",
      { class: "actions" },
      button,
      h(
        "span",
        { class: "muted" },
        "Recompute from the stored inputs and compare the result digests.",
      ),
    ),
    out,
  );
}

// ---------------------------------------------------------------------------------------------
// Analyse

/** @param {number} gen @param {URLSearchParams} query */
async function analyseView(gen, query) {
  const [doc, indexRes, seriesRes, runsRes, fieldsRes] = await Promise.all([
    openApi(),
    call({ method: "GET", path: "/v1/analyses" }),
    call({ method: "GET", path: "/v1/series", query: { limit: 500 } }),
    call({ method: "GET", path: "/v1/runs", query: { limit: 200, status: "succeeded" } }),
    call({ method: "GET", path: "/v1/fields", query: { limit: 200 } }),
  ]);
  const series = seriesRes.ok ? seriesRes.data.items : [];
  const runs = runsRes.ok ? runsRes.data.items : [];
  // The analyses and their order come from the service's registry (GET /v1/analyses); the
  // request schema of each comes from the OpenAPI document.
  /** @type {{ path: string, summary: string, description: string, schema: any, featured: boolean }[]} */
  const kinds = [];
  for (const a of indexRes.ok ? indexRes.data.items : []) {
    const op = doc.paths?.[a.path]?.post;
    const schema = op?.requestBody?.content?.["application/json"]?.schema;
    if (!schema) continue;
    kinds.push({
      path: a.path,
      summary: a.summary,
      description: op.description ?? "",
      schema,
      featured: a.featured,
    });
  }
  const main = kinds.filter((k) => k.featured);
  const more = kinds.filter((k) => !k.featured).sort((a, b) => a.path.localeCompare(b.path));
  const chosenPath = query.get("kind") ?? main[0]?.path ?? more[0]?.path ?? "";
  const kind = kinds.find((k) => k.path === chosenPath);
  if (!kinds.length) {
    return show(
      gen,
      "Analyse",
      h("h1", null, "Start an analysis"),
      h("p", { class: "muted" }, "This service offers no analyses yet."),
    );
  }
  /** @param {Event} e */
  const pick = (e) => {
    const q = new URLSearchParams(query);
    q.set("kind", /** @type {HTMLSelectElement} */ (e.target).value);
    location.hash = "#/analyse?" + q.toString();
  };
  const picker = h(
    "div",
    { class: "field wide" },
    h("label", { for: "analysis" }, "Analysis"),
    h(
      "select",
      { id: "analysis", onchange: pick },
      main.length
        ? h(
          "optgroup",
          { label: "Main analyses" },
          main.map((k) =>
            h("option", { value: k.path, selected: k.path === chosenPath }, k.summary)
          ),
        )
        : null,
      more.length
        ? h(
          "optgroup",
          { label: "More" },
          more.map((k) =>
            h("option", { value: k.path, selected: k.path === chosenPath }, k.summary)
          ),
        )
        : null,
    ),
  );
  if (!kind) {
    return show(
      gen,
      "Analyse",
      h("h1", null, "Start an analysis"),
      picker,
      h("p", null, `No analysis at ${chosenPath}.`),
    );
  }

  const fields = buildFields(doc, kind.schema, "", {
    series,
    runs,
    preselect: query.get("series") ?? undefined,
    fields: fieldsRes.ok ? fieldsRes.data.items : [],
    field: query.get("field") ?? undefined,
  });
  const mainFields = fields.filter((f) => f.main);
  const moreFields = fields.filter((f) => !f.main);
  const status = h("div", { id: "submit-status", "aria-live": "polite" });
  const snip = snippets([]);
  const spec = () => /** @type {RequestSpec} */ ({
    method: "POST",
    path: kind.path,
    headers: { Prefer: "respond-async" },
    json: collect(fields),
    note: "Start the run; the answer's Location names it. Then follow GET /v1/runs/{id}/events",
  });
  const refresh = () => snip.update([spec()]);
  // A reconstruction cites a model run: fill its proxy rows from the model's own terms.
  const modelField = fields.find((f) => f.pointer === "/model");
  const recordField = fields.find((f) =>
    f.itemKeys?.includes("term") && f.itemKeys.includes("series")
  );
  if (modelField && recordField) {
    const prefill = async () => {
      const id = modelField.read();
      if (typeof id !== "string" || !/^[0-9a-f-]{36}$/.test(id)) return;
      const r = await call({ method: "GET", path: `/v1/runs/${id}` });
      const terms = r.ok ? r.data?.result?.model?.terms : null;
      if (!Array.isArray(terms)) return;
      recordField.set?.(terms.map((t) => ({ term: t.name, series: t.series })));
      const sunspot = fields.find((f) => f.pointer === "/sunspot_number");
      const mapped = r.data?.result?.mappings?.sunspot_series;
      if (sunspot && mapped) sunspot.set?.(mapped);
      refresh();
    };
    modelField.input.addEventListener("change", prefill);
    prefill();
  }
  const form = h(
    "form",
    {
      id: "analysis-form",
      novalidate: true,
      oninput: refresh,
      onchange: refresh,
      onsubmit: async (/** @type {Event} */ e) => {
        e.preventDefault();
        const submit = /** @type {HTMLButtonElement} */ (form.querySelector("button[type=submit]"));
        submit.disabled = true;
        status.replaceChildren(h("p", { class: "muted" }, "Starting…"));
        const r = await call(spec());
        submit.disabled = false;
        if (r.ok && r.data?.id) {
          location.hash = `#/runs/${r.data.id}`;
          return;
        }
        const rest = markFields(fields, r.data);
        status.replaceChildren(
          problemBox(
            rest.length || !r.data?.errors ? r.data : { ...r.data, errors: [] },
            "The run was not started",
          ),
        );
      },
    },
    h("div", { class: "grid" }, mainFields.map((f) => f.wrap)),
    moreFields.length
      ? h(
        "details",
        // Open when nothing is required (e.g. "groups or a total area": the user must choose).
        { open: mainFields.length === 0 },
        h("summary", null, `More options (${moreFields.length}, defaults shown)`),
        h("div", { class: "grid" }, moreFields.map((f) => f.wrap)),
      )
      : null,
    h(
      "div",
      { class: "actions" },
      h("button", { type: "submit" }, "Start run"),
      h("span", { class: "muted" }, "Long runs report progress here as they go."),
    ),
    status,
  );
  show(
    gen,
    "Analyse",
    h("h1", null, "Start an analysis"),
    h(
      "p",
      { class: "lede" },
      "Pick an analysis and its series. Every run is recorded with its inputs and versions, so it can be replayed later.",
    ),
    h("div", { class: "grid" }, picker),
    h("h2", null, kind.summary),
    kind.description ? h("p", { class: "muted" }, kind.description) : null,
    modelField && !runs.some((/** @type {any} */ r) => /model/.test(r.kind))
      ? callout(
        "warn",
        "This analysis needs a calibrated model run",
        h(
          "p",
          null,
          "None has succeeded yet. ",
          h("a", { href: "#/analyse?kind=/v1/irradiance/models" }, "Calibrate a model"),
          " first, then come back.",
        ),
      )
      : null,
    series.length ? null : callout(
      "warn",
      "No series stored yet",
      h("p", null, h("a", { href: "#/upload" }, "Upload a series"), " first."),
    ),
    form,
    snip.el,
  );
  refresh();
}

// ---------------------------------------------------------------------------------------------
// Upload

/** Query parameters of a text upload that are series metadata (sent in the body for JSON). */
const META = ["name", "quantity", "units", "version", "description", "source"];
/** Text-upload parameters shown first; the others sit under "More reading rules". */
const COLUMN_PARAMS = ["time", "value", "uncertainty"];

/**
 * A few lines of the uploaded text around a problem row, the row highlighted and the cell
 * marked.
 * @param {string} text
 * @param {number} row 1-based line number.
 * @param {string | number | undefined} column Header name or 0-based index.
 * @param {string} delimiter "comma", "semicolon", "tab", "whitespace" or "" (guess).
 */
function excerpt(text, row, column, delimiter) {
  const lines = text.split(/\r\n|\n|\r/);
  if (lines.length > 1 && lines[lines.length - 1] === "") lines.pop();
  const header = lines.find((l) => l.trim() !== "" && !l.trimStart().startsWith("#")) ?? "";
  const guess = delimiter ||
    (header.includes("\t")
      ? "tab"
      : header.includes(";")
      ? "semicolon"
      : header.includes(",")
      ? "comma"
      : "whitespace");
  const sep = { comma: ",", semicolon: ";", tab: "\t" }[guess];
  /** @param {string} l */
  const split = (l) => (sep ? l.split(sep) : l.trim().split(/\s+/));
  let col = -1;
  if (typeof column === "number") col = column;
  else if (typeof column === "string") {
    col = split(header).map((c) => c.trim().replace(/^"|"$/g, "")).indexOf(column);
  }
  const from = Math.max(1, row - 3);
  const to = Math.min(lines.length, row + 2);
  const pre = h("pre", { class: "excerpt", "aria-label": `Lines ${from} to ${to} of the file` });
  for (let i = from; i <= to; i++) {
    const l = lines[i - 1] ?? "";
    const num = String(i).padStart(String(to).length, " ") + " │ ";
    const line = h("span", { class: i === row ? "line bad" : "line" }, num);
    if (i === row && col >= 0 && sep) {
      const cells = l.split(sep);
      cells.forEach((c, j) => {
        if (j) line.append(sep);
        line.append(j === col ? h("mark", null, c === "" ? "␣" : c) : c);
      });
    } else line.append(l);
    pre.append(line);
  }
  return pre;
}

/** @param {number} gen */
async function uploadView(gen) {
  const doc = await openApi();
  const qs = await quantities();
  const op = doc.paths?.["/v1/series"]?.post ?? {};
  const params =
    /** @type {any[]} */ ((op.parameters ?? []).map((/** @type {any} */ p) => deref(doc, p)).filter(
      (/** @type {any} */ p) => p.in === "query",
    ));
  const uploadSchema = objectSchema(doc, op.requestBody?.content?.["application/json"]?.schema);
  const status = h("div", { id: "upload-status", "aria-live": "polite" });
  const snip = snippets([]);

  const file = /** @type {HTMLInputElement} */ (h("input", {
    id: "up-file",
    type: "file",
    accept: ".csv,.txt,.tsv,.dat,.json,text/csv,application/json,text/plain",
  }));
  const paste = /** @type {HTMLTextAreaElement} */ (h("textarea", {
    id: "up-text",
    rows: "6",
    spellcheck: "false",
    placeholder: "date,value\n2001-01,80.2\n2001-02,85.1",
  }));
  const fmtText = /** @type {HTMLInputElement} */ (h("input", {
    type: "radio",
    name: "format",
    id: "fmt-text",
    value: "text",
    checked: true,
  }));
  const fmtJson = /** @type {HTMLInputElement} */ (h("input", {
    type: "radio",
    name: "format",
    id: "fmt-json",
    value: "json",
  }));

  /**
   * One input for a query parameter (or body field) of the upload.
   * @param {string} name
   * @param {any} schema
   * @param {string} description
   * @param {boolean} required
   */
  const paramField = (name, schema, description, required) => {
    const s = deref(doc, nonNull(doc, schema).schema);
    const id = `up-${name}`;
    /** @type {HTMLInputElement | HTMLSelectElement} */
    let input;
    if (name === "quantity" && qs.length) {
      input = /** @type {HTMLSelectElement} */ (h(
        "select",
        { id, name },
        h("option", { value: "" }, "choose…"),
        qs.map((q) => h("option", { value: q }, q)),
      ));
    } else if (Array.isArray(s.enum)) {
      input = /** @type {HTMLSelectElement} */ (h(
        "select",
        { id, name },
        h(
          "option",
          { value: "" },
          s.default !== undefined ? `default (${s.default})` : "automatic",
        ),
        s.enum.map((/** @type {string} */ v) => h("option", { value: v }, v)),
      ));
    } else {
      input = /** @type {HTMLInputElement} */ (h("input", {
        id,
        name,
        type: "text",
        autocomplete: "off",
        placeholder: s.example !== undefined ? String(s.example) : "",
      }));
    }
    const error = h("span", { class: "field-error", id: `${id}-err` });
    input.setAttribute("aria-describedby", `${id}-hint ${id}-err`);
    const wrap = h(
      "div",
      { class: "field", "data-param": name },
      h("label", { for: id }, pretty(name), required ? " *" : ""),
      input,
      h("span", { class: "hint", id: `${id}-hint` }, description),
      error,
    );
    return { name, input, wrap, error };
  };

  const byName = new Map(params.map((p) => [p.name, p]));
  const metaFields = META.map((n) => {
    const p = byName.get(n);
    const bodyProp = uploadSchema?.properties?.[n] ??
      deref(doc, doc?.components?.schemas?.InlineSeries)?.properties?.[n];
    return paramField(
      n,
      p?.schema ?? bodyProp ?? { type: "string" },
      p?.description ?? bodyProp?.description ?? "",
      ["name", "quantity", "units"].includes(n),
    );
  });
  const textFields = params.filter((p) => !META.includes(p.name)).map((p) =>
    paramField(p.name, p.schema, p.description ?? p.schema?.description ?? "", false)
  );
  const jsonOptionNames = Object.keys(uploadSchema?.properties ?? {}).filter((n) =>
    !META.includes(n) && !["time", "value", "uncertainty"].includes(n)
  );
  const jsonFields = jsonOptionNames.map((n) =>
    paramField(
      `json-${n}`,
      uploadSchema.properties[n],
      deref(doc, uploadSchema.properties[n]).description ?? "",
      false,
    )
  );
  const all = [...metaFields, ...textFields, ...jsonFields];

  const textBox = h(
    "fieldset",
    { id: "text-options" },
    h("legend", null, "Columns and reading rules (delimited text)"),
    h(
      "div",
      { class: "grid" },
      textFields.filter((f) => COLUMN_PARAMS.includes(f.name)).map((f) => f.wrap),
    ),
    h(
      "details",
      null,
      h("summary", null, "More reading rules (date parts, delimiter, missing values, duplicates)"),
      h(
        "div",
        { class: "grid" },
        textFields.filter((f) => !COLUMN_PARAMS.includes(f.name)).map((f) => f.wrap),
      ),
    ),
  );
  const jsonBox = h(
    "fieldset",
    { id: "json-options", hidden: true },
    h("legend", null, "Reading rules (JSON)"),
    h(
      "p",
      { class: "hint" },
      "The JSON holds name, quantity, units, time, value and optional uncertainty; fields filled in above are added where the file has none.",
    ),
    h("div", { class: "grid" }, jsonFields.map((f) => f.wrap)),
  );

  const isJson = () => fmtJson.checked;
  /** @returns {Record<string, string>} */
  const values = () =>
    Object.fromEntries(all.map((f) => [f.name, f.input.value.trim()]).filter(([, v]) => v !== ""));
  const fileName = () => file.files?.[0]?.name ?? (isJson() ? "series.json" : "series.csv");

  /** @returns {Promise<{ spec: RequestSpec, text?: string, local?: string }>} */
  const buildRequest = async () => {
    const v = values();
    const text = file.files?.[0] ? await file.files[0].text() : paste.value;
    if (!isJson()) {
      /** @type {Record<string, string>} */
      const query = {};
      for (const f of [...metaFields, ...textFields]) {
        if (v[f.name] !== undefined) query[f.name] = v[f.name];
      }
      return {
        spec: {
          method: "POST",
          path: "/v1/series",
          query,
          file: fileName(),
          contentType: "text/csv",
          note: "Upload delimited text; the query names the columns",
        },
        text,
      };
    }
    /** @type {any} */
    let body;
    try {
      body = text.trim() ? JSON.parse(text) : {};
    } catch (e) {
      return {
        spec: { method: "POST", path: "/v1/series" },
        local: `The file is not valid JSON: ${/** @type {Error} */ (e).message}`,
      };
    }
    if (!isObject(body)) {
      return {
        spec: { method: "POST", path: "/v1/series" },
        local: "The JSON must be an object with name, quantity, units, time and value",
      };
    }
    for (const f of metaFields) {
      if (v[f.name] !== undefined && body[f.name] === undefined) body[f.name] = v[f.name];
    }
    for (const f of jsonFields) {
      const key = f.name.replace(/^json-/, "");
      const raw = v[f.name];
      if (raw === undefined) continue;
      const s = deref(doc, uploadSchema.properties[key]);
      body[key] = s.type === "array"
        ? raw.split(",").map((x) => x.trim()).map((
          x,
        ) => (x !== "" && Number.isFinite(Number(x)) ? Number(x) : x))
        : raw;
    }
    const small = JSON.stringify(body).length <= 3000;
    return {
      spec: small
        ? { method: "POST", path: "/v1/series", json: body, note: "Upload a JSON series" }
        : {
          method: "POST",
          path: "/v1/series",
          file: fileName(),
          contentType: "application/json",
          note: "Upload a JSON series (the file, with the form's fields added)",
        },
      text: small ? undefined : JSON.stringify(body),
    };
  };
  const refresh = async () => {
    textBox.hidden = isJson();
    jsonBox.hidden = !isJson();
    const { spec } = await buildRequest();
    snip.update([spec]);
  };

  const form = h(
    "form",
    {
      id: "upload-form",
      novalidate: true,
      onchange: refresh,
      oninput: refresh,
      onsubmit: async (/** @type {Event} */ e) => {
        e.preventDefault();
        for (const f of all) {
          f.error.textContent = "";
          f.input.removeAttribute("aria-invalid");
        }
        const built = await buildRequest();
        if (built.local) {
          return status.replaceChildren(callout("bad", "Not sent", h("p", null, built.local)));
        }
        if (!built.text && built.spec.json === undefined) {
          return status.replaceChildren(
            callout("bad", "Nothing to upload", h("p", null, "Choose a file or paste the data.")),
          );
        }
        status.replaceChildren(h("p", { class: "muted" }, "Uploading…"));
        const r = await call(built.spec, built.spec.json === undefined ? { text: built.text } : {});
        if (r.ok) {
          const s = r.data.series;
          const rep = r.data.report ?? {};
          status.replaceChildren(callout(
            "ok",
            r.data.created
              ? "Stored as a new series"
              : "Already stored: the same content was uploaded before",
            h(
              "p",
              null,
              h("a", { href: `#/series/${seg(s.id)}`, id: "uploaded-link" }, s.name),
              ` · ${s.quantity} in ${s.units} · ${s.n} points · ${s.start_date} – ${s.end_date}`,
            ),
            h(
              "p",
              { class: "muted" },
              `Read ${rep.read ?? "?"}, kept ${rep.kept ?? "?"}, missing ${
                rep.missing ?? 0
              }, merged duplicates ${rep.aggregated ?? 0}.`,
            ),
            h("p", null, h("a", { href: "#/series" }, "See all series")),
          ));
          return;
        }
        // Point at the form field for query/body metadata problems, and at the row and column
        // of the file for data problems.
        const p = r.data ?? {};
        for (const err of p.errors ?? []) {
          const key = String(err.pointer ?? "").split("/")[1];
          const f = all.find((x) => x.name === key || x.name === `json-${key}`);
          if (f && err.row === undefined) {
            f.error.textContent = err.message;
            f.input.setAttribute("aria-invalid", "true");
            f.wrap.closest("details")?.setAttribute("open", "");
          }
        }
        const placed = (p.errors ?? []).find((/** @type {any} */ e) => typeof e.row === "number");
        status.replaceChildren(
          problemBox(p, "The series was not stored"),
          placed
            ? h(
              "div",
              { class: "panel", id: "problem-place" },
              h(
                "p",
                null,
                `First problem at row ${placed.row}`,
                placed.column !== undefined ? `, column ${placed.column}` : "",
                `: ${placed.message}`,
              ),
              built.text
                ? excerpt(built.text, placed.row, placed.column, values().delimiter ?? "")
                : "",
            )
            : "",
        );
        status.scrollIntoView({ block: "nearest" });
      },
    },
    h(
      "fieldset",
      null,
      h("legend", null, "Data"),
      h(
        "div",
        { class: "choice", role: "radiogroup", "aria-label": "Format" },
        h("label", { for: "fmt-text" }, fmtText, "Delimited text (CSV, TSV, …)"),
        h("label", { for: "fmt-json" }, fmtJson, "JSON"),
      ),
      h(
        "div",
        { class: "grid" },
        h(
          "div",
          { class: "field" },
          h("label", { for: "up-file" }, "File"),
          file,
          h("span", { class: "hint" }, "Or paste the data below."),
        ),
        h("div", { class: "field wide" }, h("label", { for: "up-text" }, "Pasted data"), paste),
      ),
    ),
    h(
      "fieldset",
      null,
      h("legend", null, "About the series"),
      h("div", { class: "grid" }, metaFields.map((f) => f.wrap)),
    ),
    textBox,
    jsonBox,
    h(
      "div",
      { class: "actions" },
      h("button", { type: "submit" }, "Upload"),
      h("span", { class: "muted" }, "Nothing is stored unless every row reads cleanly."),
    ),
    status,
  );
  file.addEventListener("change", () => {
    const n = file.files?.[0]?.name ?? "";
    if (/\.json$/i.test(n)) fmtJson.checked = true;
    else if (n) fmtText.checked = true;
    refresh();
  });
  show(
    gen,
    "Upload",
    h("h1", null, "Upload a series"),
    h(
      "p",
      { class: "lede" },
      "Delimited text with a header row (comma, semicolon, tab or spaces; # comments), or a JSON series. The options are those of POST /v1/series.",
    ),
    form,
    snip.el,
  );
  refresh();
}

// ---------------------------------------------------------------------------------------------
// Theme and start

const THEMES = ["auto", "light", "dark"];
const themeButton = /** @type {HTMLButtonElement} */ (document.getElementById("theme"));

/** @param {string} t */
function applyTheme(t) {
  if (t === "light" || t === "dark") document.documentElement.dataset.theme = t;
  else delete document.documentElement.dataset.theme;
  themeButton.textContent = `Theme: ${t}`;
}

let theme = "auto";
try {
  theme = localStorage.getItem("sunlag-theme") ?? "auto";
} catch {
  theme = "auto";
}
applyTheme(theme);
themeButton.addEventListener("click", () => {
  theme = THEMES[(THEMES.indexOf(theme) + 1) % THEMES.length];
  try {
    localStorage.setItem("sunlag-theme", theme);
  } catch {
    // storage unavailable (private mode): the choice lasts for this page only
  }
  applyTheme(theme);
  redrawCharts();
});
matchMedia("(prefers-color-scheme: dark)").addEventListener(
  "change",
  () => theme === "auto" && redrawCharts(),
);

// ---------------------------------------------------------------------------------------------
// API key: asked for when the instance requires one, kept for this tab only

const keyButton = /** @type {HTMLButtonElement} */ (document.getElementById("key"));
const keyDialog = /** @type {HTMLDialogElement} */ (document.getElementById("key-dialog"));
const keyForm = /** @type {HTMLFormElement} */ (document.getElementById("key-form"));
const keyInput = /** @type {HTMLInputElement} */ (document.getElementById("key-input"));
const keyMessage = /** @type {HTMLElement} */ (document.getElementById("key-message"));

/** Show who the page acts as, from `GET /v1/me`. */
async function showIdentity() {
  const me = await call({ method: "GET", path: "/v1/me" });
  if (!me.ok) {
    keyButton.textContent = "API key…";
    return me;
  }
  keyButton.hidden = !me.data.keys_required && !apiKey();
  keyButton.textContent = me.data.owner ? `Key: ${me.data.owner} (${me.data.role})` : "API key…";
  return me;
}

/** @param {string} message */
function askForKey(message) {
  keyMessage.textContent = message;
  keyInput.value = "";
  if (!keyDialog.open) keyDialog.showModal();
}

keyButton.addEventListener("click", () =>
  askForKey(
    apiKey()
      ? "This tab uses a key. Give another, or clear the field to forget it."
      : "This instance requires an API key for anything not public. Ask its admin for one.",
  ));
keyForm.addEventListener("submit", async (e) => {
  e.preventDefault();
  setApiKey(keyInput.value.trim());
  keyDialog.close();
  await showIdentity();
  render(true);
});
document.getElementById("key-cancel")?.addEventListener("click", () => keyDialog.close());
whenUnauthorized((detail) => askForKey(detail));

addEventListener("hashchange", () => render(true));
showIdentity().then((me) => {
  if (me.ok && me.data.keys_required && !apiKey()) {
    askForKey("This instance requires an API key; without one you see public items only.");
  }
});
render();
