/**
 * The Hono application: middleware (request id, JSON log line, `Host` check, request-head
 * size, CORS, cross-site guard, authentication, request rate, role check, body limit,
 * compressed bodies), RFC 9457 problems for every failure, the OpenAPI 3.1 document generated
 * from the zod schemas that validate requests, and the routes.
 *
 * @module
 */
import { OpenAPIHono } from "@hono/zod-openapi";
import type { Context } from "hono";
import { HTTPException } from "hono/http-exception";
import { bodyLimit } from "hono/body-limit";
import type { Config } from "./config.ts";
import type { Store } from "./store/types.ts";
import { type Problem, ProblemError, problemResponse, zodFieldErrors } from "./problems.ts";
import type { ComputeExecutor } from "./runs/service.ts";
import { RunService, type RunTransport } from "./runs/service.ts";
import { RUN_KINDS } from "./analyses/registry.ts";
import type { RunKind } from "./runs/kind.ts";
import { registerMetaRoutes } from "./routes/meta.ts";
import { registerMetricsRoutes, ServiceMetrics } from "./routes/metrics.ts";
import { registerRunRoutes } from "./routes/runs.ts";
import { registerSpectrumRoutes } from "./routes/spectrum.ts";
import { registerSpectralUploadRoutes } from "./routes/spectral_upload.ts";
import { registerChartRoutes } from "./routes/charts.ts";
import { registerKindRoutes } from "./routes/kinds.ts";
import { registerSeriesRoutes } from "./routes/series.ts";
import { registerFieldRoutes } from "./routes/fields.ts";
import { registerMapRoutes } from "./routes/maps.ts";
import { registerBundleRoutes } from "./routes/bundles.ts";
import { registerUiRoutes } from "./ui/routes.ts";
import { seriesCodec } from "./series_codec.ts";
import type { App, AppEnv } from "./app_env.ts";

export type { App, AppEnv } from "./app_env.ts";
export { openApiDocument, zodErrors, zodFieldErrors } from "./app_env.ts";
import { authenticate } from "./auth/authenticate.ts";
import { authorise } from "./auth/authorise.ts";
import { hostCheck } from "./security/host_check.ts";
import { headSizeLimit } from "./security/head_size.ts";
import { corsPolicy } from "./security/cors.ts";
import { crossSiteGuard } from "./security/cross_site.ts";
import { contentEncoding } from "./security/content_encoding.ts";
import { TokenBuckets } from "./limits/token_bucket.ts";
import { rateLimit } from "./limits/rate_limit.ts";
import { RunQuotas } from "./limits/quotas.ts";
import { registerAdminRoutes } from "./routes/admin.ts";
import { UploadPool } from "./ingest/upload.ts";
import { registerSharingRoutes } from "./routes/sharing.ts";
import { HotGets, requestIdFrom, withHotGets } from "./hot_gets.ts";
import { ImmutableCache } from "./routes/immutable_cache.ts";
import { headResponse } from "./head_length.ts";

export interface AppDeps {
  store: Store;
  config: Config;
  executor: ComputeExecutor;
  kinds?: readonly RunKind[];
  /** Queue, event bus and holder name (default: this process only). */
  transport?: Partial<RunTransport>;
  /**
   * `api` serves HTTP only (runs wait in the queue for workers elsewhere); `all` (default)
   * also computes the queued runs in this process.
   */
  role?: "api" | "all";
  /**
   * Answer GETs of cached immutable representations ahead of the middleware chain
   * (api/hot_gets.ts; default true). Off, every request takes the full path.
   */
  hotGets?: boolean;
}

export interface Service {
  app: App;
  runs: RunService;
  store: Store;
  config: Config;
  quotas: RunQuotas;
  /** Workers that read uploads; `terminate()` them when the service stops. */
  uploads: UploadPool;
  /** The fast path's handlers for cached GETs (api/hot_gets.ts). */
  hot: HotGets;
}

const TARGET_NAMES: Record<string, "body" | "query" | "path" | "header"> = {
  json: "body",
  query: "query",
  param: "path",
  header: "header",
};

