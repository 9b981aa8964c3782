/**
 * Series routes: upload (JSON or delimited text), list, fetch (JSON or CSV), delete.
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import type { App } from "../app_env.ts";
import { zodErrors } from "../app_env.ts";
import type { Config } from "../config.ts";
import type { Holding, SeriesMeta, Store, StoredSeries } from "../store/types.ts";
import { ProblemError } from "../problems.ts";
import { principalOf } from "../auth/authenticate.ts";
import { holderOf, isLimited, viewerOf } from "../auth/principal.ts";
import { holdingsNowOf, mustSeeSeries, sharedCacheable } from "../auth/access.ts";
import { checkStorage } from "../limits/quotas.ts";
import { toUploadOutcome, UploadPool } from "../ingest/upload.ts";
import {
  PageQuery,
  pageSchema,
  problems,
  SeriesMetaSchema,
  SeriesSchema,
} from "../schemas/common.ts";
import { SeriesUpload, TextUploadQuery, UploadReport } from "../schemas/ingest.ts";
import { QUANTITIES } from "../../core/series/quantities.ts";
import { formatIsoTime } from "../../core/time/mod.ts";
import { seriesToCsv } from "../ingest/mod.ts";
import { wantsCsv } from "./format.ts";
import { notModified, type RequestView } from "./cache.ts";
import { type HotGets, QueryMemo, whenReady } from "../hot_gets.ts";
import type { Principal } from "../auth/principal.ts";
import { ImmutableCache, serveRepresentation } from "./immutable_cache.ts";
import {
  CalendarQuery,
  ingestNetcdfUpload,
  isNetcdfMediaType,
  NETCDF_CONTENT,
  NETCDF_MEDIA_TYPE,
  seriesNetcdfResponse,
  VariableQuery,
  wantsNetcdf,
} from "../netcdf/http.ts";

const SeriesIdParam = z.object({
  id: z.string().openapi({ param: { name: "id", in: "path" }, example: "sha256:..." }),
});

/**
 * The strong ETag of a series' CSV or JSON. The CSV is the same bytes for every holder; the
 * JSON shows the holding's `created_at`, so two holders' JSON are different representations
 * and get different tags (RFC 9110 §8.8.3: a strong tag names one sequence of bytes).
 */
function seriesTag(id: string, csv: boolean, holding: Holding): string {
  return csv ? `"${id}-csv"` : `"${id}-json-${holding.created_at}"`;
}

/**
 * Metadata with ISO dates beside the decimal years, and the holding the caller sees it
 * through (owner, visibility, and that holding's creation time) when given.
 */
export function metaView(m: SeriesMeta, holding?: Holding) {
  const h = holding ??
    (m.owner && m.visibility
      ? { owner: m.owner, visibility: m.visibility, created_at: m.created_at }
      : undefined);
  return {
    id: m.id,
    name: m.name,
    quantity: m.quantity,
    units: m.units,
    description: m.description,
    source: m.source,
    version: m.version,
    resolution: m.resolution,
    n: m.n,
    start: m.start,
    end: m.end,
    start_date: formatIsoTime(m.start, m.resolution),
    end_date: formatIsoTime(m.end, m.resolution),
    derived_from: m.derived_from,
    created_at: h?.created_at ?? m.created_at,
    ...(h ? { owner: h.owner, visibility: h.visibility } : {}),
  };
}

/**
 * A series with its points. Its `created_at` is the caller's holding's (never another owner's
 * earlier upload of the same content); who holds it and how it is shared are at
 * `/v1/series/{id}/sharing`, since they may change while the content never does.
 */
function seriesView(s: StoredSeries, holding: Holding) {
  const { owner: _o, visibility: _v, ...meta } = metaView(s, holding);
  return {
    ...meta,
    date: Array.from(s.time, (t) => formatIsoTime(t, s.resolution)),
    time: Array.from(s.time),
    value: Array.from(s.value),
    uncertainty: s.uncertainty ? Array.from(s.uncertainty) : null,
  };
}

const UploadAnswer = z.object({
  created: z.boolean(),
  series: SeriesMetaSchema,
  report: UploadReport,
}).openapi("UploadAnswer");

const TEXT_TYPES = /^(text\/csv|text\/plain|text\/tab-separated-values|application\/csv)$/i;

const textBody = z.string().openapi({ example: "time,value\n2001-01,80.2\n2001-02,85.1\n" });

