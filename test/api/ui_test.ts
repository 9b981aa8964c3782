/**
 * The built-in page's routes and its script snippets (the browser behaviour is tested in
 * test/browser/ui_test.ts).
 *
 * @module
 */
import assert from "node:assert/strict";
import { makeTestApp } from "./helpers.ts";
import { UI_ASSETS } from "../../api/ui/routes.ts";
import {
  curlCommand,
  pythonLiteral,
  pythonSnippet,
  queryString,
  shellQuote,
} from "../../api/ui/snippets.js";
import { runLabel as pageRunLabel } from "../../api/ui/dom.js";
import { runLabel } from "../../api/runs/label.ts";
import { jsSources } from "../source_files.ts";

Deno.test("registerUiRoutes() serves the page and its assets with types, CSP and ETags", async () => {
  const svc = await makeTestApp();
  try {
    const res = await svc.get("/");
    assert.equal(res.status, 200);
    assert.match(res.headers.get("content-type") ?? "", /^text\/html/);
    const csp = res.headers.get("content-security-policy") ?? "";
    assert.match(csp, /default-src 'self'/);
    assert.match(csp, /script-src 'self'(;|$)/);
    const html = await res.text();
    for (const asset of ["/ui/page.css", "/ui/page.js"]) assert.ok(html.includes(asset), asset);
    for (const a of UI_ASSETS) {
      const r = await svc.get(a.path);
      assert.equal(r.status, 200, a.path);
      assert.equal(r.headers.get("content-type"), a.type);
      const etag = r.headers.get("etag") ?? "";
      assert.match(etag, /^"ui-[0-9a-f]{24}"$/);
      assert.equal(await r.text(), a.body);
      const again = await svc.get(a.path, { "if-none-match": etag });
      assert.equal(again.status, 304, a.path);
      await again.body?.cancel();
    }
  } finally {
    await svc.close();
  }
});

