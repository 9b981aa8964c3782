// @ts-check
/// <reference lib="dom" />
/**
 * The upload form's fields, built from `POST /v1/series` in the OpenAPI document: the series'
 * metadata, the columns and reading rules of delimited text (query parameters), and the
 * reading rules of a JSON body. Each field has its input, hint and error line.
 *
 * @module
 */
import { h, pretty } from "../dom.js";
import { deref, objectSchema } from "../service.js";
import { nonNull } from "../forms.js";

/** Query parameters of a text upload that are series metadata (sent in the body for JSON). */
export const META = ["name", "quantity", "units", "version", "description", "source"];
/** Text-upload parameters shown first; the others sit under "More reading rules". */
const COLUMN_PARAMS = ["time", "value", "uncertainty"];

/**
 * @typedef {{ name: string, input: HTMLInputElement | HTMLSelectElement, wrap: HTMLElement,
 *   error: HTMLElement }} UploadField
 */

/**
 * The upload's request in the OpenAPI document: its query parameters and its JSON body schema.
 * @param {any} doc
 */
function uploadOperation(doc) {
  const op = doc.paths?.["/v1/series"]?.post ?? {};
  const params =
    /** @type {any[]} */ ((op.parameters ?? []).map((/** @type {any} */ p) => deref(doc, p)).filter(
      (/** @type {any} */ p) => p.in === "query",
    ));
  const uploadSchema = objectSchema(doc, op.requestBody?.content?.["application/json"]?.schema);
  return { params, uploadSchema };
}

/**
 * The input of one field: the known quantities, an enumeration's values (with its default),
 * or free text with the schema's example as a placeholder.
 * @param {string} id
 * @param {string} name
 * @param {any} s The dereferenced schema.
 * @param {string[]} qs Known quantities.
 */
function paramInput(id, name, s, qs) {
  if (name === "quantity" && qs.length) {
    return /** @type {HTMLSelectElement} */ (h(
      "select",
      { id, name },
      h("option", { value: "" }, "choose…"),
      qs.map((q) => h("option", { value: q }, q)),
    ));
  }
  if (Array.isArray(s.enum)) {
    return /** @type {HTMLSelectElement} */ (h(
      "select",
      { id, name },
      h("option", { value: "" }, s.default !== undefined ? `default (${s.default})` : "automatic"),
      s.enum.map((/** @type {string} */ v) => h("option", { value: v }, v)),
    ));
  }
  return /** @type {HTMLInputElement} */ (h("input", {
    id,
    name,
    type: "text",
    autocomplete: "off",
    placeholder: s.example !== undefined ? String(s.example) : "",
  }));
}

/**
 * One input for a query parameter (or body field) of the upload, with label, hint and error.
 * @param {any} doc
 * @param {string[]} qs Known quantities.
 * @param {string} name
 * @param {any} schema
 * @param {string} description
 * @param {boolean} required
 * @returns {UploadField}
 */
function paramField(doc, qs, name, schema, description, required) {
  const id = `up-${name}`;
  const input = paramInput(id, name, deref(doc, nonNull(doc, schema).schema), qs);
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
}

/**
 * Every field of the upload form: metadata (query parameter or body field), text reading
 * rules (the other query parameters) and JSON reading rules (named `json-…`).
 * @param {any} doc
 * @param {string[]} qs Known quantities.
 */
export function uploadFields(doc, qs) {
  const { params, uploadSchema } = uploadOperation(doc);
  const byName = new Map(params.map((p) => [p.name, p]));
  const metaFields = META.map((n) => {
    const p = byName.get(n);
    const bodyProp = uploadSchema?.properties?.[n] ??
      deref(doc, doc?.components?.schemas?.InlineSeries)?.properties?.[n];
    return paramField(
      doc,
      qs,
      n,
      p?.schema ?? bodyProp ?? { type: "string" },
      p?.description ?? bodyProp?.description ?? "",
      ["name", "quantity", "units"].includes(n),
    );
  });
  const textFields = params.filter((p) => !META.includes(p.name)).map((p) =>
    paramField(doc, qs, p.name, p.schema, p.description ?? p.schema?.description ?? "", false)
  );
  const jsonOptionNames = Object.keys(uploadSchema?.properties ?? {}).filter((n) =>
    !META.includes(n) && !["time", "value", "uncertainty"].includes(n)
  );
  const jsonFields = jsonOptionNames.map((n) =>
    paramField(
      doc,
      qs,
      `json-${n}`,
      uploadSchema.properties[n],
      deref(doc, uploadSchema.properties[n]).description ?? "",
      false,
    )
  );
  const all = [...metaFields, ...textFields, ...jsonFields];
  return { uploadSchema, metaFields, textFields, jsonFields, all };
}

/**
 * The columns (shown) and the other reading rules (folded) of delimited text.
 * @param {UploadField[]} textFields
 */
export function textOptions(textFields) {
  return h(
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
}

/**
 * The reading rules of a JSON series (hidden until JSON is chosen).
 * @param {UploadField[]} jsonFields
 */
export function jsonOptions(jsonFields) {
  return h(
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
}
