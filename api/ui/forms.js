// @ts-check
/// <reference lib="dom" />
/**
 * Forms generated from the JSON Schemas of the OpenAPI document: one control per request
 * field (series references as series pickers, enums as selects, records as repeatable
 * groups), values collected into a request body, and a problem's field errors shown on the
 * fields its JSON Pointers name.
 *
 * @module
 */
import { h, pretty, runLabel, when } from "./dom.js";
import { deref, objectSchema } from "./service.js";

/**
 * @typedef {object} Field
 * @property {string} pointer JSON Pointer of the value in the body, e.g. "/climate".
 * @property {string} label
 * @property {() => unknown} read Value to send, or undefined to leave it out.
 * @property {HTMLElement} input
 * @property {HTMLElement} wrap
 * @property {HTMLElement} error
 * @property {boolean} main Shown before "More options": a required field, or one of the
 *   alternatives of a required choice.
 * @property {(v: unknown) => void} [set] Fill the control with a value.
 * @property {() => Field[]} [children] Fields inside (rows of an array of records).
 * @property {string[]} [itemKeys] Keys of each record, for an array of records.
 */

/**
 * Is this schema a reference to a series (stored id or inline)?
 * @param {any} doc
 * @param {any} s
 * @returns {boolean}
 */
function isSeriesRef(doc, s) {
  if (!s) return false;
  if (typeof s.$ref === "string" && /\/(SeriesRef|SeriesId)$/.test(s.$ref)) return true;
  const d = deref(doc, s);
  if (
    d.type === "string" && typeof d.pattern === "string" && d.pattern.includes("sha256") &&
    !d.pattern.includes("field:")
  ) {
    return true;
  }
  const alts = d.anyOf ?? d.oneOf;
  return Array.isArray(alts) && alts.some((a) => isSeriesRef(doc, a)) &&
    alts.some((a) => /InlineSeries/.test(a.$ref ?? ""));
}

/**
 * Drop `null` alternatives: returns the non-null schema and whether null is allowed.
 * @param {any} doc
 * @param {any} s
 * @returns {{ schema: any, nullable: boolean, outer: any }}
 */
export function nonNull(doc, s) {
  // `allOf: [{$ref}, {description}]` is how a described reference is written: unwrap it.
  if (Array.isArray(s?.allOf)) {
    const ref = s.allOf.find((/** @type {any} */ a) => a.$ref) ?? s.allOf[0];
    const notes = Object.assign({}, ...s.allOf.filter((/** @type {any} */ a) => a !== ref));
    const inner = nonNull(doc, ref);
    return { ...inner, outer: { ...inner.outer, ...notes } };
  }
  const d = deref(doc, s);
  const alts = d.anyOf ?? d.oneOf;
  if (Array.isArray(alts)) {
    const rest = alts.filter((a) => deref(doc, a).type !== "null");
    if (rest.length === 1 && rest.length < alts.length) {
      return { schema: rest[0], nullable: true, outer: d };
    }
  }
  return { schema: s, nullable: false, outer: d };
}

/**
 * Series options for a select, preferring quantities that fit the field's name (or, for a
 * field just called "series", its description).
 * @param {any[]} series
 * @param {string} name
 */
function seriesOptions(series, name) {
  const n = name.toLowerCase();
  /** @type {[RegExp, string[]][]} */
  const rules = [
    [/temp|climate|response|target/, ["temperature_anomaly", "temperature"]],
    [/forcing/, ["radiative_forcing"]],
    [/tsi|irradiance|measured/, ["tsi"]],
    [/facul|mg/, ["facular_index"]],
    [/area/, ["sunspot_area"]],
    [/sunspot|solar|driver|proxy|activity|series/, ["sunspot_number", "tsi"]],
  ];
  // A description ("Solar series (sunspot number, TSI, …)") names its main kind first.
  if (n.startsWith("series ")) rules.splice(1, 0, [/sunspot|solar/, ["sunspot_number", "tsi"]]);
  const prefer = rules.find(([re]) => re.test(n))?.[1] ?? [];
  const rank = (/** @type {any} */ s) => {
    const i = prefer.indexOf(s.quantity);
    return i < 0 ? prefer.length : i;
  };
  // Among equals, the longer record first.
  const sorted = [...series].sort((a, b) => rank(a) - rank(b) || (b.n ?? 0) - (a.n ?? 0));
  return { options: sorted, fits: (/** @type {any} */ s) => prefer.includes(s?.quantity) };
}

