// @ts-check
/// <reference lib="dom" />
/**
 * The upload's request, built from the form: delimited text goes as the body with the
 * columns and reading rules in the query; JSON goes as a body with the form's metadata added
 * where the file has none (sent inline when small, else as a file).
 *
 * @module
 */
import { isObject } from "../dom.js";
import { deref } from "../service.js";

/** @typedef {import("../snippets.js").RequestSpec} RequestSpec */
/** @typedef {import("./columns.js").UploadField} UploadField */
/** @typedef {{ spec: RequestSpec, text?: string, local?: string }} BuiltUpload */

/** Above this many characters a JSON body is shown as a file in the snippets. */
const INLINE_JSON_CHARS = 3000;

/**
 * The filled-in fields, by name.
 * @param {UploadField[]} all
 * @returns {Record<string, string>}
 */
export function formValues(all) {
  return Object.fromEntries(
    all.map((f) => [f.name, f.input.value.trim()]).filter(([, v]) => v !== ""),
  );
}

/**
 * A delimited-text upload: the text as the body, the fields in the query.
 * @param {UploadField[]} queryFields
 * @param {Record<string, string>} v
 * @param {string} text
 * @param {string} fileName
 * @returns {BuiltUpload}
 */
function textUpload(queryFields, v, text, fileName) {
  /** @type {Record<string, string>} */
  const query = {};
  for (const f of queryFields) {
    if (v[f.name] !== undefined) query[f.name] = v[f.name];
  }
  return {
    spec: {
      method: "POST",
      path: "/v1/series",
      query,
      file: fileName,
      contentType: "text/csv",
      note: "Upload delimited text; the query names the columns",
    },
    text,
  };
}

/**
 * The JSON text as an object, or why it is not one.
 * @param {string} text
 * @returns {{ body: any } | { local: string }}
 */
function parseJsonSeries(text) {
  /** @type {any} */
  let body;
  try {
    body = text.trim() ? JSON.parse(text) : {};
  } catch (e) {
    return { local: `The file is not valid JSON: ${/** @type {Error} */ (e).message}` };
  }
  if (!isObject(body)) {
    return { local: "The JSON must be an object with name, quantity, units, time and value" };
  }
  return { body };
}

/**
 * A JSON reading rule's value: comma-separated items for an array (numbers where they read as
 * numbers), else the text.
 * @param {any} schema The dereferenced schema of the body field.
 * @param {string} raw
 */
function jsonOptionValue(schema, raw) {
  return schema.type === "array"
    ? raw.split(",").map((x) => x.trim()).map((x) =>
      x !== "" && Number.isFinite(Number(x)) ? Number(x) : x
    )
    : raw;
}

/**
 * A JSON upload: the file's object with the form's metadata added where it has none and the
 * form's reading rules set.
 * @param {{ doc: any, uploadSchema: any, metaFields: UploadField[], jsonFields: UploadField[] }} form
 * @param {Record<string, string>} v
 * @param {string} text
 * @param {string} fileName
 * @returns {BuiltUpload}
 */
function jsonUpload(form, v, text, fileName) {
  const parsed = parseJsonSeries(text);
  if ("local" in parsed) {
    return { spec: { method: "POST", path: "/v1/series" }, local: parsed.local };
  }
  const body = parsed.body;
  for (const f of form.metaFields) {
    if (v[f.name] !== undefined && body[f.name] === undefined) body[f.name] = v[f.name];
  }
  for (const f of form.jsonFields) {
    const key = f.name.replace(/^json-/, "");
    const raw = v[f.name];
    if (raw === undefined) continue;
    body[key] = jsonOptionValue(deref(form.doc, form.uploadSchema.properties[key]), raw);
  }
  const small = JSON.stringify(body).length <= INLINE_JSON_CHARS;
  return {
    spec: small
      ? { method: "POST", path: "/v1/series", json: body, note: "Upload a JSON series" }
      : {
        method: "POST",
        path: "/v1/series",
        file: fileName,
        contentType: "application/json",
        note: "Upload a JSON series (the file, with the form's fields added)",
      },
    text: small ? undefined : JSON.stringify(body),
  };
}

/**
 * The request the form describes now (also what the snippets show).
 * @param {{ doc: any, uploadSchema: any, metaFields: UploadField[], textFields: UploadField[],
 *   jsonFields: UploadField[], all: UploadField[] }} form
 * @param {import("./source.js").DataSource} source
 * @returns {Promise<BuiltUpload>}
 */
export async function buildUpload(form, source) {
  const v = formValues(form.all);
  const text = await source.readText();
  if (!source.isJson()) {
    return textUpload([...form.metaFields, ...form.textFields], v, text, source.fileName());
  }
  return jsonUpload(form, v, text, source.fileName());
}
