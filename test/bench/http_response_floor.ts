/**
 * What Deno's server costs for the shape of a cached 304, without any of the service's checks:
 * one mode per process, run side by side under wrk. `hello` answers 12 bytes (the hello-world);
 * `clone` clones a ready 304 with the four headers the service sends (Cache-Control, ETag, Vary,
 * X-Request-Id) and sets a request id, as api/routes/immutable_cache.ts does; `fresh` builds that
 * 304 anew per request; `sql` is `clone` plus one `PRAGMA data_version` on a SQLite file in WAL
 * mode, the statement the access check used to run per request. For a cached chart's 200 (13 kB of
 * SVG): `bytes` sends 13 kB with a Content-Type only (the hello-world sending as many bytes), and
 * `chart` clones a ready 200 with those bytes and the seven headers the service sends with a chart
 * (Content-Type, X-Content-Type-Options, Content-Security-Policy, ETag, Cache-Control, Vary,
 * X-Request-Id), setting a request id; `routed` does the same after reading what any server
 * must read to choose an answer: the method, the URL, and the headers in one pass (for their
 * size and the few the service reads), with a table lookup of the path.
 *
 * Usage: deno run -A test/bench/http_response_floor.ts MODE PORT, MODE one of hello, clone, fresh,
 * sql, bytes, chart, routed; then `wrk -t2 -c50 -d5s http://127.0.0.1:PORT/` against each, rounds
 * alternating (the hello-world of the table is test/bench/http_hello.ts, Hono's).
 *
 * @module
 */
import { DatabaseSync } from "node:sqlite";

const [mode, port] = [Deno.args[0], Number(Deno.args[1])];
const dir = Deno.makeTempDirSync({ prefix: "sunlag-floor-" });
const db = new DatabaseSync(`${dir}/floor.db`);
db.exec("PRAGMA journal_mode = WAL");
const version = db.prepare("PRAGMA data_version");
const etag = `"chart-run-${"0".repeat(36)}-${"f".repeat(64)}-800x400-light---s0.1.0-c1"`;
const headers = {
  "cache-control": "public, max-age=31536000, immutable",
  etag,
  vary: "Accept-Encoding",
  "x-request-id": "",
};
const ready = new Response(null, { status: 304, headers });
const cloned = () => {
  const r = ready.clone();
  r.headers.set("X-Request-Id", crypto.randomUUID());
  return r;
};
const svg = new TextEncoder().encode(
  `<svg xmlns="http://www.w3.org/2000/svg">${"x".repeat(13_000)}</svg>`,
);
const chart = new Response(svg, {
  headers: {
    "content-type": "image/svg+xml; charset=utf-8",
    "x-content-type-options": "nosniff",
    "content-security-policy": "default-src 'none'; style-src 'unsafe-inline'; sandbox",
    etag,
    "cache-control": "public, max-age=31536000, immutable",
    "x-request-id": "",
    vary: "Accept-Encoding",
  },
});
const routes = new Set(["/"]);
const modes: Record<string, (req: Request) => Response> = {
  bytes: () => new Response(svg, { headers: { "content-type": "image/svg+xml; charset=utf-8" } }),
  chart: () => {
    const r = chart.clone();
    r.headers.set("X-Request-Id", crypto.randomUUID());
    return r;
  },
  routed: (req) => {
    if (req.method !== "GET") return new Response(null, { status: 405 });
    const url = req.url;
    const start = url.indexOf("/", url.indexOf(":") + 4);
    let size = url.length - start;
    let inm = "";
    req.headers.forEach((v, k) => {
      size += k.length + v.length + 4;
      if (k === "if-none-match") inm = v;
    });
    if (!routes.has(url.slice(start)) || size > 32 * 1024 || inm === etag) {
      return new Response(null, { status: 404 });
    }
    const r = chart.clone();
    r.headers.set("X-Request-Id", crypto.randomUUID());
    return r;
  },
  hello: () => new Response("Hello Hono!"),
  clone: cloned,
  fresh: () =>
    new Response(null, {
      status: 304,
      headers: { ...headers, "x-request-id": crypto.randomUUID() },
    }),
  sql: () => {
    version.get();
    return cloned();
  },
};
if (!modes[mode]) throw new Error(`mode must be one of ${Object.keys(modes).join(", ")}`);
Deno.serve({ hostname: "127.0.0.1", port, onListen() {} }, modes[mode]);