/**
 * The required choices of an object schema: "give exactly one of these fields", published as
 * `oneOf` (or `anyOf`) of `required` lists.
 * @param {any} s
 * @returns {string[][]}
 */
export function requiredChoices(s) {
  const alts = s?.oneOf ?? s?.anyOf;
  if (!Array.isArray(alts) || alts.some((a) => !Array.isArray(a?.required))) return [];
  return [alts.map((/** @type {any} */ a) => a.required).flat()];
}

/**
 * @typedef {object} Control The input of one field and how to read and fill it.
 * @property {HTMLElement} input
 * @property {() => unknown} read
 * @property {(v: unknown) => void} [set]
 * @property {() => Field[]} [children]
 * @property {string[]} [itemKeys]
 * @property {string} [note] Added to the hint.
 * @property {boolean} [wide]
 */

/**
 * @typedef {object} Prop One property of an object schema, as a field sees it.
 * @property {any} doc
 * @property {{ series: any[], runs: any[], preselect?: string, fields?: any[], field?: string }} ctx
 * @property {string} name
 * @property {string} pointer
 * @property {string} id
 * @property {any} inner The schema without its null alternative.
 * @property {any} p The dereferenced schema.
 * @property {any} outer The schema as written (description, default, example).
 * @property {unknown} dflt
 * @property {boolean} isRequired
 * @property {string[] | undefined} choice The required choice the property is one of.
 * @property {string} description
 */

/**
 * A series picker; the first alternative of a choice with a fitting series is selected, not
 * "(none)", and the series the view was opened with is chosen for the first picker.
 * @param {Prop} c
 * @param {Set<string[]>} filled Choices that already have a preselected alternative.
 * @param {Field[]} fields The fields built so far.
 * @returns {Control}
 */
function seriesControl(c, filled, fields) {
  const { ctx, name, id, isRequired, choice } = c;
  const ranked = seriesOptions(
    ctx.series,
    /^series$/i.test(name) ? `${name} ${c.description}` : name,
  );
  const opts = ranked.options;
  let chosen = opts[0]?.id;
  const preselect = isRequired ||
    (choice !== undefined && !filled.has(choice) && ranked.fits(opts[0]));
  if (choice && preselect) filled.add(choice);
  if (
    ctx.preselect && ctx.series.some((x) => x.id === ctx.preselect) &&
    !fields.some((f) => f.input.dataset.series)
  ) chosen = ctx.preselect;
  const input = /** @type {HTMLSelectElement} */ (h(
    "select",
    { id, "data-series": "true" },
    isRequired ? null : h("option", { value: "" }, "(none)"),
    opts.map((x) =>
      h(
        "option",
        { value: x.id, selected: x.id === chosen && preselect },
        `${x.name} — ${x.quantity}, ${x.start_date}–${x.end_date}`,
      )
    ),
  ));
  return { input, read: () => input.value || undefined, set: selectSetter(input), wide: true };
}

/**
 * Several series, chosen in a multiple select.
 * @param {Prop} c
 * @returns {Control}
 */
function seriesListControl(c) {
  const { ctx, id, name } = c;
  const input = /** @type {HTMLSelectElement} */ (h(
    "select",
    { id, multiple: true, size: String(Math.min(6, Math.max(3, ctx.series.length))) },
    seriesOptions(ctx.series, name).options.map((x) =>
      h("option", { value: x.id }, `${x.name} — ${x.quantity}`)
    ),
  ));
  const read = () => {
    const v = [...input.selectedOptions].map((o) => o.value);
    return v.length ? v : undefined;
  };
  return { input, read, note: " Hold Ctrl (⌘ on a Mac) or Shift to choose several.", wide: true };
}

/**
 * One of an enumeration's values; the default is left out of the request.
 * @param {Prop} c
 * @returns {Control}
 */