export function registerSeriesRoutes(
  app: App,
  deps: { store: Store; config: Config; uploads?: UploadPool; hot?: HotGets },
): void {
  const representations = new ImmutableCache();
  const { store } = deps;
  // A series as JSON or CSV (and its 304) ahead of the middleware (api/hot_gets.ts), for
  // query strings the route validated; NetCDF always takes the full path.
  const queries = new QueryMemo<{ format?: string; calendar?: string }>();
  deps.hot?.add("/v1/series/:id", ({ view, principal, params: [id], search }) => {
    const q = queries.get(search);
    if (!q || q.calendar !== undefined || q.format === "netcdf") return null;
    const c: RequestView = {
      ...view,
      req: { ...view.req, query: (n) => n === "format" ? q.format : undefined },
    };
    if (wantsNetcdf(c)) return null;
    return whenReady(
      holdingsNowOf(store, [{ kind: "series", id }], viewerOf(principal)),
      ([holding]) => holding && fromCache(c, id, holding, principal),
    );
  });

  /**
   * The 304, or the cached JSON or CSV, of series `id` seen through `holding`; null when it
   * is not cached.
   */
  function fromCache(
    c: RequestView,
    id: string,
    holding: Holding,
    principal: Principal,
  ): Response | Promise<Response> | null {
    const csv = wantsCsv(c);
    const etag = seriesTag(id, csv, holding);
    const shared = sharedCacheable(principal, holding);
    const nm = notModified(c, etag, shared);
    if (nm) return nm;
    // A series never changes: its CSV (and its JSON for one holding, whose dates it shows)
    // are formatted once and served as stored bytes.
    const hit = representations.get(csv ? `${id}-csv` : `${id}-json-${JSON.stringify(holding)}`);
    return hit ? serveRepresentation(c, hit, shared) : null;
  }
  const uploads = deps.uploads ?? new UploadPool(0);
  // The JSON body is documented by reference and read by the handler (in a worker), not by
  // the route's validator on the request thread.
  app.openAPIRegistry.register("SeriesUpload", SeriesUpload);

  app.openapi(
    createRoute({
      method: "post",
      path: "/v1/series",
      tags: ["Series"],
      summary: "Upload a series (JSON, or delimited text with the columns named in the query)",
      description:
        "JSON body: name, quantity, units, optional description/source/version, and parallel arrays " +
        "`time` (ISO 8601 or decimal years), `value` (null = missing) and optional `uncertainty`. " +
        "Text body (`text/csv`, semicolon, tab or whitespace separated, `#` comments, header row): " +
        "the query names the time column(s) and value column. The id is the SHA-256 of the RFC 8785 " +
        "canonical JSON of the normalised series: uploading the same content again returns 200 and " +
        "the existing series. Nothing partial is ever stored. Bodies may be gzip or deflate " +
        "compressed (`Content-Encoding`). JSON and text must be UTF-8.",
      request: {
        query: TextUploadQuery.partial().extend({ variable: VariableQuery }),
        body: {
          // Not `required` here: the JSON schema then applies only to JSON bodies, and text
          // bodies are parsed by the handler.
          required: false,
          content: {
            "application/json": { schema: { $ref: "#/components/schemas/SeriesUpload" } },
            "text/csv": { schema: textBody },
            "text/plain": { schema: textBody },
            "text/tab-separated-values": { schema: textBody },
            "application/csv": { schema: textBody },
            ...NETCDF_CONTENT,
          },
        },
      },
      responses: {
        200: {
          description: "Identical content already stored",
          content: { "application/json": { schema: UploadAnswer } },
        },
        201: { description: "Stored", content: { "application/json": { schema: UploadAnswer } } },
        ...problems(400, 401, 403, 413, 415, 422, 429, 500),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const principal = principalOf(c);
      const ct = (c.req.header("content-type") ?? "").split(";")[0].trim().toLowerCase();
      let outcome;
      if (/^application\/([\w.-]+\+)?json$/.test(ct)) {
        const bytes = await uploads.readBody(c.req.raw);
        outcome = await uploads.run({ format: "json", bytes });
      } else if (TEXT_TYPES.test(ct)) {
        const q = TextUploadQuery.safeParse(c.req.query());
        if (!q.success) {
          const errors = zodErrors(q.error.issues, "query");
          throw new ProblemError(
            "validation",
            "The query parameters of the text upload failed validation: " +
              errors.map((e) => `${e.pointer}: ${e.message}`).join("; "),
            { errors },
          );
        }
        const bytes = await uploads.readBody(c.req.raw);
        outcome = await uploads.run({ format: "text", bytes, query: q.data });
      } else if (isNetcdfMediaType(ct)) {
        outcome = await toUploadOutcome(
          await ingestNetcdfUpload(c, deps.config.bodyLimitBytes),
        );
      } else {
        throw new ProblemError(
          "unsupported-media-type",
          `Upload a series as application/json, text/csv (also text/plain, text/tab-separated-values) or ${NETCDF_MEDIA_TYPE}; the request said "${
            ct || "(no Content-Type)"
          }"`,
          {},
          { Accept: `application/json, text/csv, ${NETCDF_MEDIA_TYPE}` },
        );
      }
      if (!outcome.ok) {
        throw new ProblemError(outcome.type, outcome.detail, {
          ...(outcome.type === "validation" ? { errors: outcome.errors } : {}),
          ...(outcome.omitted ? { errors_omitted: outcome.omitted } : {}),
        });
      }
      const stored = outcome.series;
      if (isLimited(principal)) {
        await checkStorage(store, principal.owner!, stored.n * 24, deps.config.quotas);
      }
      const { created, series } = await store.putSeries(stored, holderOf(principal));
      c.header("Location", `/v1/series/${series.id}`);
      return c.json(
        { created, series: metaView(series), report: outcome.report },
        created ? 201 : 200,
      );
    }) as never,
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/series",
      tags: ["Series"],
      summary: "List stored series, newest first",
      request: { query: PageQuery.extend({ quantity: z.enum(QUANTITIES).optional() }) },
      responses: {
        200: {
          description: "A page of series metadata",
          content: {
            "application/json": {
              schema: pageSchema(SeriesMetaSchema),
            },
          },
        },
        ...problems(422),
      },
    }),
    async (c) => {
      const q = c.req.valid("query");
      const page = await store.listSeries({ ...q, viewer: viewerOf(principalOf(c)) });
      return c.json({
        items: page.items.map((m) => metaView(m)),
        total: page.total,
        limit: q.limit,
        offset: q.offset,
      }, 200);
    },
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/series/{id}",
      tags: ["Series"],
      summary: "One series with its points (JSON, CSV with `Accept: text/csv` or `?format=csv`, " +
        "NetCDF-CF with `Accept: application/x-netcdf` or `?format=netcdf`)",
      request: {
        params: SeriesIdParam,
        query: z.object({
          format: z.enum(["json", "csv", "netcdf"]).optional(),
          calendar: CalendarQuery,
        }),
      },
      responses: {
        200: {
          description: "The series",
          content: {
            "application/json": { schema: SeriesSchema },
            "text/csv": { schema: z.string() },
            ...NETCDF_CONTENT,
          },
        },
        304: { description: "Not modified (series are immutable)" },
        ...problems(404, 422),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id = c.req.valid("param").id;
      queries.remember(c.req.url, c.req.valid("query"));
      // Visibility first (cheap), then a 304 without reading the points.
      const holding = await mustSeeSeries(store, principalOf(c), id);
      if (wantsNetcdf(c)) {
        const shared = sharedCacheable(principalOf(c), holding);
        return await seriesNetcdfResponse(c, store, id, shared, representations);
      }
      const cached = fromCache(c, id, holding, principalOf(c));
      if (cached) return await cached;
      const csv = wantsCsv(c);
      const etag = seriesTag(id, csv, holding);
      const shared = sharedCacheable(principalOf(c), holding);
      const key = csv ? `${id}-csv` : `${id}-json-${JSON.stringify(holding)}`;
      const s = await store.getSeries(id);
      if (!s) throw new ProblemError("not-found", `No series has id ${id}`);
      const rep = {
        etag,
        body: new TextEncoder().encode(
          csv ? seriesToCsv(s) : JSON.stringify(seriesView(s, holding)),
        ),
        headers: {
          "Content-Type": csv ? "text/csv; charset=utf-8" : "application/json",
          Vary: "Accept",
        },
      };
      representations.set(key, rep);
      return await serveRepresentation(c, rep, shared);
    }) as never,
  );

  app.openapi(
    createRoute({
      method: "delete",
      path: "/v1/series/{id}",
      tags: ["Series"],
      summary: "Delete your copy of a series (refused with 409 while a run uses it)",
      description: "Removes the caller's holding; the content goes when no owner holds it. " +
        "Refused while one of the caller's runs uses the series, or while it is the last " +
        "holding and another owner's run uses it. An admin deletes a series it does not hold " +
        "outright (every holding), unless a run uses it.",
      request: { params: SeriesIdParam },
      responses: {
        204: { description: "Deleted" },
        ...problems(401, 403, 404, 409),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id = c.req.valid("param").id;
      const p = principalOf(c);
      const h = await mustSeeSeries(store, p, id);
      let outcome: "deleted" | "not_found" | "in_use";
      if (h.owner === p.owner) outcome = await store.deleteSeriesHolding(id, p.owner!);
      else if (p.role === "admin") outcome = await store.deleteSeries(id);
      else {
        throw new ProblemError(
          "forbidden",
          `Series ${id} is shared with you by its owner; only its owner or an admin may delete it`,
        );
      }
      if (outcome === "not_found") throw new ProblemError("not-found", `No series has id ${id}`);
      if (outcome === "in_use") {
        const runs = await store.runsUsingSeries(id, viewerOf(p));
        const usage = await store.seriesUsage(id, p.owner!);
        throw new ProblemError(
          "conflict",
          `Series ${id} is an input of ${runs.length} run(s) you can see` +
            (usage.others ? ` and of runs of owners it was shared with` : "") +
            " and cannot be deleted",
          { runs: runs.slice(0, 50) },
        );
      }
      return c.body(null, 204);
    }) as never,
  );
}
