// @ts-check
/**
 * Script equivalents of the page's requests: a POSIX-shell `curl` command and a Python
 * `requests` snippet for each request the page makes, so every view can show how to do the
 * same thing from a script. Pure functions, shared by the browser page and its Deno tests.
 *
 * Written by hand: the quoting rules are a few lines (POSIX single quotes; Python literals
 * from JSON), and a library for them would be larger than this file.
 *
 * @module
 */

/**
 * One HTTP request as the page makes it.
 * @typedef {object} RequestSpec
 * @property {string} method "GET" or "POST".
 * @property {string} path Path on the service, e.g. "/v1/series".
 * @property {Record<string, string | number | boolean | undefined>} [query] Query parameters;
 *   undefined and "" values are left out.
 * @property {Record<string, string>} [headers] Extra request headers.
 * @property {unknown} [json] A JSON body.
 * @property {string} [file] A text body sent from a local file of this name.
 * @property {string} [contentType] Content type of the `file` body.
 * @property {boolean} [stream] A Server-Sent Events stream (curl -N, requests stream=True).
 * @property {string} [save] Save the response body to this file name.
 * @property {string} [note] One line saying what the request does.
 */

/**
 * Quote a word for a POSIX shell: single quotes, with each embedded quote written '\''.
 * @param {string} s
 * @returns {string}
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { shellQuote } from "./snippets.js";
 * assert.equal(shellQuote("it's"), `'it'\\''s'`);
 * assert.equal(shellQuote("plain-word_1.csv"), "plain-word_1.csv");
 * ```
 */