function enumControl(c) {
  const { id, p, dflt, isRequired } = c;
  const input = /** @type {HTMLSelectElement} */ (h(
    "select",
    { id },
    dflt === undefined
      ? h("option", { value: "" }, isRequired ? "choose…" : "(service default)")
      : null,
    p.enum.map((/** @type {unknown} */ v) =>
      h("option", { value: String(v), selected: v === dflt }, String(v))
    ),
  ));
  const read = () => {
    const v = input.value;
    if (v === "") return undefined;
    const match = p.enum.find((/** @type {unknown} */ e) => String(e) === v);
    return match === dflt && !isRequired ? undefined : match;
  };
  return { input, read, set: selectSetter(input) };
}

/**
 * The alternatives of a schema that are all strings or numbers, or none.
 * @param {any} doc
 * @param {any} p
 * @returns {any[] | null}
 */
function scalarAlternatives(doc, p) {
  const alts = p.anyOf ?? p.oneOf;
  return Array.isArray(alts) &&
      alts.every((/** @type {any} */ a) =>
        ["string", "number", "integer"].includes(deref(doc, a).type)
      )
    ? alts
    : null;
}

/**
 * A time or a number written either way (e.g. "1996-08" or 1996.6): one text box.
 * @param {Prop} c
 * @param {any[]} alts
 * @returns {Control}
 */
function eitherControl(c, alts) {
  const { doc, id, p, outer, dflt } = c;
  const input = /** @type {HTMLInputElement} */ (h("input", {
    id,
    type: "text",
    autocomplete: "off",
    placeholder: dflt !== undefined ? String(dflt) : (p.example ?? outer.example ?? ""),
  }));
  const numeric = alts.some((/** @type {any} */ a) =>
    ["number", "integer"].includes(deref(doc, a).type)
  );
  const read = () => {
    const t = input.value.trim();
    if (t === "") return undefined;
    return numeric && /^[-+]?\d+(\.\d+)?$/.test(t) && !/^\d{4}$/.test(t) ? Number(t) : t;
  };
  return { input, read, set: (v) => (input.value = String(v ?? "")) };
}

/**
 * A check box; the default is left out of the request.
 * @param {Prop} c
 * @returns {Control}
 */
function booleanControl(c) {
  const input = /** @type {HTMLInputElement} */ (h("input", {
    id: c.id,
    type: "checkbox",
    checked: c.dflt === true,
  }));
  const read = () => (c.dflt !== undefined && input.checked === c.dflt ? undefined : input.checked);
  return { input, read };
}

/**
 * A number box with the schema's bounds.
 * @param {Prop} c
 * @returns {Control}
 */
function numberControl(c) {
  const { id, p, dflt } = c;
  const input = /** @type {HTMLInputElement} */ (h("input", {
    id,
    type: "number",
    step: p.type === "integer" ? "1" : "any",
    min: p.minimum ?? p.exclusiveMinimum,
    max: p.maximum ?? p.exclusiveMaximum,
    placeholder: dflt !== undefined ? String(dflt) : "",
    inputmode: "decimal",
  }));
  const read = () => {
    const t = input.value.trim();
    return t === "" ? undefined : Number(t);
  };
  return { input, read, set: (v) => (input.value = String(v ?? "")) };
}

/**
 * A stored gridded field: pick one of the fields the caller can see.
 * @param {Prop} c
 * @returns {Control}
 */
function gridFieldControl(c) {
  const sel = /** @type {HTMLSelectElement} */ (h(
    "select",
    { id: c.id },
    (c.ctx.fields ?? []).map((f) =>
      h(
        "option",
        { value: f.id, selected: f.id === c.ctx.field },
        `${f.name} (${f.n_lat} × ${f.n_lon})`,
      )
    ),
  ));
  return {
    input: sel,
    wide: true,
    read: () => (sel.value === "" ? undefined : sel.value),
    set: (v) => (sel.value = String(v ?? "")),
  };
}

/**
 * The caller's runs offered for a run id (model runs for a model), and the first of them.
 * @param {Prop} c
 * @param {string} listId
 */
function runChoices(c, listId) {
  const want = c.name.toLowerCase().includes("model")
    ? (/** @type {any} */ r) => /model/.test(r.kind)
    : () => true;
  const list = h(
    "datalist",
    { id: listId },
    c.ctx.runs.filter(want).map((r) =>
      h(
        "option",
        { value: r.id },
        `${pretty(r.kind)} run ${runLabel(r.id)} · ${when(r.created_at)}`,
      )
    ),
  );
  return { list, first: c.ctx.runs.find(want) };
}