Deno.test("the page loads nothing from another origin (no CDN, no external fonts)", () => {
  for (const a of UI_ASSETS) {
    // Every absolute URL in the assets would be a request elsewhere; the only ones allowed
    // are XML namespace names, which are identifiers, not fetched.
    const urls = a.body.match(/\b(?:https?:)?\/\/[\w.-]+\.[a-z]{2,}[^\s"'`)]*/gi) ?? [];
    const fetched = urls.filter((u) => !u.startsWith("http://www.w3.org/"));
    assert.deepEqual(fetched, [], a.path);
    assert.doesNotMatch(a.body, /@import|@font-face/, a.path);
  }
});

Deno.test("the page's scripts set text from the service as text, never as HTML", () => {
  const scripts = UI_ASSETS.filter((a) => a.path.endsWith(".js"));
  assert.ok(scripts.length >= 5);
  for (const a of scripts) {
    assert.doesNotMatch(
      a.body,
      /\binnerHTML\b|\bouterHTML\b|insertAdjacentHTML|document\.write|\beval\(/,
      a.path,
    );
  }
});

Deno.test("every module the page imports is served, and every module of api/ui is", async () => {
  const served = new Set(UI_ASSETS.map((a) => a.path));
  let imports = 0;
  for (const a of UI_ASSETS.filter((x) => x.path.endsWith(".js"))) {
    for (const [, spec] of a.body.matchAll(/^import [^;]*? from "(\.\.?\/[\w./]+)";/gms)) {
      // Resolved as the browser does, against the importing module's URL.
      const target = new URL(spec, "http://page" + a.path).pathname;
      assert.ok(served.has(target), `${a.path} imports ${spec}`);
      imports++;
    }
  }
  // page.js imports ten modules, the upload view six.
  assert.ok(imports >= 16, `only ${imports} imports found`);
  // A module added to api/ui but not to UI_ASSETS would be a 404 in the browser.
  const dir = new URL("../../api/ui/", import.meta.url);
  for await (const [url] of jsSources(dir)) {
    const path = "/ui/" + url.pathname.slice(dir.pathname.length);
    assert.ok(served.has(path), `${path} is not served`);
  }
});

Deno.test("shellQuote() survives a real POSIX shell for awkward strings", async (t) => {
  const cases = [
    "plain",
    "it's",
    "a b",
    "$HOME `x` \\n",
    "semi;colon&amp",
    "new\nline",
    "ünïcødé ☀",
  ];
  for (const s of cases) {
    await t.step(JSON.stringify(s), async () => {
      // Reference: /bin/sh itself (common practice: the shell is the authority on its quoting).
      const out = await new Deno.Command("/bin/sh", {
        args: ["-c", `printf '%s' ${shellQuote(s)}`],
        stdout: "piped",
      }).output();
      assert.equal(new TextDecoder().decode(out.stdout), s);
    });
  }
});

Deno.test("curlCommand() builds the request the page makes", () => {
  assert.equal(
    curlCommand("http://h:1/", { method: "GET", path: "/v1/series", query: { limit: 20, q: "" } }),
    "curl -sS 'http://h:1/v1/series?limit=20'",
  );
  const up = curlCommand("http://h", {
    method: "POST",
    path: "/v1/series",
    query: { name: "Spot count (test)", time: "date" },
    file: "my data.csv",
  });
  assert.equal(
    up,
    "curl -sS -X POST -H 'Content-Type: text/csv' \\\n  --data-binary '@my data.csv' " +
      "'http://h/v1/series?name=Spot%20count%20(test)&time=date'",
  );
  const sse = curlCommand("http://h", { method: "GET", path: "/v1/runs/x/events", stream: true });
  assert.equal(sse, "curl -sS -N http://h/v1/runs/x/events");
  assert.equal(queryString({ a: "x y", b: undefined, c: 0, d: false }), "a=x%20y&c=0&d=false");
});

const python = "/usr/bin/python3";
const hasPython = (() => {
  try {
    return Deno.statSync(python).isFile;
  } catch {
    return false;
  }
})();

Deno.test({
  name: "pythonLiteral() is read back by Python's ast.literal_eval as the same JSON value",
  ignore: !hasPython,
  fn: async () => {
    const value = {
      solar: "sha256:" + "ab".repeat(32),
      lags: [-24, 0, 24],
      flag: true,
      off: false,
      none: null,
      x: 1.5e-7,
      text: 'quote " and \\ and ünï ☀',
      nested: { deep: [{ a: 1 }, { b: [true, null] }], long: "y".repeat(80) },
    };
    const code = "import ast, json, sys\nprint(json.dumps(ast.literal_eval(sys.stdin.read())))";
    const child = new Deno.Command(python, {
      args: ["-c", code],
      stdin: "piped",
      stdout: "piped",
      stderr: "piped",
    }).spawn();
    const w = child.stdin.getWriter();
    await w.write(new TextEncoder().encode(pythonLiteral(value)));
    await w.close();
    const out = await child.output();
    assert.equal(out.code, 0, new TextDecoder().decode(out.stderr));
    assert.deepEqual(JSON.parse(new TextDecoder().decode(out.stdout)), value);
  },
});

Deno.test({
  name: "pythonSnippet() is valid Python (compiled by /usr/bin/python3)",
  ignore: !hasPython,
  fn: async () => {
    const py = pythonSnippet("http://127.0.0.1:8080", [
      { method: "GET", path: "/v1/series", query: { limit: 20 }, note: "list" },
      { method: "POST", path: "/v1/series", query: { name: "x" }, file: "a.csv" },
      {
        method: "POST",
        path: "/v1/cycles",
        headers: { Prefer: "respond-async" },
        json: { a: [1, 2] },
      },
      { method: "GET", path: "/v1/runs/r/events", stream: true },
      { method: "GET", path: "/v1/runs/r/outputs/o", query: { format: "csv" }, save: "o.csv" },
    ]);
    const out = await new Deno.Command(python, {
      args: ["-c", "import sys; compile(sys.argv[1], 'snippet', 'exec')", py],
      stderr: "piped",
    }).output();
    assert.equal(out.code, 0, new TextDecoder().decode(out.stderr) + "\n" + py);
    assert.match(py, /^import json\nimport requests\n\nBASE = "http:\/\/127\.0\.0\.1:8080"/);
  },
});

Deno.test("shellQuote() leaves safe words bare", () => {
  assert.equal(shellQuote("http://h/v1/series"), "http://h/v1/series");
  assert.equal(shellQuote(""), "''");
});

/** WCAG 2.1 relative luminance of an sRGB colour "#rrggbb" (W3C WCAG 2.1, "relative luminance"). */
function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((c) =>
    c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4
  );
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** WCAG 2.1 contrast ratio (L1 + 0.05) / (L2 + 0.05). */
function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

/** The custom properties of the first CSS block that starts with `selector {`. */
function palette(css: string, selector: string): Record<string, string> {
  const start = css.indexOf(selector + " {");
  assert.ok(start >= 0, selector);
  const block = css.slice(start, css.indexOf("}", start));
  return Object.fromEntries(
    [...block.matchAll(/--([\w-]+):\s*(#[0-9a-f]{6})/gi)].map((m) => [m[1], m[2]]),
  );
}

Deno.test("page colours meet WCAG 2.1 AA text contrast (4.5:1) in light and dark", async (t) => {
  const css = UI_ASSETS.find((a) => a.path === "/ui/page.css")!.body;
  // WCAG 2.1 success criterion 1.4.3: at least 4.5:1 for normal text. The check of the formula:
  // black on white is 21:1 (W3C WCAG 2.1 definition of contrast ratio).
  assert.equal(Math.round(contrast("#000000", "#ffffff") * 100) / 100, 21);
  const pairs: [string, string][] = [
    ["ink", "bg"],
    ["ink", "panel"],
    ["muted", "bg"],
    ["muted", "panel"],
    ["muted", "code-bg"],
    ["link", "bg"],
    ["link", "panel"],
    ["accent", "bg"],
    ["accent-ink", "accent"],
    ["ok", "ok-bg"],
    ["warn", "warn-bg"],
    ["bad", "bad-bg"],
    ["ink", "bad-bg"],
    ["ink", "warn-bg"],
    ["ink", "ok-bg"],
    ["ink", "code-bg"],
  ];
  for (const [name, selector] of [["light", ":root"], ["dark", ':root[data-theme="dark"]']]) {
    await t.step(name, () => {
      const p = palette(css, selector);
      for (const [fg, bg] of pairs) {
        const ratio = contrast(p[fg], p[bg]);
        assert.ok(ratio >= 4.5, `${name}: --${fg} on --${bg} is ${ratio.toFixed(2)}:1`);
      }
    });
  }
  // The dark palette under prefers-color-scheme repeats the explicit dark one.
  const auto = palette(css, ':root:not([data-theme="light"])');
  assert.deepEqual(auto, palette(css, ':root[data-theme="dark"]'));
});

Deno.test("the page labels runs as charts and CSV headers do (api/runs/label.ts)", () => {
  for (
    const id of [
      "01a2360b-1c2d-7e3f-8a4b-5c6d7e8f9a0b",
      "01a2360b-0000-7000-8000-00000000ffff",
      "not-a-run-id",
      "",
    ]
  ) assert.equal(pageRunLabel(id), runLabel(id), id);
  assert.equal(runLabel("01a2360b-1c2d-7e3f-8a4b-5c6d7e8f9a0b"), "7e8f9a0b");
});