export function shellQuote(s) {
  if (/^[\w@%+=:,./-]+$/.test(s)) return s;
  return "'" + s.replace(/'/g, "'\\''") + "'";
}

/**
 * The query string of a request (RFC 3986 percent-encoding), without "?"; empty values left out.
 * @param {RequestSpec["query"]} query
 * @returns {string}
 */
export function queryString(query) {
  if (!query) return "";
  const parts = [];
  for (const [k, v] of Object.entries(query)) {
    if (v === undefined || v === "") continue;
    parts.push(encodeURIComponent(k) + "=" + encodeURIComponent(String(v)));
  }
  return parts.join("&");
}

/**
 * The URL of a request on a service at `base`.
 * @param {string} base e.g. "http://127.0.0.1:8080"
 * @param {RequestSpec} req
 * @returns {string}
 */
export function requestUrl(base, req) {
  const q = queryString(req.query);
  return base.replace(/\/+$/, "") + req.path + (q ? "?" + q : "");
}

/**
 * A `curl` command for one request.
 * @param {string} base
 * @param {RequestSpec} req
 * @returns {string}
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { curlCommand } from "./snippets.js";
 * const cmd = curlCommand("http://h", { method: "POST", path: "/v1/cycles", json: { a: 1 } });
 * assert.equal(
 *   cmd,
 *   "curl -sS -X POST -H 'Content-Type: application/json' \\\n  --data-raw '{\"a\":1}' http://h/v1/cycles",
 * );
 * ```
 */
export function curlCommand(base, req) {
  const words = ["curl", "-sS"];
  if (req.stream) words.push("-N");
  if (req.method !== "GET") words.push("-X", req.method);
  const lines = [];
  /** @type {string[]} */
  let line = words;
  const headers = { ...(req.headers ?? {}) };
  if (req.json !== undefined) headers["Content-Type"] = "application/json";
  if (req.file !== undefined) headers["Content-Type"] = req.contentType ?? "text/csv";
  for (const [k, v] of Object.entries(headers)) line.push("-H", shellQuote(`${k}: ${v}`));
  if (req.json !== undefined || req.file !== undefined) {
    lines.push(line.join(" "));
    line = [];
    if (req.json !== undefined) {
      const flat = JSON.stringify(req.json);
      // Long bodies are indented over several lines (still one quoted shell word).
      line.push(
        "--data-raw",
        shellQuote(flat.length > 70 ? JSON.stringify(req.json, null, 2) : flat),
      );
    } else line.push("--data-binary", shellQuote("@" + req.file));
  }
  if (req.save) line.push("-o", shellQuote(req.save));
  line.push(shellQuote(requestUrl(base, req)));
  lines.push(line.join(" "));
  return lines.join(" \\\n  ");
}

/**
 * A Python literal for a JSON value (True/False/None, double-quoted strings), indented.
 * @param {unknown} v
 * @param {string} [indent]
 * @returns {string}
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { pythonLiteral } from "./snippets.js";
 * assert.equal(pythonLiteral({ a: [true, null, 1.5] }), '{"a": [True, None, 1.5]}');
 * ```
 */
export function pythonLiteral(v, indent = "") {
  if (v === null || v === undefined) return "None";
  if (v === true) return "True";
  if (v === false) return "False";
  if (typeof v === "number") return Number.isFinite(v) ? String(v) : "None";
  if (typeof v === "string") return JSON.stringify(v);
  const inner = indent + "    ";
  if (Array.isArray(v)) {
    const items = v.map((x) => pythonLiteral(x, inner));
    const flat = "[" + items.join(", ") + "]";
    if (flat.length <= 72 && !flat.includes("\n")) return flat;
    return "[\n" + items.map((x) => inner + x + ",\n").join("") + indent + "]";
  }
  if (typeof v === "object") {
    const entries = Object.entries(/** @type {Record<string, unknown>} */ (v));
    const items = entries.map(([k, x]) => JSON.stringify(k) + ": " + pythonLiteral(x, inner));
    const flat = "{" + items.join(", ") + "}";
    if (flat.length <= 72 && !flat.includes("\n")) return flat;
    return "{\n" + items.map((x) => inner + x + ",\n").join("") + indent + "}";
  }
  return JSON.stringify(String(v));
}

/**
 * The Python `requests` lines for one request; the response is bound to `r`.
 * @param {RequestSpec} req
 * @returns {string}
 */
function pythonRequest(req) {
  const args = [JSON.stringify(req.path).replace(/^"/, 'f"{BASE}')];
  const query = Object.fromEntries(
    Object.entries(req.query ?? {}).filter(([, v]) => v !== undefined && v !== ""),
  );
  if (Object.keys(query).length) args.push("params=" + pythonLiteral(query, "    "));
  if (req.headers && Object.keys(req.headers).length) {
    args.push("headers=" + pythonLiteral(req.headers, "    "));
  }
  if (req.json !== undefined) args.push("json=" + pythonLiteral(req.json, "    "));
  if (req.stream) args.push("stream=True");
  const method = req.method.toLowerCase();
  const lines = [];
  if (req.note) lines.push("# " + req.note);
  if (req.file !== undefined) {
    const ct = req.contentType ?? "text/csv";
    lines.push(`with open(${JSON.stringify(req.file)}, "rb") as f:`);
    const hdr = { ...(req.headers ?? {}), "Content-Type": ct };
    const inner = args.filter((a) => !a.startsWith("headers="));
    inner.push("headers=" + pythonLiteral(hdr, "        "), "data=f");
    lines.push(`    r = requests.${method}(\n        ${inner.join(",\n        ")},\n    )`);
  } else {
    const flat = `r = requests.${method}(${args.join(", ")})`;
    lines.push(
      flat.length <= 88 && !flat.includes("\n")
        ? flat
        : `r = requests.${method}(\n    ${args.join(",\n    ")},\n)`,
    );
  }
  if (req.stream) {
    lines.push(
      "for line in r.iter_lines(decode_unicode=True):",
      '    if line.startswith("data:"):',
      "        print(json.loads(line[5:]))",
    );
  } else if (req.save) {
    lines.push("r.raise_for_status()");
    lines.push(`with open(${JSON.stringify(req.save)}, "wb") as out:`, "    out.write(r.content)");
  } else {
    lines.push("print(r.status_code, r.json())");
  }
  return lines.join("\n");
}

/**
 * One Python script doing every request of a view, in order.
 * @param {string} base
 * @param {RequestSpec[]} reqs
 * @returns {string}
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { pythonSnippet } from "./snippets.js";
 * const py = pythonSnippet("http://h", [{ method: "GET", path: "/v1/series", query: { limit: 20 } }]);
 * assert.ok(py.includes('r = requests.get(f"{BASE}/v1/series", params={"limit": 20})'));
 * ```
 */
export function pythonSnippet(base, reqs) {
  const head = ["import requests"];
  if (reqs.some((r) => r.stream)) head.unshift("import json");
  head.push("", `BASE = ${JSON.stringify(base.replace(/\/+$/, ""))}`, "");
  return head.join("\n") + reqs.map(pythonRequest).join("\n\n") + "\n";
}

/**
 * Every request of a view as curl commands, one block per request with its note as a comment.
 * @param {string} base
 * @param {RequestSpec[]} reqs
 * @returns {string}
 */
export function curlScript(base, reqs) {
  return reqs.map((r) => (r.note ? "# " + r.note + "\n" : "") + curlCommand(base, r)).join("\n\n") +
    "\n";
}