/**
 * A text box; for a run id, with the caller's runs offered (and the first filled in when
 * the field is required).
 * @param {Prop} c
 * @returns {Control}
 */
function textControl(c) {
  const { id, p, dflt, name } = c;
  const runLike = /run|model/i.test(name) ||
    (typeof p.pattern === "string" && p.pattern.includes("0-9a-f-"));
  const listId = `${id}-runs`;
  const el = /** @type {HTMLInputElement} */ (h("input", {
    id,
    type: "text",
    placeholder: dflt !== undefined ? String(dflt) : "",
    list: runLike ? listId : null,
    autocomplete: "off",
  }));
  /** @type {HTMLElement} */
  let input = el;
  if (runLike) {
    const { list, first } = runChoices(c, listId);
    input = h("span", null, el, list);
    if (first && c.isRequired) el.value = first.id;
  }
  return {
    input,
    wide: runLike,
    read: () => (el.value.trim() === "" ? undefined : el.value.trim()),
    set: (v) => (el.value = v === undefined || v === null ? "" : String(v)),
  };
}

/**
 * An array of records (e.g. model terms): one small fieldset per record, with buttons to add
 * a record and remove the last (within the schema's minItems and maxItems).
 * @param {Prop} c
 * @returns {Control}
 */
function recordsControl(c) {
  const { doc, ctx, name, pointer, id, p } = c;
  const item = deref(doc, p.items);
  const min = Math.max(1, p.minItems ?? 1);
  const max = p.maxItems ?? 50;
  const noun = pretty(name).replace(/(ie)?s$/, (m) => (m === "ies" ? "y" : ""));
  const rowsBox = h("div", { class: "rows" });
  /** @type {Field[][]} */
  const rows = [];
  const changed = () => rowsBox.dispatchEvent(new Event("change", { bubbles: true }));
  const button = (
    /** @type {() => void} */ f,
    /** @type {string} */ text,
  ) => /** @type {HTMLButtonElement} */ (h("button", {
    type: "button",
    class: "ghost",
    onclick: () => (f(), changed()),
  }, text));
  const add = button(() => addRow(), `Add ${noun.toLowerCase()}`);
  const remove = button(() => removeRow(), "Remove the last");
  const sync = () => {
    add.disabled = rows.length >= max;
    remove.disabled = rows.length <= min;
  };
  const addRow = () => {
    const i = rows.length;
    const sub = buildFields(doc, item, `${pointer}/${i}`, { ...ctx, preselect: undefined });
    rows.push(sub);
    rowsBox.append(h(
      "fieldset",
      { class: "row" },
      h("legend", null, `${noun} ${i + 1}`),
      h("div", { class: "grid" }, sub.map((f) => f.wrap)),
    ));
    sync();
  };
  const removeRow = () => {
    if (rows.length <= min) return;
    rows.pop();
    rowsBox.lastElementChild?.remove();
    sync();
  };
  for (let i = 0; i < min; i++) addRow();
  /** @param {unknown} v */
  const set = (v) => {
    if (!Array.isArray(v)) return;
    while (rows.length < Math.min(max, v.length)) addRow();
    while (rows.length > Math.max(min, v.length)) removeRow();
    rows.forEach((sub, i) => {
      for (const f of sub) {
        const key = f.pointer.slice(`${pointer}/${i}/`.length);
        if (v[i] && v[i][key] !== undefined) f.set?.(v[i][key]);
      }
    });
  };
  return {
    input: h("div", { id, tabindex: "-1" }, rowsBox, h("div", { class: "actions" }, add, remove)),
    read: () => rows.map((sub, i) => collect(sub, `${pointer}/${i}`)),
    set,
    children: () => rows.flat(),
    itemKeys: Object.keys(item.properties),
    wide: true,
  };
}

/**
 * A list of numbers or strings, comma- or space-separated.
 * @param {Prop} c
 * @returns {Control}
 */
