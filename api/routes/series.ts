/**
 * Series routes: upload (JSON or delimited text), list, fetch (JSON or CSV), delete.
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import type { App } from "../app_env.ts";
import { zodErrors } from "../app_env.ts";
import type { Config } from "../config.ts";
import type { SeriesMeta, Store, StoredSeries } from "../store/types.ts";
import { ProblemError } from "../problems.ts";
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
import { ingestJson, ingestText, seriesToCsv } from "../ingest/mod.ts";
import { storedFromNormalised } from "../series_codec.ts";
import { wantsCsv } from "./format.ts";
import { immutableHeaders, notModified } from "./cache.ts";
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

/** Metadata with ISO dates beside the decimal years. */
export function metaView(m: SeriesMeta) {
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
    created_at: m.created_at,
  };
}

function seriesView(s: StoredSeries) {
  return {
    ...metaView(s),
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

export function registerSeriesRoutes(app: App, deps: { store: Store; config: Config }): void {
  const { store } = deps;

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
        "the existing series. Nothing partial is ever stored.",
      request: {
        query: TextUploadQuery.partial().extend({ variable: VariableQuery }),
        body: {
          // Not `required` here: the JSON schema then applies only to JSON bodies, and text
          // bodies are parsed by the handler.
          required: false,
          content: {
            "application/json": { schema: SeriesUpload },
            "text/csv": {
              schema: z.string().openapi({ example: "time,value\n2001-01,80.2\n2001-02,85.1\n" }),
            },
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
        ...problems(400, 413, 415, 422, 500),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const ct = (c.req.header("content-type") ?? "").split(";")[0].trim().toLowerCase();
      let outcome;
      if (/^application\/([\w.-]+\+)?json$/.test(ct)) {
        const body = c.req.valid("json");
        outcome = ingestJson(body);
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
        const bytes = new Uint8Array(await c.req.arrayBuffer());
        outcome = ingestText(bytes, q.data);
      } else if (isNetcdfMediaType(ct)) {
        outcome = await ingestNetcdfUpload(c, deps.config.bodyLimitBytes);
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
        throw new ProblemError(
          "validation",
          `The series was not stored: ${outcome.errors.length} problem(s); first: ${
            outcome.errors[0].message
          }`,
          { errors: outcome.errors },
        );
      }
      const stored = await storedFromNormalised(outcome.series, null);
      const { created, series } = await store.putSeries(stored);
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
      const page = await store.listSeries(q);
      return c.json({
        items: page.items.map(metaView),
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
      if (wantsNetcdf(c)) return await seriesNetcdfResponse(c, store, id);
      const csv = wantsCsv(c);
      const etag = `"${id}${csv ? "-csv" : ""}"`;
      // Existence first (cheap), then a 304 without reading the points.
      if (!(await store.getSeriesMeta(id))) {
        throw new ProblemError("not-found", `No series has id ${id}`);
      }
      const nm = notModified(c, etag);
      if (nm) return nm;
      const s = await store.getSeries(id);
      if (!s) throw new ProblemError("not-found", `No series has id ${id}`);
      for (const [k, v] of Object.entries(immutableHeaders(etag))) c.header(k, v);
      c.header("Vary", "Accept");
      if (csv) {
        c.header("Content-Type", "text/csv; charset=utf-8");
        return c.body(seriesToCsv(s));
      }
      return c.json(seriesView(s));
    }) as never,
  );

  app.openapi(
    createRoute({
      method: "delete",
      path: "/v1/series/{id}",
      tags: ["Series"],
      summary: "Delete a series (refused with 409 while a run uses it)",
      request: { params: SeriesIdParam },
      responses: {
        204: { description: "Deleted" },
        ...problems(404, 409),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id = c.req.valid("param").id;
      const outcome = await store.deleteSeries(id);
      if (outcome === "not_found") throw new ProblemError("not-found", `No series has id ${id}`);
      if (outcome === "in_use") {
        const runs = await store.runsUsingSeries(id);
        throw new ProblemError(
          "conflict",
          `Series ${id} is an input of ${runs.length} run(s) and cannot be deleted`,
          { runs: runs.slice(0, 50) },
        );
      }
      return c.body(null, 204);
    }) as never,
  );
}