/** Build the service: the app and the run machinery over a store. */
export function createService(deps: AppDeps): Service {
  const { store, config } = deps;
  const kinds = deps.kinds ?? RUN_KINDS;
  const quotas = new RunQuotas(config.quotas);
  const runs = new RunService(store, kinds, seriesCodec, deps.executor, {
    asyncSeconds: config.asyncSeconds,
    wallSeconds: config.runWallSeconds,
    admission: quotas,
  }, deps.transport);
  const metrics = new ServiceMetrics(store, runs.transport.queue);
  // Field uploads a crash interrupted left staged blocks: remove those over an hour old.
  store.dropStagedFields(3600).catch(() => undefined);
  if (deps.role !== "api") {
    runs.startWorking().catch((e) =>
      console.error(JSON.stringify({ level: "error", event: "worker_start", error: String(e) }))
    );
  }

  const app: App = new OpenAPIHono<AppEnv>({
    defaultHook: (result, c) => {
      if (!result.success) {
        const where = TARGET_NAMES[result.target] ?? "body";
        const { errors, omitted } = zodFieldErrors(result.error.issues, where);
        return problemResponse(c, {
          type: "https://sunlag.invalid/problems/validation",
          title: "Invalid input",
          status: 422,
          detail: `The request ${where} failed validation: ` +
            errors.slice(0, 5).map((e) => `${e.pointer || "/"}: ${e.message}`).join("; ") +
            (errors.length > 5 || omitted ? "; and more (see errors)" : ""),
          errors,
          ...(omitted ? { errors_omitted: omitted } : {}),
        });
      }
    },
  });

  /** Count an answered request in the metrics, and log it. */
  const finish = (method: string, path: string, status: number, t0: number, id: string) => {
    const ms = performance.now() - t0;
    metrics.observe(method, status, ms / 1000);
    if (config.log) {
      console.log(JSON.stringify({
        time: new Date().toISOString(),
        request_id: id,
        method,
        path,
        status,
        ms: Math.round(ms * 100) / 100,
      }));
    }
  };

  // Request id and one JSON log line per request.
  app.use("*", async (c, next) => {
    const id = requestIdFrom(c.req.header("x-request-id"));
    c.set("requestId", id);
    const t0 = performance.now();
    await next();
    c.res.headers.set("X-Request-Id", id);
    finish(c.req.method, c.req.path, c.res.status, t0, id);
  });
  // HEAD: the GET's headers with the length of the body it would send (api/head_length.ts)
  app.use("*", async (c, next) => {
    await next();
    if (c.req.method === "HEAD") c.res = await headResponse(c.res);
  });

  app.use("*", hostCheck(config.allowedHosts));
  app.use("*", headSizeLimit());
  const cors = corsPolicy(config.corsOrigins);
  if (cors) app.use("*", cors);
  app.use("*", crossSiteGuard());
  app.use("*", authenticate({ store, adminKey: config.adminKey }));
  const buckets = new TokenBuckets(config.quotas.ratePerSecond, config.quotas.rateBurst);
  app.use("*", rateLimit(buckets));
  app.use("*", authorise());

  const jsonLimit = bodyLimit({
    maxSize: config.bodyLimitBytes,
    onError: (c) =>
      problemResponse(
        c,
        new ProblemError(
          "payload-too-large",
          `The request body is over the configured limit of ${config.bodyLimitBytes} bytes (SUNLAG_BODY_LIMIT_MB)`,
        ).problem,
      ),
  });
  // A field upload streams to a temporary file under its own limit (SUNLAG_FIELD_LIMIT_MB).
  app.use(
    "*",
    (c, next) =>
      c.req.method === "POST" && c.req.path === "/v1/fields" ? next() : jsonLimit(c, next),
  );
  app.use("*", contentEncoding(config.bodyLimitBytes));

  registerMetaRoutes(app, { store, config, kinds, queue: runs.transport.queue });
  registerMetricsRoutes(app, metrics);
  registerUiRoutes(app);
  const uploads = new UploadPool(config.ingestWorkers);
  registerSpectralUploadRoutes(app, { store, config });
  // GETs of cached immutable representations, answered ahead of the middleware chain
  const hot = new HotGets();
  registerSeriesRoutes(app, { store, config, uploads, hot });
  registerFieldRoutes(app, { store, config });
  // Downloads of succeeded runs (outputs, maps, spectra; JSON, CSV, NetCDF), made once. One
  // entry may be up to 16 MiB: the demo's monthly spectrum since 1700 is a 10.6 MB CSV, which
  // takes about 0.5 s to write (test/bench/http_downloads_ab.ts); larger files are made again
  // on every request (NetCDF streamed), as before.
  const downloads = new ImmutableCache(64 * 1024 * 1024, 16 * 1024 * 1024);
  registerMapRoutes(app, { store, hot, downloads });
  registerRunRoutes(app, { store, runs, config, hot, downloads });
  registerSpectrumRoutes(app, { store, config, hot, downloads });
  registerChartRoutes(app, { store, kinds, hot });
  registerBundleRoutes(app, { store, runs, config });
  registerKindRoutes(app, { runs, kinds, store, config });
  registerSharingRoutes(app, { store });
  registerAdminRoutes(app, { store, config, quotas });

  app.onError((err, c) => {
    if (err instanceof ProblemError) return problemResponse(c, err.problem, err.headers);
    if (err instanceof HTTPException) {
      const status = err.status;
      if (status === 400 && /JSON/i.test(err.message)) {
        return problemResponse(
          c,
          new ProblemError("malformed-json", `The request body is not valid JSON: ${err.message}`)
            .problem,
        );
      }
      if (status === 415) {
        const ct = c.req.header("content-type") || "(no Content-Type)";
        return problemResponse(
          c,
          new ProblemError(
            "unsupported-media-type",
            `This endpoint does not take "${ct}"; see /v1/docs for the accepted media types`,
          ).problem,
        );
      }
      if (status === 413) {
        return problemResponse(c, new ProblemError("payload-too-large", err.message).problem);
      }
      return problemResponse(c, {
        type: "about:blank",
        title: err.message || "HTTP error",
        status,
        detail: err.message || `HTTP ${status}`,
      });
    }
    console.error(JSON.stringify({
      level: "error",
      request_id: c.get("requestId"),
      error: String((err as Error)?.stack ?? err),
    }));
    return problemResponse(
      c,
      new ProblemError(
        "internal",
        "An unexpected error occurred; it was logged with this request id.",
      ).problem,
    );
  });

  const routeTable = () =>
    app.routes
      .filter((r) => r.method !== "ALL")
      .map((r) => ({
        method: r.method,
        re: new RegExp("^" + r.path.replace(/:[^/]+/g, "[^/]+").replace(/\*/g, ".*") + "$"),
      }));
  let table: ReturnType<typeof routeTable> | null = null;

  app.notFound((c: Context) => {
    table ??= routeTable();
    const allowed = [
      ...new Set(table.filter((r) => r.re.test(c.req.path)).map((r) => r.method)),
    ];
    if (allowed.length) {
      if (allowed.includes("GET")) allowed.push("HEAD");
      return problemResponse(
        c,
        new ProblemError(
          "method-not-allowed",
          `${c.req.method} is not allowed on ${c.req.path}; allowed: ${allowed.join(", ")}`,
        ).problem,
        { Allow: allowed.join(", ") },
      );
    }
    return problemResponse(c, {
      ...new ProblemError("not-found", `No route matches ${c.req.method} ${c.req.path}`).problem,
    } as Problem);
  });

  if (deps.hotGets !== false) {
    app.fetch = withHotGets({
      hot,
      store,
      adminKey: config.adminKey,
      allowedHosts: config.allowedHosts,
      corsOrigins: config.corsOrigins,
      buckets,
      finish,
    }, app.fetch) as typeof app.fetch;
  }

  return { app, runs, store, config, quotas, uploads, hot };
}
