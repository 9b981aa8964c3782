/**
 * Hostile HTTP requests for fuzzing the whole service: any method on any route (with real,
 * malformed and foreign ids), random queries, headers (content types, codings, keys, origins,
 * hosts) and bodies (JSON of any shape, bytes, text, compressed or not). Shared by the CI-sized
 * test (fuzz_test.ts) and the 10,000-case benchmark (test/bench/fuzz_http.ts).
 *
 * @module
 */
import fc from "fast-check";
import { gzipSync } from "node:zlib";

/** Ids that exist in the fuzzed service, filled by the caller. */
export interface FuzzIds {
  series: string[];
  runs: string[];
}

export interface FuzzRequest {
  method: string;
  url: string;
  headers: Record<string, string>;
  body: Uint8Array<ArrayBuffer> | undefined;
}

const TEMPLATES = [
  "/v1/health",
  "/v1/version",
  "/v1/me",
  "/v1/series",
  "/v1/series/{s}",
  "/v1/series/{s}/chart.svg",
  "/v1/series/{s}/sharing",
  "/v1/runs",
  "/v1/runs/{r}",
  "/v1/runs/{r}/replay",
  "/v1/runs/{r}/cancel",
  "/v1/runs/{r}/events",
  "/v1/runs/{r}/bundle",
  "/v1/runs/{r}/chart.svg",
  "/v1/runs/{r}/sharing",
  "/v1/runs/{r}/outputs/{x}",
  "/v1/runs/{r}/outputs/{x}/series",
  "/v1/bundles",
  "/v1/smoothing",
  "/v1/cycles",
  "/v1/spectra",
  "/v1/resampling",
  "/v1/lag-correlations",
  "/v1/admin/owners",
  "/v1/admin/owners/{x}/keys",
  "/v1/admin/keys",
  "/v1/admin/keys/{x}",
  "/{x}",
];

const weird = fc.oneof(
  fc.string({ maxLength: 40 }),
  fc.constantFrom("..", "%2e%2e", "%00", "%0d%0aX:1", "ü", "sha256:", "{}", "-1", "1e309"),
);

function json(depth: number): fc.Arbitrary<unknown> {
  const leaf = fc.oneof(
    fc.integer(),
    fc.double(),
    fc.string({ maxLength: 20 }),
    fc.boolean(),
    fc.constant(null),
    fc.constantFrom("sha256:" + "0".repeat(64), "2001-01", "NaN", "-999"),
  );
  if (depth <= 0) return leaf;
  return fc.oneof(
    leaf,
    fc.array(json(depth - 1), { maxLength: 6 }),
    fc.dictionary(
      fc.oneof(
        fc.string({ maxLength: 10 }),
        fc.constantFrom(
          "series",
          "name",
          "quantity",
          "units",
          "time",
          "value",
          "method",
          "window",
          "visibility",
          "__proto__",
          "constructor",
        ),
      ),
      json(depth - 1),
      { maxKeys: 6 },
    ),
  );
}

/**
 * The arbitrary of hostile requests over the given real ids. Most carry `auth` (when given)
 * and a served host, so most reach the routes; a tenth each come with a bad key, a foreign
 * host or a foreign origin.
 */
export function fuzzRequest(ids: FuzzIds, auth?: string): fc.Arbitrary<FuzzRequest> {
  const seriesId = fc.oneof(fc.constantFrom(...ids.series), weird);
  const runId = fc.oneof(fc.constantFrom(...ids.runs), fc.uuid(), weird);
  const body = fc.oneof(
    json(3).map((v) => new TextEncoder().encode(JSON.stringify(v) ?? "null")),
    fc.uint8Array({ maxLength: 200 }),
    fc.string({ maxLength: 200 }).map((s) => new TextEncoder().encode(s)),
    fc.constantFrom(
      "time,value\n2001,1\n2002,2\n",
      "a;b\n1;2\n",
      '{"name":"x","quantity":"other","units":"1","time":[2001,2002],"value":[1,2]}',
      "{",
    ).map((s) => new TextEncoder().encode(s)),
  );
  return fc.record({
    method: fc.constantFrom("GET", "GET", "POST", "POST", "PUT", "DELETE", "PATCH", "HEAD"),
    template: fc.constantFrom(...TEMPLATES),
    s: seriesId,
    r: runId,
    x: weird,
    query: fc.array(fc.tuple(weird, weird), { maxLength: 4 }),
    contentType: fc.constantFrom(
      undefined,
      "application/json",
      "text/csv",
      "text/plain",
      "application/x-www-form-urlencoded",
      "multipart/form-data",
      "image/png",
      "application/problem+json",
    ),
    encoding: fc.constantFrom(undefined, undefined, "gzip", "br", "identity"),
    compress: fc.boolean(),
    auth: fc.oneof(
      { weight: 18, arbitrary: fc.constant(auth) },
      { weight: 2, arbitrary: fc.constant(undefined) },
      {
        weight: 1,
        arbitrary: fc.constantFrom(
          "Bearer x",
          `Bearer sk_${"0".repeat(16)}_${"A".repeat(43)}`,
          "Basic a",
        ),
      },
    ),
    origin: fc.oneof(
      { weight: 9, arbitrary: fc.constant(undefined) },
      { weight: 1, arbitrary: fc.constantFrom("https://evil.example", "null") },
    ),
    host: fc.oneof(
      { weight: 9, arbitrary: fc.constant("localhost") },
      { weight: 1, arbitrary: fc.constantFrom("evil.example", "127.0.0.1:8080") },
    ),
    body: fc.option(body, { nil: undefined }),
  }).map((g) => {
    const path = g.template
      .replace("{s}", encodeURIComponent(g.s))
      .replace("{r}", encodeURIComponent(g.r))
      .replace(/\{x\}/g, encodeURIComponent(g.x));
    const qs = new URLSearchParams(g.query).toString();
    const headers: Record<string, string> = {};
    if (g.contentType) headers["content-type"] = g.contentType;
    if (g.auth) headers.authorization = g.auth;
    if (g.origin) headers.origin = g.origin;
    let b = g.method === "GET" || g.method === "HEAD" ? undefined : g.body;
    if (b && g.encoding) {
      headers["content-encoding"] = g.encoding;
      if (g.encoding === "gzip" && g.compress) b = Uint8Array.from(gzipSync(b));
    }
    return {
      method: g.method,
      url: `http://${g.host}${path}${qs ? "?" + qs : ""}`,
      headers,
      body: b,
    };
  });
}

/** Why a response to a fuzzed request is wrong, or null: no 5xx, every error a problem. */
export function responseFault(res: Response): string | null {
  if (res.status >= 500) return `status ${res.status}`;
  if (
    res.status >= 400 && !/application\/problem\+json/.test(res.headers.get("content-type") ?? "")
  ) {
    return `status ${res.status} without a problem document`;
  }
  return null;
}
