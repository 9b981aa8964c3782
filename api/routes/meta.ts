/**
 * Service routes: health, version, the OpenAPI document and the offline API reference page.
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import swaggerJs from "swagger-ui-dist/swagger-ui-bundle.js" with { type: "text" };
import swaggerCss from "swagger-ui-dist/swagger-ui.css" with { type: "text" };
import type { App } from "../app_env.ts";
import { openApiDocument } from "../app_env.ts";
import type { Config } from "../config.ts";
import type { Store } from "../store/types.ts";
import type { RunKind } from "../runs/kind.ts";
import type { RunQueue } from "../queue/types.ts";
import { analysisIndex } from "../analyses/derive.ts";
import { SERVICE_VERSION } from "../version.ts";

const Health = z.object({
  status: z.enum(["ok", "degraded"]),
  store: z.object({ kind: z.string(), reachable: z.boolean() }),
  queue: z.object({
    engine: z.string().openapi({ description: "`in-process` or `pg-boss`" }),
    depth: z.number().int().openapi({ description: "Runs waiting for a worker" }),
    active: z.number().int().openapi({ description: "Runs being computed" }),
    oldest_seconds: z.number().nullable().openapi({
      description: "Age of the oldest waiting run, seconds",
    }),
    workers_seen: z.number().int().openapi({
      description: "Worker processes seen in the last 30 s",
    }),
  }).nullable().openapi({ description: "null when the queue cannot be read" }),
}).openapi("Health");

const Version = z.object({
  service: z.string(),
  api: z.string(),
  deno: z.string(),
  v8: z.string(),
  typescript: z.string(),
  store: z.string(),
  algorithms: z.record(z.string(), z.string()).openapi({
    description: "Algorithm version of each run kind",
  }),
}).openapi("Version");

const DOCS_HTML = `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>sunlag API reference</title>
<link rel="stylesheet" href="/v1/docs/swagger-ui.css">
<style>body{margin:0} .topbar{display:none}</style>
</head>
<body>
<div id="ui"></div>
<script src="/v1/docs/swagger-ui-bundle.js"></script>
<script>
window.ui = SwaggerUIBundle({
  url: "/v1/openapi.json",
  dom_id: "#ui",
  validatorUrl: null,
  deepLinking: true,
  tryItOutEnabled: true,
});
</script>
</body>
</html>`;

const AnalysisIndex = z.object({
  items: z.array(z.object({
    kind: z.string(),
    path: z.string(),
    tag: z.string(),
    summary: z.string(),
    featured: z.boolean(),
    algorithm_version: z.string(),
    request_schema: z.string().nullable().openapi({
      description: "Name of the request schema under `components.schemas`, when it has one",
    }),
    run_schema: z.string().nullable().openapi({
      description: "Name of the schema of its runs (with the typed result) under " +
        "`components.schemas`",
    }),
  })),
}).openapi("AnalysisIndex");

export function registerMetaRoutes(
  app: App,
  deps: { store: Store; config: Config; kinds: readonly RunKind[]; queue: RunQueue },
): void {
  let index: ReturnType<typeof analysisIndex> | undefined;
  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/health",
      tags: ["Service"],
      summary: "Liveness and store reachability",
      responses: {
        200: {
          description: "Service up, store reachable",
          content: { "application/json": { schema: Health } },
        },
        503: {
          description: "Store unreachable",
          content: { "application/json": { schema: Health } },
        },
      },
    }),
    async (c) => {
      let reachable = false;
      try {
        reachable = await deps.store.ping();
      } catch {
        reachable = false;
      }
      const queue = await deps.queue.stats().then(
        (s) => ({ engine: deps.queue.engine, ...s }),
        () => null,
      );
      return c.json(
        {
          status: reachable ? "ok" as const : "degraded" as const,
          store: { kind: deps.store.kind, reachable },
          queue,
        },
        reachable ? 200 : 503,
      );
    },
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/version",
      tags: ["Service"],
      summary: "Service, algorithm, runtime and store versions",
      responses: {
        200: { description: "Versions", content: { "application/json": { schema: Version } } },
      },
    }),
    (c) =>
      c.json({
        service: SERVICE_VERSION,
        api: "v1",
        deno: Deno.version.deno,
        v8: Deno.version.v8,
        typescript: Deno.version.typescript,
        store: deps.store.kind,
        algorithms: Object.fromEntries(deps.kinds.map((k) => [k.kind, k.algorithmVersion])),
      }, 200),
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/analyses",
      tags: ["Service"],
      summary: "The analyses this service offers",
      description: "One entry per analysis, in the registry's order: its kind, the path that " +
        "starts a run, its tag, summary, whether it is one of the main analyses, its algorithm " +
        "version, and the names of its request and result schemas in the OpenAPI document. " +
        "Clients (the web page among them) build their forms from this index.",
      responses: {
        200: {
          description: "The analyses",
          content: { "application/json": { schema: AnalysisIndex } },
        },
      },
    }),
    (c) => {
      index ??= analysisIndex(deps.kinds, openApiDocument(app) as never);
      return c.json({ items: index }, 200);
    },
  );

  app.get("/v1/openapi.json", (c) => c.json(openApiDocument(app)));

  app.get("/v1/docs", (c) => c.html(DOCS_HTML));
  app.get("/v1/docs/swagger-ui-bundle.js", (c) => {
    c.header("Content-Type", "text/javascript; charset=utf-8");
    c.header("Cache-Control", "public, max-age=86400");
    return c.body(swaggerJs);
  });
  app.get("/v1/docs/swagger-ui.css", (c) => {
    c.header("Content-Type", "text/css; charset=utf-8");
    c.header("Cache-Control", "public, max-age=86400");
    return c.body(swaggerCss);
  });
}