function listControl(c) {
  const it = deref(c.doc, c.p.items).type;
  const input = /** @type {HTMLInputElement} */ (h("input", {
    id: c.id,
    type: "text",
    placeholder: Array.isArray(c.dflt) ? c.dflt.join(", ") : "comma-separated",
  }));
  const read = () => {
    const t = input.value.trim();
    if (t === "") return undefined;
    const parts = t.split(/[,\s]+/).filter(Boolean);
    return it === "string" ? parts : parts.map(Number);
  };
  return { input, read };
}

/**
 * Anything else, written as JSON (sent as text when it does not parse).
 * @param {Prop} c
 * @returns {Control}
 */
function jsonControl(c) {
  const input = /** @type {HTMLTextAreaElement} */ (h("textarea", {
    id: c.id,
    rows: "3",
    placeholder: c.dflt !== undefined ? JSON.stringify(c.dflt) : "JSON",
  }));
  const read = () => {
    const t = input.value.trim();
    if (t === "") return undefined;
    try {
      return JSON.parse(t);
    } catch {
      return t;
    }
  };
  return { input, read, wide: true };
}

/**
 * The control for a property by its schema, or null for a nested object (whose own
 * properties become fields).
 * @param {Prop} c
 * @param {string} prefix
 * @param {Set<string[]>} filled
 * @param {Field[]} fields
 * @returns {Control | null}
 */
function controlFor(c, prefix, filled, fields) {
  const { doc, inner, p } = c;
  const alts = scalarAlternatives(doc, p);
  if (isSeriesRef(doc, inner)) return seriesControl(c, filled, fields);
  if (p.type === "array" && isSeriesRef(doc, p.items)) return seriesListControl(c);
  if (Array.isArray(p.enum)) return enumControl(c);
  if (alts) return eitherControl(c, alts);
  if (p.type === "boolean") return booleanControl(c);
  if (p.type === "number" || p.type === "integer") return numberControl(c);
  if (p.type === "string" && typeof p.pattern === "string" && p.pattern.includes("field:")) {
    return gridFieldControl(c);
  }
  if (p.type === "string") return textControl(c);
  if (p.type === "array" && deref(doc, p.items)?.properties) return recordsControl(c);
  if (p.type === "object" && p.properties && !prefix.includes("/", 1)) return null;
  if (p.type === "array" && ["number", "integer", "string"].includes(deref(doc, p.items)?.type)) {
    return listControl(c);
  }
  return jsonControl(c);
}

/**
 * A property as the form sees it: its pointer and id, schema, default, whether it is
 * required, the required choice it belongs to, and its description (naming that choice).
 * @param {any} doc
 * @param {Prop["ctx"]} ctx
 * @param {string} name
 * @param {any} raw
 * @param {string} prefix
 * @param {boolean} required
 * @param {string[] | undefined} choice
 * @returns {Prop}
 */
function propOf(doc, ctx, name, raw, prefix, required, choice) {
  const pointer = `${prefix}/${name}`;
  const { schema: inner, nullable, outer } = nonNull(doc, raw);
  const p = deref(doc, inner);
  const dflt = outer.default ?? p.default;
  const text = outer.description ?? p.description ?? "";
  const description = choice
    ? `${text}${text === "" ? "" : /[.!?]\s*$/.test(text) ? " " : ". "}Give one of: ${
      choice.map(pretty).join(", ")
    }.`
    : text;
  return {
    doc,
    ctx,
    name,
    pointer,
    id: "f" + pointer.replace(/[^\w]/g, "_"),
    inner,
    p,
    outer,
    dflt,
    isRequired: required && dflt === undefined && !nullable,
    choice,
    description,
  };
}

/**
 * The field of a property around its control: label, hint (with the default), error line.
 * @param {Prop} c
 * @param {Control} control
 * @returns {Field}
 */
