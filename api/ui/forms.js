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
 * Build form fields for the properties of an object schema.
 * @param {any} doc
 * @param {any} schema
 * @param {string} prefix JSON Pointer prefix.
 * @param {{ series: any[], runs: any[], preselect?: string, fields?: any[], field?: string }} ctx
 * @param {boolean} [optional] The object itself is optional: none of its fields is required.
 * @returns {Field[]}
 */
export function buildFields(doc, schema, prefix, ctx, optional = false) {
  const s = objectSchema(doc, schema);
  const props = s.properties ?? {};
  const required = new Set(s.required ?? []);
  // Alternatives of a required choice are shown with the required fields; the first one that
  // has a fitting value is preselected (e.g. `solar` before `solar_run`).
  const choices = optional ? [] : requiredChoices(s);
  const choiceOf = (/** @type {string} */ name) => choices.find((c) => c.includes(name));
  /** @type {Set<string[]>} */
  const filled = new Set();
  /** @type {Field[]} */
  const fields = [];
  for (const [name, raw] of Object.entries(props)) {
    const pointer = `${prefix}/${name}`;
    const id = "f" + pointer.replace(/[^\w]/g, "_");
    const { schema: inner, nullable, outer } = nonNull(doc, raw);
    const p = deref(doc, inner);
    const dflt = outer.default ?? p.default;
    const isRequired = !optional && required.has(name) && dflt === undefined && !nullable;
    const choice = choiceOf(name);
    const text = outer.description ?? p.description ?? "";
    const description = choice
      ? `${text}${text === "" ? "" : /[.!?]\s*$/.test(text) ? " " : ". "}Give one of: ${
        choice.map(pretty).join(", ")
      }.`
      : text;
    const label = pretty(name);
    const error = h("span", { class: "field-error", id: `${id}-err` });
    /** @type {HTMLElement} */
    let input;
    /** @type {() => unknown} */
    let read;
    /** @type {((v: unknown) => void) | undefined} */
    let set;
    /** @type {(() => Field[]) | undefined} */
    let children;
    /** @type {string[] | undefined} */
    let itemKeys;
    let note = "";
    let wide = false;
    if (isSeriesRef(doc, inner)) {
      const ranked = seriesOptions(
        ctx.series,
        /^series$/i.test(name) ? `${name} ${description}` : name,
      );
      const opts = ranked.options;
      let chosen = opts[0]?.id;
      // the first alternative of a choice with a fitting series is selected, not "(none)"
      const preselect = isRequired ||
        (choice !== undefined && !filled.has(choice) && ranked.fits(opts[0]));
      if (choice && preselect) filled.add(choice);
      if (
        ctx.preselect && ctx.series.some((x) => x.id === ctx.preselect) &&
        !fields.some((f) => f.input.dataset.series)
      ) chosen = ctx.preselect;
      input = h(
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
      );
      read = () => /** @type {HTMLSelectElement} */ (input).value || undefined;
      set = selectSetter(/** @type {HTMLSelectElement} */ (input));
      wide = true;
    } else if (p.type === "array" && isSeriesRef(doc, p.items)) {
      input = h(
        "select",
        { id, multiple: true, size: String(Math.min(6, Math.max(3, ctx.series.length))) },
        seriesOptions(ctx.series, name).options.map((x) =>
          h("option", { value: x.id }, `${x.name} — ${x.quantity}`)
        ),
      );
      read = () => {
        const v = [.../** @type {HTMLSelectElement} */ (input).selectedOptions].map((o) => o.value);
        return v.length ? v : undefined;
      };
      note = " Hold Ctrl (⌘ on a Mac) or Shift to choose several.";
      wide = true;
    } else if (Array.isArray(p.enum)) {
      input = h(
        "select",
        { id },
        dflt === undefined
          ? h("option", { value: "" }, isRequired ? "choose…" : "(service default)")
          : null,
        p.enum.map((/** @type {unknown} */ v) =>
          h("option", { value: String(v), selected: v === dflt }, String(v))
        ),
      );
      set = selectSetter(/** @type {HTMLSelectElement} */ (input));
      read = () => {
        const v = /** @type {HTMLSelectElement} */ (input).value;
        if (v === "") return undefined;
        const match = p.enum.find((/** @type {unknown} */ e) => String(e) === v);
        return match === dflt && !isRequired ? undefined : match;
      };
    } else if (
      Array.isArray(p.anyOf ?? p.oneOf) &&
      (p.anyOf ?? p.oneOf).every((/** @type {any} */ a) =>
        ["string", "number", "integer"].includes(deref(doc, a).type)
      )
    ) {
      // A time or a number written either way (e.g. "1996-08" or 1996.6): one text box.
      input = h("input", {
        id,
        type: "text",
        autocomplete: "off",
        placeholder: dflt !== undefined ? String(dflt) : (p.example ?? outer.example ?? ""),
      });
      const numeric = (p.anyOf ?? p.oneOf).some((/** @type {any} */ a) =>
        ["number", "integer"].includes(deref(doc, a).type)
      );
      read = () => {
        const t = /** @type {HTMLInputElement} */ (input).value.trim();
        if (t === "") return undefined;
        return numeric && /^[-+]?\d+(\.\d+)?$/.test(t) && !/^\d{4}$/.test(t) ? Number(t) : t;
      };
      set = (v) => (/** @type {HTMLInputElement} */ (input).value = String(v ?? ""));
    } else if (p.type === "boolean") {
      input = h("input", { id, type: "checkbox", checked: dflt === true });
      read = () => {
        const v = /** @type {HTMLInputElement} */ (input).checked;
        return dflt !== undefined && v === dflt ? undefined : v;
      };
    } else if (p.type === "number" || p.type === "integer") {
      input = h("input", {
        id,
        type: "number",
        step: p.type === "integer" ? "1" : "any",
        min: p.minimum ?? p.exclusiveMinimum,
        max: p.maximum ?? p.exclusiveMaximum,
        placeholder: dflt !== undefined ? String(dflt) : "",
        inputmode: "decimal",
      });
      read = () => {
        const t = /** @type {HTMLInputElement} */ (input).value.trim();
        return t === "" ? undefined : Number(t);
      };
      set = (v) => (/** @type {HTMLInputElement} */ (input).value = String(v ?? ""));
    } else if (
      p.type === "string" && typeof p.pattern === "string" && p.pattern.includes("field:")
    ) {
      // a stored gridded field: pick one of the fields the caller can see
      const sel = /** @type {HTMLSelectElement} */ (h(
        "select",
        { id },
        (ctx.fields ?? []).map((f) =>
          h(
            "option",
            { value: f.id, selected: f.id === ctx.field },
            `${f.name} (${f.n_lat} × ${f.n_lon})`,
          )
        ),
      ));
      input = sel;
      wide = true;
      read = () => (sel.value === "" ? undefined : sel.value);
      set = (v) => (sel.value = String(v ?? ""));
    } else if (p.type === "string") {
      const runLike = /run|model/i.test(name) ||
        (typeof p.pattern === "string" && p.pattern.includes("0-9a-f-"));
      const listId = `${id}-runs`;
      input = h("input", {
        id,
        type: "text",
        placeholder: dflt !== undefined ? String(dflt) : "",
        list: runLike ? listId : null,
        autocomplete: "off",
      });
      if (runLike) {
        const want = name.toLowerCase().includes("model")
          ? (/** @type {any} */ r) => /model/.test(r.kind)
          : () => true;
        const list = h(
          "datalist",
          { id: listId },
          ctx.runs.filter(want).map((r) =>
            h(
              "option",
              { value: r.id },
              `${pretty(r.kind)} run ${runLabel(r.id)} · ${when(r.created_at)}`,
            )
          ),
        );
        input = h("span", null, input, list);
        const first = ctx.runs.find(want);
        if (first && isRequired) {
          /** @type {HTMLInputElement} */ (input.firstChild).value = first.id;
        }
      }
      const el = /** @type {HTMLInputElement} */ (runLike ? input.firstChild : input);
      if (runLike) wide = true;
      read = () => (el.value.trim() === "" ? undefined : el.value.trim());
      set = (v) => (el.value = v === undefined || v === null ? "" : String(v));
    } else if (p.type === "array" && deref(doc, p.items)?.properties) {
      // An array of records (e.g. model terms): one small fieldset per record.
      const item = deref(doc, p.items);
      const min = Math.max(1, p.minItems ?? 1);
      const max = p.maxItems ?? 50;
      const noun = pretty(name).replace(/(ie)?s$/, (m) => (m === "ies" ? "y" : ""));
      const rowsBox = h("div", { class: "rows" });
      /** @type {Field[][]} */
      const rows = [];
      const changed = () => rowsBox.dispatchEvent(new Event("change", { bubbles: true }));
      const add = /** @type {HTMLButtonElement} */ (h("button", {
        type: "button",
        class: "ghost",
        onclick: () => (addRow(), changed()),
      }, `Add ${noun.toLowerCase()}`));
      const remove = /** @type {HTMLButtonElement} */ (h("button", {
        type: "button",
        class: "ghost",
        onclick: () => (removeRow(), changed()),
      }, "Remove the last"));
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
      input = h(
        "div",
        { id, tabindex: "-1" },
        rowsBox,
        h("div", { class: "actions" }, add, remove),
      );
      read = () => rows.map((sub, i) => collect(sub, `${pointer}/${i}`));
      set = (v) => {
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
      children = () => rows.flat();
      itemKeys = Object.keys(item.properties);
      wide = true;
    } else if (p.type === "object" && p.properties && !prefix.includes("/", 1)) {
      const sub = buildFields(doc, p, pointer, ctx, !isRequired);
      // the fields of an alternative of a required choice (e.g. a sinusoid) are shown too
      fields.push(...sub.map((f) => (choice ? { ...f, main: true } : f)));
      continue;
    } else if (
      p.type === "array" && ["number", "integer", "string"].includes(deref(doc, p.items)?.type)
    ) {
      const it = deref(doc, p.items).type;
      input = h("input", {
        id,
        type: "text",
        placeholder: Array.isArray(dflt) ? dflt.join(", ") : "comma-separated",
      });
      read = () => {
        const t = /** @type {HTMLInputElement} */ (input).value.trim();
        if (t === "") return undefined;
        const parts = t.split(/[,\s]+/).filter(Boolean);
        return it === "string" ? parts : parts.map(Number);
      };
    } else {
      input = h("textarea", {
        id,
        rows: "3",
        placeholder: dflt !== undefined ? JSON.stringify(dflt) : "JSON",
      });
      read = () => {
        const t = /** @type {HTMLTextAreaElement} */ (input).value.trim();
        if (t === "") return undefined;
        try {
          return JSON.parse(t);
        } catch {
          return t;
        }
      };
      wide = true;
    }
    const control = p.type === "array" && itemKeys
      ? input
      : input.querySelector?.("input, select, textarea") ?? input;
    control.setAttribute("aria-describedby", `${id}-hint ${id}-err`);
    if (isRequired) control.setAttribute("aria-required", "true");
    const wrap = h(
      "div",
      { class: wide ? "field wide" : "field", "data-pointer": pointer },
      p.type === "boolean"
        ? h("label", { for: id }, input, " ", label)
        : [h("label", { for: id }, label, isRequired ? " *" : ""), input],
      h(
        "span",
        { class: "hint", id: `${id}-hint` },
        description + note +
          (dflt !== undefined && p.type !== "boolean" ? ` (default ${JSON.stringify(dflt)})` : ""),
      ),
      error,
    );
    fields.push({
      pointer,
      label,
      read,
      input: /** @type {HTMLElement} */ (control),
      wrap,
      error,
      main: isRequired || choice !== undefined,
      set,
      children,
      itemKeys,
    });
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
