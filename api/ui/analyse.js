// @ts-check
/// <reference lib="dom" />
/**
 * The page's `#/analyse` view: pick an analysis (the service's registry, `GET /v1/analyses`,
 * gives the list and order; the OpenAPI document gives each request schema), fill the form
 * built from that schema, and start the run with `Prefer: respond-async`.
 *
 * @module
 */
import { callout, h } from "./dom.js";
import { call, openApi, problemBox } from "./service.js";
import { show } from "./shell.js";
import { snippets } from "./snippet_panel.js";
import { buildFields, collect, markFields } from "./forms.js";

/** @typedef {import("./snippets.js").RequestSpec} RequestSpec */
/** @typedef {import("./forms.js").Field} Field */
/**
 * @typedef {{ path: string, summary: string, description: string, schema: any,
 *   featured: boolean }} Analysis
 */

/**
 * The analyses in the registry's order, each with its request schema from the OpenAPI
 * document (an analysis without one is left out).
 * @param {any} doc
 * @param {{ ok: boolean, data: any }} indexRes
 */
function analysesOf(doc, indexRes) {
  /** @type {Analysis[]} */
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
  return kinds;
}

/**
 * The analysis select: main analyses first, the others after them; a choice navigates.
 * @param {Analysis[]} main
 * @param {Analysis[]} more
 * @param {string} chosenPath
 * @param {URLSearchParams} query
 */
function analysisPicker(main, more, chosenPath, query) {
  /** @param {Event} e */
  const pick = (e) => {
    const q = new URLSearchParams(query);
    q.set("kind", /** @type {HTMLSelectElement} */ (e.target).value);
    location.hash = "#/analyse?" + q.toString();
  };
  /** @param {string} label @param {Analysis[]} list */
  const group = (label, list) =>
    list.length
      ? h(
        "optgroup",
        { label },
        list.map((k) => h("option", { value: k.path, selected: k.path === chosenPath }, k.summary)),
      )
      : null;
  return h(
    "div",
    { class: "field wide" },
    h("label", { for: "analysis" }, "Analysis"),
    h(
      "select",
      { id: "analysis", onchange: pick },
      group("Main analyses", main),
      group("More", more),
    ),
  );
}

/**
 * A reconstruction cites a model run: fill its proxy rows (and the sunspot series) from the
 * model's own terms whenever the model changes. The model field, if the form has one.
 * @param {Field[]} fields
 * @param {() => void} refresh
 */
function prefillFromModel(fields, refresh) {
  const modelField = fields.find((f) => f.pointer === "/model");
  const recordField = fields.find((f) =>
    f.itemKeys?.includes("term") && f.itemKeys.includes("series")
  );
  if (!modelField || !recordField) return modelField;
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
  return modelField;
}

/**
 * The analysis form: required fields, the others under "More options", and the start button;
 * a refused request marks its fields and shows the problem in `status`.
 * @param {Field[]} fields
 * @param {() => RequestSpec} spec
 * @param {HTMLElement} status
 * @param {() => void} refresh
 */
function analysisForm(fields, spec, status, refresh) {
  const mainFields = fields.filter((f) => f.main);
  const moreFields = fields.filter((f) => !f.main);
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
  return form;
}

/**
 * What the analysis still needs: a calibrated model run, a stored series.
 * @param {Field | undefined} modelField
 * @param {any[]} runs
 * @param {any[]} series
 */
function missingInputs(modelField, runs, series) {
  return [
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
  ];
}

/** @param {number} gen @param {URLSearchParams} query */
export async function analyseView(gen, query) {
  const [doc, indexRes, seriesRes, runsRes, fieldsRes] = await Promise.all([
    openApi(),
    call({ method: "GET", path: "/v1/analyses" }),
    call({ method: "GET", path: "/v1/series", query: { limit: 500 } }),
    call({ method: "GET", path: "/v1/runs", query: { limit: 200, status: "succeeded" } }),
    call({ method: "GET", path: "/v1/fields", query: { limit: 200 } }),
  ]);
  const series = seriesRes.ok ? seriesRes.data.items : [];
  const runs = runsRes.ok ? runsRes.data.items : [];
  const kinds = analysesOf(doc, indexRes);
  const main = kinds.filter((k) => k.featured);
  const more = kinds.filter((k) => !k.featured).sort((a, b) => a.path.localeCompare(b.path));
  const chosenPath = query.get("kind") ?? main[0]?.path ?? more[0]?.path ?? "";
  const kind = kinds.find((k) => k.path === chosenPath);
  const title = h("h1", null, "Start an analysis");
  if (!kinds.length) {
    return show(
      gen,
      "Analyse",
      title,
      h("p", { class: "muted" }, "This service offers no analyses yet."),
    );
  }
  const picker = analysisPicker(main, more, chosenPath, query);
  if (!kind) {
    return show(gen, "Analyse", title, picker, h("p", null, `No analysis at ${chosenPath}.`));
  }
  const fields = buildFields(doc, kind.schema, "", {
    series,
    runs,
    preselect: query.get("series") ?? undefined,
    fields: fieldsRes.ok ? fieldsRes.data.items : [],
    field: query.get("field") ?? undefined,
  });
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
  const modelField = prefillFromModel(fields, refresh);
  show(
    gen,
    "Analyse",
    title,
    h(
      "p",
      { class: "lede" },
      "Pick an analysis and its series. Every run is recorded with its inputs and versions, so it can be replayed later.",
    ),
    h("div", { class: "grid" }, picker),
    h("h2", null, kind.summary),
    kind.description ? h("p", { class: "muted" }, kind.description) : null,
    ...missingInputs(modelField, runs, series),
    analysisForm(fields, spec, status, refresh),
    snip.el,
  );
  refresh();
}