function fieldOf(c, control) {
  const { id, p, dflt, isRequired, pointer } = c;
  const label = pretty(c.name);
  const { input } = control;
  const error = h("span", { class: "field-error", id: `${id}-err` });
  const el = p.type === "array" && control.itemKeys
    ? input
    : input.querySelector?.("input, select, textarea") ?? input;
  el.setAttribute("aria-describedby", `${id}-hint ${id}-err`);
  if (isRequired) el.setAttribute("aria-required", "true");
  const wrap = h(
    "div",
    { class: control.wide ? "field wide" : "field", "data-pointer": pointer },
    p.type === "boolean"
      ? h("label", { for: id }, input, " ", label)
      : [h("label", { for: id }, label, isRequired ? " *" : ""), input],
    h(
      "span",
      { class: "hint", id: `${id}-hint` },
      c.description + (control.note ?? "") +
        (dflt !== undefined && p.type !== "boolean" ? ` (default ${JSON.stringify(dflt)})` : ""),
    ),
    error,
  );
  return {
    pointer,
    label,
    read: control.read,
    input: /** @type {HTMLElement} */ (el),
    wrap,
    error,
    main: isRequired || c.choice !== undefined,
    set: control.set,
    children: control.children,
    itemKeys: control.itemKeys,
  };
}

/**
 * Build form fields for the properties of an object schema.
 * @param {any} doc
 * @param {any} schema
 * @param {string} prefix JSON Pointer prefix.
 * @param {Prop["ctx"]} ctx
 * @param {boolean} [optional] The object itself is optional: none of its fields is required.
 * @returns {Field[]}
 */
export function buildFields(doc, schema, prefix, ctx, optional = false) {
  const s = objectSchema(doc, schema);
  const required = new Set(s.required ?? []);
  // Alternatives of a required choice are shown with the required fields; the first one that
  // has a fitting value is preselected (e.g. `solar` before `solar_run`).
  const choices = optional ? [] : requiredChoices(s);
  /** @type {Set<string[]>} */
  const filled = new Set();
  /** @type {Field[]} */
  const fields = [];
  for (const [name, raw] of Object.entries(s.properties ?? {})) {
    const choice = choices.find((ch) => ch.includes(name));
    const c = propOf(doc, ctx, name, raw, prefix, !optional && required.has(name), choice);
    const control = controlFor(c, prefix, filled, fields);
    if (control) {
      fields.push(fieldOf(c, control));
      continue;
    }
    const sub = buildFields(doc, c.p, c.pointer, ctx, !c.isRequired);
    // the fields of an alternative of a required choice (e.g. a sinusoid) are shown too
    fields.push(...sub.map((f) => (choice ? { ...f, main: true } : f)));
  }
  return fields;
}

/**
 * A setter that chooses an option of a select when it exists.
 * @param {HTMLSelectElement} sel
 * @returns {(v: unknown) => void}
 */
function selectSetter(sel) {
  return (v) => {
    const want = String(v);
    if ([...sel.options].some((o) => o.value === want)) sel.value = want;
  };
}

/**
 * Collect a body object from fields (JSON Pointers to nested keys).
 * @param {Field[]} fields
 * @param {string} [base] Pointer prefix to strip (the record's own pointer).
 */
export function collect(fields, base = "") {
  /** @type {Record<string, any>} */
  const body = {};
  for (const f of fields) {
    const v = f.read();
    if (v === undefined) continue;
    const keys = f.pointer.slice(base.length).split("/").slice(1);
    let t = body;
    for (const k of keys.slice(0, -1)) t = t[k] ??= {};
    t[keys[keys.length - 1]] = v;
  }
  return body;
}

/**
 * Mark the fields named by a problem's errors; returns the errors no field matched.
 * @param {Field[]} fields
 * @param {any} problem
 */
export function markFields(fields, problem) {
  /** @type {(f: Field) => Field[]} */
  const flat = (f) => [f, ...(f.children?.() ?? []).flatMap(flat)];
  const all = fields.flatMap(flat);
  for (const f of all) {
    f.error.textContent = "";
    f.input.removeAttribute("aria-invalid");
  }
  const unmatched = [];
  for (const e of problem?.errors ?? []) {
    const ptr = String(e.pointer ?? "");
    // The deepest field whose pointer is the error's pointer or a prefix of it.
    const f = all
      .filter((x) => ptr === x.pointer || ptr.startsWith(x.pointer + "/"))
      .sort((a, b) => b.pointer.length - a.pointer.length)[0];
    if (f && (e.in === undefined || e.in === "body")) {
      const rest = ptr.slice(f.pointer.length);
      f.error.textContent = (rest ? `${rest.slice(1)}: ` : "") + e.message;
      f.input.setAttribute("aria-invalid", "true");
      f.wrap.closest("details")?.setAttribute("open", "");
    } else unmatched.push(e);
  }
  return unmatched;
}
