// @ts-check
/// <reference lib="dom" />
/**
 * The page's side of the API: requests described as {@link RequestSpec}s (the same objects
 * the snippets are made from), the OpenAPI document the forms are built from, and RFC 9457
 * problem responses shown with their field errors.
 *
 * @module
 */
import { requestUrl } from "./snippets.js";
import { callout, fmt, h, table } from "./dom.js";

/** @typedef {import("./snippets.js").RequestSpec} RequestSpec */

const KEY_STORAGE = "sunlag-key";

/**
 * The API key the user gave this tab (kept in sessionStorage: it goes with the tab, never to
 * another site, and is never put in a URL or a snippet), or "".
 * @returns {string}
 */
export function apiKey() {
  try {
    return sessionStorage.getItem(KEY_STORAGE) ?? "";
  } catch {
    return "";
  }
}

/**
 * Remember (or with "" forget) the key for this tab.
 * @param {string} key
 */
export function setApiKey(key) {
  try {
    if (key) sessionStorage.setItem(KEY_STORAGE, key);
    else sessionStorage.removeItem(KEY_STORAGE);
  } catch {
    // storage unavailable: the key is not kept
  }
}

/**
 * Headers every request of the page carries: the key, when one is set, and a header that
 * marks the request as the page's own (never a simple cross-site request).
 * @returns {Record<string, string>}
 */
export function pageHeaders() {
  const key = apiKey();
  return {
    "X-Requested-With": "sunlag-page",
    ...(key ? { Authorization: `Bearer ${key}` } : {}),
  };
}

/**
 * `fetch` with the page's headers.
 * @param {string} url
 * @param {RequestInit} [init]
 */
export function authFetch(url, init = {}) {
  return fetch(url, {
    ...init,
    headers: { ...pageHeaders(), ...(/** @type {Record<string, string>} */ (init.headers ?? {})) },
  });
}

/** @type {((detail: string) => void) | null} */
let onUnauthorized = null;

/**
 * Register what to do when the service answers 401 (the page asks for a key).
 * @param {(detail: string) => void} fn
 */
export function whenUnauthorized(fn) {
  onUnauthorized = fn;
}

/**
 * Make a request as described by `req`.
 * @param {RequestSpec} req
 * @param {{ text?: string }} [extra] A text body (with `req.contentType`).
 * @returns {Promise<{ status: number, ok: boolean, data: any }>}
 */
export async function call(req, extra = {}) {
  /** @type {Record<string, string>} */
  const headers = { Accept: "application/json", ...pageHeaders(), ...(req.headers ?? {}) };
  /** @type {string | undefined} */
  let body;
  if (req.json !== undefined) {
    headers["Content-Type"] = "application/json";
    body = JSON.stringify(req.json);
  } else if (extra.text !== undefined) {
    headers["Content-Type"] = req.contentType ?? "text/csv";
    body = extra.text;
  }
  let res;
  try {
    res = await fetch(requestUrl("", req), { method: req.method, headers, body });
  } catch (e) {
    return {
      status: 0,
      ok: false,
      data: { title: "Network error", detail: `The service did not answer: ${e}` },
    };
  }
  const ct = res.headers.get("content-type") ?? "";
  const data = ct.includes("json") ? await res.json().catch(() => null) : await res.text();
  if (res.status === 401) onUnauthorized?.(data?.detail ?? "This instance needs an API key.");
  return { status: res.status, ok: res.ok, data };
}

/** @type {Promise<any> | null} */
let openApiDoc = null;
/** The OpenAPI document (once per page load): forms are built from its schemas. */
export function openApi() {
  openApiDoc ??= authFetch("/v1/openapi.json").then((r) => r.json()).catch(() => ({ paths: {} }));
  return openApiDoc;
}

/**
 * Follow `$ref`s into `components`.
 * @param {any} doc
 * @param {any} s
 * @returns {any}
 */
export function deref(doc, s) {
  let guard = 0;
  while (s && typeof s.$ref === "string" && guard++ < 20) {
    const path = s.$ref.replace(/^#\//, "").split("/");
    /** @type {any} */
    let t = doc;
    for (const p of path) t = t?.[p];
    s = t;
  }
  return s ?? {};
}

/**
 * An object schema with its `allOf` parts merged (properties and required lists).
 * @param {any} doc
 * @param {any} s
 * @returns {any}
 */
export function objectSchema(doc, s) {
  const d = deref(doc, s);
  if (!Array.isArray(d.allOf)) return d;
  const parts = d.allOf.map((/** @type {any} */ x) => objectSchema(doc, x));
  return {
    ...d,
    type: "object",
    properties: Object.assign({}, ...parts.map((/** @type {any} */ x) => x.properties ?? {})),
    required: parts.flatMap((/** @type {any} */ x) => x.required ?? []),
  };
}

/** The quantity vocabulary, from the OpenAPI document. @returns {Promise<string[]>} */
export async function quantities() {
  const doc = await openApi();
  const s = deref(doc, doc?.components?.schemas?.InlineSeries);
  const q = deref(doc, s?.properties?.quantity);
  return Array.isArray(q?.enum) ? q.enum : [];
}

/**
 * An RFC 9457 problem response, shown clearly with its field errors.
 * @param {any} p
 * @param {string} [heading]
 */
export function problemBox(p, heading) {
  const errors = Array.isArray(p?.errors) ? p.errors : [];
  const withPlace = errors.some((/** @type {any} */ e) =>
    e.row !== undefined || e.column !== undefined
  );
  return callout(
    "bad",
    heading ?? p?.title ?? "The request failed",
    h("p", { class: "problem-detail" }, p?.detail ?? String(p ?? "")),
    errors.length
      ? table(
        withPlace ? ["Row", "Column", "Field", "Problem"] : ["Field", "Problem"],
        errors.map((/** @type {any} */ e) => {
          const field = (e.in && e.in !== "body" ? `${e.in} ` : "") + (e.pointer || "(whole body)");
          const row = [h("code", null, field), e.message];
          return withPlace ? [fmt(e.row ?? null), fmt(e.column ?? null), ...row] : row;
        }),
        { numeric: withPlace ? [true, false, false, false] : [] },
      )
      : null,
    p?.request_id ? h("p", { class: "muted" }, `Request id: ${p.request_id}`) : null,
  );
}
