// @ts-check
/// <reference lib="dom" />
/**
 * The page's views of runs: `#/runs` (newest first, filtered by kind and status, refreshed
 * while runs are going) and `#/runs/{id}` (progress and cancel while it runs; warnings,
 * cautions, chart, replay, result, outputs and the record once it has finished).
 *
 * @module
 */
import {
  badge,
  callout,
  fmt,
  h,
  isObject,
  metaList,
  pretty,
  runLabel,
  seg,
  table,
  when,
} from "./dom.js";
import { call, problemBox } from "./service.js";
import { onLeave, redrawIfCurrent, show } from "./shell.js";
import { chart } from "./charts.js";
import { emptyList, filterSelect, itemHeading, pager, pageSize } from "./lists.js";
import { snippets } from "./snippet_panel.js";
import { mapDownloads } from "./fields.js";
import { ui } from "./kit.js";
import { outputTable, recordTable, resultParts } from "./run_result.js";
import { FINAL, liveProgress, replayPanel } from "./run_actions.js";

/** @typedef {import("./snippets.js").RequestSpec} RequestSpec */
/** @typedef {import("./dom.js").Child} Child */

/** @param {number} gen @param {URLSearchParams} query */
export async function runList(gen, query) {
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
      : emptyList("No runs yet. ", "#/analyse", "Start an analysis"),
    pager("#/runs", query, offset, r.data.total, items.length),
    snippets([req]).el,
  );
  // Keep the list fresh while runs on it are still going.
  if (items.some((run) => !FINAL.has(run.status))) {
    const t = setTimeout(() => redrawIfCurrent(gen), 2000);
    onLeave(() => clearTimeout(t));
  }
}

/**
 * The requests a succeeded run adds to its view: replay, chart, each output as CSV.
 * @param {string} path
 * @param {[string, unknown][]} outputs
 * @returns {RequestSpec[]}
 */
function finishedRequests(path, outputs) {
  /** @type {RequestSpec[]} */
  const reqs = [{
    method: "POST",
    path: `${path}/replay`,
    note: "Recompute it from the stored inputs and compare digests",
  }, {
    method: "GET",
    path: `${path}/chart.svg`,
    query: { width: 800, height: 400, theme: "light" },
    save: "run.svg",
    note: "Its chart as SVG",
  }];
  for (const [name] of outputs) {
    reqs.push({
      method: "GET",
      path: `${path}/outputs/${seg(name)}`,
      query: { format: "csv" },
      save: `${name}.csv`,
      note: `Output "${name}" as CSV`,
    });
  }
  return reqs;
}

/**
 * The run's own warnings and cautions, then those of the runs it is built on (linked).
 * @param {Record<string, any>} result
 */
function runNotes(result) {
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
  return [
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
  ];
}

/**
 * The run's inputs as links (series named from one listing request; ids stand in for any not
 * on it), and the stored series saved from its outputs.
 * @param {any} run
 */
async function runLinks(run) {
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
  return { inputs, saved };
}

/**
 * A succeeded run's chart, map downloads, replay, numbers, tables and series outputs.
 * @param {any} run
 * @param {string} path
 * @param {Record<string, any>} result
 * @param {[string, unknown][]} outputs
 * @returns {(Child | Child[])[]}
 */
function runResult(run, path, result, outputs) {
  const { scalars, tables } = resultParts(result);
  const ok = run.status === "succeeded";
  return [
    ok ? chart(`${path}/chart.svg`, `Chart of the ${pretty(run.kind)} run`) : null,
    ok && isObject(result.map) ? mapDownloads(run.id, ui()) : null,
    ok ? replayPanel(path) : null,
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
  ];
}

/**
 * The run's record: ids, inputs, saved series, versions, seed, digest.
 * @param {any} run
 * @param {HTMLElement[]} inputs
 * @param {any[]} saved
 */
function runRecord(run, inputs, saved) {
  return metaList([
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
        : FINAL.has(run.status)
        ? "none"
        : "not yet",
    ],
  ]);
}

/** @param {number} gen @param {string} id */
export async function runView(gen, id) {
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
  /** @type {HTMLElement | null} */
  let live = null;
  if (!FINAL.has(run.status)) {
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
  const outputs = isObject(result.outputs) ? Object.entries(result.outputs) : [];
  if (run.status === "succeeded") reqs.push(...finishedRequests(path, outputs));
  const { inputs, saved } = await runLinks(run);
  show(
    gen,
    `${pretty(run.kind)} run`,
    ...itemHeading("#/runs", "← All runs", `${pretty(run.kind)} run ${runLabel(run.id)}`, [
      badge(run.status),
      ` · created ${when(run.created_at)}`,
    ]),
    live,
    run.status === "failed" && run.error ? problemBox(run.error, "The run failed") : null,
    run.status === "cancelled"
      ? callout("warn", "The run was cancelled", h("p", null, "It has no result."))
      : null,
    ...runNotes(result),
    ...runResult(run, path, result, outputs),
    h("h2", null, "Record"),
    runRecord(run, inputs, saved),
    h(
      "details",
      null,
      h("summary", null, "Parameters (every default filled in)"),
      h("pre", null, JSON.stringify(run.params, null, 2)),
    ),
    snippets(reqs).el,
  );
}
