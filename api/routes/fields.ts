/**
 * Field routes: upload a gridded field as NetCDF-CF (streamed to a temporary file, outside the
 * JSON body limit, under the field size limit), list, fetch metadata and coordinates, a cell's
 * time series (JSON or CSV, and saved as a stored series), a time slice as a map (JSON or
 * CSV), and delete (refused while a run uses the field).
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import type { Context } from "hono";
import type { App } from "../app_env.ts";
import type { Config } from "../config.ts";
import type { FieldDescription, FieldMeta, Store } from "../store/types.ts";
import { FIELD_ID_PATTERN } from "../store/field_types.ts";
import { DEMO_FIELD } from "../schemas/examples.ts";
import { fieldMetaOf } from "../store/field_common.ts";
import { ProblemError } from "../problems.ts";
import { PageQuery, pageSchema, problems, SeriesMetaSchema } from "../schemas/common.ts";
import { formatIsoTime, parseIsoTime } from "../../core/time/mod.ts";
import { CfTimeError } from "../../core/time/mod.ts";
import { ingestJson, seriesToCsv } from "../ingest/mod.ts";
import { storedFromNormalised } from "../series_codec.ts";
import { wantsCsv } from "./format.ts";
import { notModified, setImmutableHeaders } from "./cache.ts";
import { withNetcdf, withTempUpload } from "../netcdf/open.ts";
import { NetcdfError } from "../netcdf/errors.ts";
import {
  cfTimeProblem,
  isNetcdfMediaType,
  NETCDF_MEDIA_TYPE,
  netcdfProblem,
} from "../netcdf/http.ts";
import { FieldUploadQuery, storeNetcdfField } from "../fields/ingest.ts";
import { nearestCell, nearestStep } from "../fields/cells.ts";
import { InputProblem } from "../runs/kind.ts";
import { metaView } from "./series.ts";
import { principalOf } from "../auth/authenticate.ts";
import { holderOf, isLimited, viewerOf } from "../auth/principal.ts";
import { mustSeeField, sharedCacheable } from "../auth/access.ts";
import { checkStorage } from "../limits/quotas.ts";
import { float32Text } from "../fields/float32_text.ts";
import { renderMapChart } from "../charts/map_chart.ts";
import { SERVICE_VERSION } from "../version.ts";

const FieldIdParam = z.object({
  id: z.string().regex(FIELD_ID_PATTERN, "must be a field id: field:sha256:<64 hex>").openapi({
    param: { name: "id", in: "path" },
    example: DEMO_FIELD,
  }),
});

const FieldInfoSchema = z.object({
  format: z.string(),
  calendar: z.string().openapi({ description: "CF calendar of the uploaded time axis" }),
  time_units: z.string(),
  time_placement: z.string(),
  standard_name: z.string().nullable(),
  long_name: z.string().nullable(),
  min: z.number().nullable(),
  max: z.number().nullable(),
});

export const FieldMetaSchema = z.object({
  id: z.string(),
  name: z.string(),
  variable: z.string(),
  quantity: z.string(),
  units: z.string(),
  description: z.string().nullable(),
  source: z.string().nullable(),
  resolution: z.enum(["daily", "monthly", "annual", "irregular"]),
  n_time: z.number().int(),
  n_lat: z.number().int(),
  n_lon: z.number().int(),
  start: z.number().openapi({ description: "First time, decimal year" }),
  end: z.number(),
  start_date: z.string(),
  end_date: z.string(),
  missing: z.number().int().openapi({ description: "Missing values in the whole field" }),
  block_rows: z.number().int().openapi({ description: "Time steps per stored block" }),
  info: FieldInfoSchema,
  created_at: z.string(),
  owner: z.string(),
  visibility: z.enum(["private", "group", "public"]),
}).openapi("FieldMeta");

const FieldSchema = FieldMetaSchema.extend({
  time: z.array(z.number()).openapi({ description: "Decimal year of each time step" }),
  date: z.array(z.string()),
  lat: z.array(z.number()),
  lon: z.array(z.number()),
  lat_bounds: z.array(z.number()).nullable(),
  lon_bounds: z.array(z.number()).nullable(),
}).openapi("Field");

const UploadReport = z.object({
  format: z.string(),
  variable: z.string(),
  calendar: z.string(),
  time_units: z.string(),
  time_placement: z.string(),
  missing_values: z.number().int(),
  missing_fraction: z.number(),
  bytes_read: z.number().int(),
});

const FieldUploadAnswer = z.object({
  created: z.boolean(),
  field: FieldMetaSchema,
  report: UploadReport,
}).openapi("FieldUploadAnswer");

const CellQuery = z.object({
  lat: z.coerce.number().min(-90).max(90).openapi({ description: "Latitude, degrees north" }),
  lon: z.coerce.number().min(-360).max(720).openapi({
    description: "Longitude, degrees east (any convention; the nearest cell modulo 360°)",
  }),
  format: z.enum(["json", "csv"]).optional(),
});

const CellAnswer = z.object({
  field_id: z.string(),
  cell: z.object({
    index: z.number().int().openapi({ description: "i · n_lon + j" }),
    i: z.number().int(),
    j: z.number().int(),
    lat: z.number(),
    lon: z.number(),
  }),
  name: z.string(),
  quantity: z.string(),
  units: z.string(),
  resolution: z.string(),
  time: z.array(z.number()),
  date: z.array(z.string()),
  value: z.array(z.number().nullable()).openapi({ description: "null where missing" }),
}).openapi("FieldCell");

const SliceAnswer = z.object({
  field_id: z.string(),
  step: z.number().int(),
  time: z.number(),
  date: z.string(),
  units: z.string(),
  lat: z.array(z.number()),
  lon: z.array(z.number()),
  value: z.array(z.number().nullable()).openapi({
    description: "n_lat × n_lon values, latitude-major (index i · n_lon + j); null where missing",
  }),
}).openapi("FieldSlice");

/** Metadata with ISO dates. */
export function fieldView(m: FieldMeta) {
  const meta = fieldMetaOf(m);
  const res = meta.resolution === "irregular" ? "daily" : meta.resolution;
  return {
    ...meta,
    start_date: formatIsoTime(meta.start, res),
    end_date: formatIsoTime(meta.end, res),
  };
}

function fullView(f: FieldDescription) {
  const res = f.resolution === "irregular" ? "daily" : f.resolution;
  return {
    ...fieldView(f),
    time: Array.from(f.time),
    date: Array.from(f.time, (t) => formatIsoTime(t, res)),
    lat: Array.from(f.lat),
    lon: Array.from(f.lon),
    lat_bounds: f.lat_bounds ? Array.from(f.lat_bounds) : null,
    lon_bounds: f.lon_bounds ? Array.from(f.lon_bounds) : null,
  };
}

/** A field the caller may see, with the holding it sees it through (404 otherwise). */
async function mustGetField(
  c: Context,
  store: Store,
  id: string,
): Promise<{ f: FieldDescription; shared: boolean }> {
  const p = principalOf(c);
  const holding = await mustSeeField(store, p, id);
  const f = await store.getField(id, viewerOf(p));
  if (!f) throw new ProblemError("not-found", `No field has id ${id}`);
  return { f, shared: sharedCacheable(p, holding) };
}

/** A query's InputProblem as a 422 naming the query parameter. */
function queryProblem(e: unknown): unknown {
  if (e instanceof InputProblem) {
    return new ProblemError("validation", e.message, {
      errors: [{ pointer: e.pointer, in: "query", message: e.message }],
    });
  }
  return e;
}

/** A time in the query: a decimal year with a fraction, or an ISO 8601 date (its middle). */
function readTime(text: string): number {
  const s = text.trim();
  if (/^[+-]?\d+\.\d+$/.test(s)) return Number(s);
  try {
    const p = parseIsoTime(s);
    return (p.start + p.end) / 2;
  } catch {
    throw new InputProblem(
      "/time",
      "must be a decimal year with a fraction (1996.54) or an ISO 8601 date (1996-07)",
    );
  }
}

/** A cell's series as the series upload takes it (decimal years, null where missing). */
function cellSeriesInput(
  f: FieldDescription,
  values: Float32Array,
  cell: ReturnType<typeof nearestCell>,
) {
  return {
    name: `${f.name} at ${cell.lat}° N, ${cell.lon}° E`,
    quantity: f.quantity,
    units: f.units,
    description: `Cell (${cell.i}, ${cell.j}) of field ${f.id} (variable ${f.variable}), ` +
      `centred at ${cell.lat}° N, ${cell.lon}° E.`,
    source: `sunlag field ${f.id}`,
    time: Array.from(f.time),
    value: Array.from(values, (v) => (Number.isNaN(v) ? null : v)),
  };
}

/** Media types of a zipped Zarr store. */
const ZIP_TYPES = new Set(["application/zip", "application/x-zip-compressed"]);

/** How a field upload's body is limited and read (for the route and for tests). */
export async function uploadField(
  c: Context,
  store: Store,
  config: Config,
) {
  const limitBytes = config.fieldLimitBytes;
  const principal = principalOf(c);
  const ct = (c.req.header("content-type") ?? "").split(";")[0].trim().toLowerCase();
  if (!isNetcdfMediaType(ct) && !ZIP_TYPES.has(ct) && ct !== "application/octet-stream") {
    throw new ProblemError(
      "unsupported-media-type",
      `Upload a field as ${NETCDF_MEDIA_TYPE} (NetCDF-3 or NetCDF-4/HDF5) or application/zip (a zipped Zarr v2 store); the request said "${
        ct || "(no Content-Type)"
      }"`,
      {},
      { Accept: NETCDF_MEDIA_TYPE },
    );
  }
  const parsed = FieldUploadQuery.safeParse(c.req.query());
  if (!parsed.success) {
    const errors = parsed.error.issues.map((i) => ({
      pointer: i.code === "unrecognized_keys"
        ? `/${(i as { keys: string[] }).keys[0]}`
        : "/" + i.path.map(String).join("/"),
      in: "query" as const,
      message: i.message,
    }));
    throw new ProblemError(
      "validation",
      "The query parameters of the field upload failed validation: " +
        errors.map((e) => `${e.pointer}: ${e.message}`).join("; "),
      { errors },
    );
  }
  const declared = Number(c.req.header("content-length") ?? NaN);
  if (Number.isFinite(declared) && declared > limitBytes) {
    throw new ProblemError(
      "payload-too-large",
      `The field is ${declared} bytes, over the field size limit of ${limitBytes} bytes (SUNLAG_FIELD_LIMIT_MB)`,
    );
  }
  try {
    return await withTempUpload(
      c.req.raw.body,
      limitBytes,
      (path, size) =>
        withNetcdf(path, (src) =>
          storeNetcdfField(src, store, parsed.data, {
            holder: holderOf(principal),
            bytesRead: size,
            admit: isLimited(principal)
              ? (bytes) => checkStorage(store, principal.owner!, bytes, config.quotas)
              : undefined,
          })),
    );
  } catch (e) {
    if (e instanceof NetcdfError) {
      if (e.code === "too_large") {
        throw new ProblemError(
          "payload-too-large",
          `The field is over the field size limit of ${limitBytes} bytes (SUNLAG_FIELD_LIMIT_MB)`,
          { errors: [{ pointer: "", message: e.message }], reason: e.code },
        );
      }
      throw netcdfProblem(e);
    }
    if (e instanceof CfTimeError) throw cfTimeProblem(e, "body");
    throw e;
  }
}

export function registerFieldRoutes(app: App, deps: { store: Store; config: Config }): void {
  const { store } = deps;

  app.openapi(
    createRoute({
      method: "post",
      path: "/v1/fields",
      tags: ["Fields"],
      summary: "Upload a gridded field (NetCDF-CF or zipped Zarr, (time, latitude, longitude))",
      description: "The body is a NetCDF-3 (classic or 64-bit offset) or NetCDF-4/HDF5 file " +
        "(zlib-compressed and chunked variables are fine), or a Zarr v2 store as xarray writes " +
        "it, zipped (`to_zarr(zarr.storage.ZipStore(...))`; Blosc, zlib or gzip chunks; sent as " +
        "application/zip), streamed to a temporary file: the JSON " +
        "body limit does not apply, the field size limit does (SUNLAG_FIELD_LIMIT_MB, default " +
        "200). The variable is decoded as xarray would (time on its CF calendar: standard, " +
        "gregorian, proleptic_gregorian, noleap/365_day, all_leap/366_day, 360_day, julian; " +
        "_FillValue and missing_value masked before scale_factor/add_offset), stored as float32 " +
        "in blocks of time steps, and identified by the SHA-256 of its content: the same field " +
        "uploaded again answers 200 with the stored one. Nothing is stored when the file is " +
        "refused.",
      request: {
        query: FieldUploadQuery,
        body: {
          required: true,
          content: {
            [NETCDF_MEDIA_TYPE]: { schema: z.string().openapi({ format: "binary" }) },
            "application/zip": { schema: z.string().openapi({ format: "binary" }) },
          },
        },
      },
      responses: {
        200: {
          description: "Identical content already stored",
          content: { "application/json": { schema: FieldUploadAnswer } },
        },
        201: {
          description: "Stored",
          content: { "application/json": { schema: FieldUploadAnswer } },
        },
        ...problems(401, 403, 413, 415, 422, 429, 500),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const out = await uploadField(c, store, deps.config);
      c.header("Location", `/v1/fields/${out.field.id}`);
      return c.json(
        { created: out.created, field: fieldView(out.field), report: out.report },
        out.created ? 201 : 200,
      );
    }) as never,
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/fields",
      tags: ["Fields"],
      summary: "List stored fields, newest first",
      request: { query: PageQuery },
      responses: {
        200: {
          description: "A page of field metadata",
          content: { "application/json": { schema: pageSchema(FieldMetaSchema) } },
        },
        ...problems(422),
      },
    }),
    async (c) => {
      const q = c.req.valid("query");
      const page = await store.listFields({ ...q, viewer: viewerOf(principalOf(c)) });
      return c.json({
        items: page.items.map(fieldView),
        total: page.total,
        limit: q.limit,
        offset: q.offset,
      }, 200);
    },
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/fields/{id}",
      tags: ["Fields"],
      summary: "A field's metadata and coordinates (times, latitudes, longitudes, bounds)",
      request: { params: FieldIdParam },
      responses: {
        200: { description: "The field", content: { "application/json": { schema: FieldSchema } } },
        304: { description: "Not modified (fields are immutable)" },
        ...problems(404, 422),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id = c.req.valid("param").id;
      const { f } = await mustGetField(c, store, id);
      // the metadata shows the caller's holding (owner, visibility): no shared cache
      c.header("Cache-Control", "private, no-cache");
      return c.json(fullView(f));
    }) as never,
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/fields/{id}/cells",
      tags: ["Fields"],
      summary: "The time series of the cell nearest to lat/lon (JSON, or CSV with format=csv)",
      request: { params: FieldIdParam, query: CellQuery },
      responses: {
        200: {
          description: "The cell's series",
          content: {
            "application/json": { schema: CellAnswer },
            "text/csv": { schema: z.string() },
          },
        },
        304: { description: "Not modified" },
        ...problems(404, 422),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id = c.req.valid("param").id;
      const q = c.req.valid("query");
      const { f, shared } = await mustGetField(c, store, id);
      let cell;
      try {
        cell = nearestCell(f, q.lat, q.lon);
      } catch (e) {
        throw queryProblem(e);
      }
      const csv = wantsCsv(c);
      const etag = `"${id}-cell-${cell.cell}${csv ? "-csv" : ""}"`;
      const nm = notModified(c, etag, shared);
      if (nm) return nm;
      const values = await store.readFieldCell(id, cell.cell);
      setImmutableHeaders(c, etag, shared);
      c.header("Vary", "Accept");
      const s = cellSeriesInput(f, values, cell);
      const res = f.resolution;
      if (csv) {
        c.header("Content-Type", "text/csv; charset=utf-8");
        return c.body(seriesToCsv({
          id: `${id}/cell/${cell.cell}`,
          name: s.name,
          quantity: s.quantity,
          units: s.units,
          version: null,
          resolution: res,
          source: s.source,
          description: s.description,
          derived_from: null,
          time: f.time,
          value: Float64Array.from(values),
          uncertainty: null,
        }));
      }
      const isoRes = res === "irregular" ? "daily" : res;
      return c.json({
        field_id: id,
        cell: { index: cell.cell, i: cell.i, j: cell.j, lat: cell.lat, lon: cell.lon },
        name: s.name,
        quantity: s.quantity,
        units: s.units,
        resolution: res,
        time: s.time,
        date: s.time.map((t) => formatIsoTime(t, isoRes)),
        value: s.value,
      });
    }) as never,
  );

  app.openapi(
    createRoute({
      method: "post",
      path: "/v1/fields/{id}/cells/series",
      tags: ["Fields"],
      summary: "Save the series of the cell nearest to lat/lon as a stored series",
      description: "The cell's values become an ordinary stored series (missing values are " +
        "gaps), usable by every analysis; its source names the field and the cell.",
      request: {
        params: FieldIdParam,
        query: CellQuery.omit({ format: true }),
      },
      responses: {
        200: {
          description: "Identical series already stored",
          content: {
            "application/json": {
              schema: z.object({ created: z.boolean(), series: SeriesMetaSchema }),
            },
          },
        },
        201: {
          description: "Stored",
          content: {
            "application/json": {
              schema: z.object({ created: z.boolean(), series: SeriesMetaSchema }),
            },
          },
        },
        ...problems(404, 422),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id = c.req.valid("param").id;
      const q = c.req.valid("query");
      const { f } = await mustGetField(c, store, id);
      let cell;
      try {
        cell = nearestCell(f, q.lat, q.lon);
      } catch (e) {
        throw queryProblem(e);
      }
      const principal = principalOf(c);
      const values = await store.readFieldCell(id, cell.cell);
      const outcome = ingestJson(cellSeriesInput(f, values, cell));
      if (!outcome.ok) {
        throw new ProblemError(
          "validation",
          `The cell's series cannot be stored: ${outcome.errors[0].message}`,
          { errors: outcome.errors.map((e) => ({ ...e, pointer: "", in: "query" as const })) },
        );
      }
      const stored = await storedFromNormalised(outcome.series, null);
      if (isLimited(principal)) {
        await checkStorage(store, principal.owner!, stored.n * 24, deps.config.quotas);
      }
      const { created, series } = await store.putSeries(stored, holderOf(principal));
      c.header("Location", `/v1/series/${series.id}`);
      return c.json({ created, series: metaView(series) }, created ? 201 : 200);
    }) as never,
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/fields/{id}/slices",
      tags: ["Fields"],
      summary: "The map of the time step nearest to `time` (JSON, or CSV of cells)",
      request: {
        params: FieldIdParam,
        query: z.object({
          time: z.string().min(1).max(40).openapi({
            description: "A decimal year with a fraction (1996.54) or an ISO 8601 date " +
              "(1996-07 = the middle of July 1996)",
            example: "1996-07",
          }),
          format: z.enum(["json", "csv"]).optional(),
        }),
      },
      responses: {
        200: {
          description: "The map",
          content: {
            "application/json": { schema: SliceAnswer },
            "text/csv": { schema: z.string() },
          },
        },
        304: { description: "Not modified" },
        ...problems(404, 422),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id = c.req.valid("param").id;
      const q = c.req.valid("query");
      const { f, shared } = await mustGetField(c, store, id);
      let k: number;
      try {
        k = nearestStep(f.time, readTime(q.time));
      } catch (e) {
        throw queryProblem(e);
      }
      const csv = wantsCsv(c);
      const etag = `"${id}-slice-${k}${csv ? "-csv" : ""}"`;
      const nm = notModified(c, etag, shared);
      if (nm) return nm;
      const v = await store.readFieldSteps(id, k, k + 1);
      setImmutableHeaders(c, etag, shared);
      c.header("Vary", "Accept");
      const res = f.resolution === "irregular" ? "daily" : f.resolution;
      if (csv) {
        c.header("Content-Type", "text/csv; charset=utf-8");
        return c.body(sliceCsv(f, k, v));
      }
      return c.json({
        field_id: id,
        step: k,
        time: f.time[k],
        date: formatIsoTime(f.time[k], res),
        units: f.units,
        lat: Array.from(f.lat),
        lon: Array.from(f.lon),
        value: Array.from(v, (x) => (Number.isNaN(x) ? null : x)),
      });
    }) as never,
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/fields/{id}/slices/chart.svg",
      tags: ["Fields", "Charts"],
      summary: "The map of the time step nearest to `time` as a standalone SVG chart",
      description: "Equirectangular map of the cells on a sequential colour scale (viridis, " +
        "2nd to 98th percentile), Natural Earth coastlines, grey where missing; immutable.",
      request: {
        params: FieldIdParam,
        query: z.object({
          time: z.string().min(1).max(40).openapi({
            description: "A decimal year with a fraction or an ISO 8601 date",
            example: "1996-07",
          }),
          width: z.coerce.number().int().min(240).max(4000).default(800),
          height: z.coerce.number().int().min(160).max(3000).default(480),
          theme: z.enum(["light", "dark"]).default("light"),
        }),
      },
      responses: {
        200: {
          description: "The map",
          content: { "image/svg+xml": { schema: z.string().openapi({ format: "binary" }) } },
        },
        304: { description: "Not modified" },
        ...problems(404, 422),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id = c.req.valid("param").id;
      const q = c.req.valid("query");
      const { f, shared } = await mustGetField(c, store, id);
      let k: number;
      try {
        k = nearestStep(f.time, readTime(q.time));
      } catch (e) {
        throw queryProblem(e);
      }
      const etag = `"${id}-slice-${k}-svg-${q.width}x${q.height}-${q.theme}-${SERVICE_VERSION}"`;
      const nm = notModified(c, etag, shared);
      if (nm) return nm;
      const v = await store.readFieldSteps(id, k, k + 1);
      const res = f.resolution === "irregular" ? "daily" : f.resolution;
      const date = formatIsoTime(f.time[k], res);
      const svg = renderMapChart({
        type: "map",
        title: `${f.name}, ${date}`,
        description: `Field ${f.id} (variable ${f.variable}) at time step ${k}.`,
        lat: f.lat,
        lon: f.lon,
        lat_bounds: f.lat_bounds,
        lon_bounds: f.lon_bounds,
        values: Array.from(v, (x) => (Number.isNaN(x) ? null : x)),
        legend: `${f.variable} (${f.units})`,
        scale: "sequential",
        notes: [
          `Time step ${k + 1} of ${f.n_time}; ${f.info.calendar} calendar in the uploaded file.`,
        ],
      }, { width: q.width, height: q.height, theme: q.theme });
      setImmutableHeaders(c, etag, shared);
      c.header("Content-Type", "image/svg+xml; charset=utf-8");
      c.header("X-Content-Type-Options", "nosniff");
      c.header("Content-Security-Policy", "default-src 'none'; style-src 'unsafe-inline'; sandbox");
      return c.body(svg);
    }) as never,
  );

  app.openapi(
    createRoute({
      method: "delete",
      path: "/v1/fields/{id}",
      tags: ["Fields"],
      summary: "Delete your copy of a field (refused with 409 while a run uses it)",
      description: "The rules of series: removes the caller's holding, and the content goes " +
        "when no owner holds it; refused while one of the caller's runs uses the field, or " +
        "while it is the last holding and another owner's run uses it. An admin deletes a " +
        "field it does not hold outright, unless a run uses it.",
      request: { params: FieldIdParam },
      responses: { 204: { description: "Deleted" }, ...problems(401, 403, 404, 409) },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id = c.req.valid("param").id;
      const p = principalOf(c);
      const h = await mustSeeField(store, p, id);
      let outcome: "deleted" | "not_found" | "in_use";
      if (h.owner === p.owner) outcome = await store.deleteFieldHolding(id, p.owner!);
      else if (p.role === "admin") outcome = await store.deleteField(id);
      else {
        throw new ProblemError(
          "forbidden",
          `Field ${id} is shared with you by its owner; only its owner or an admin may delete it`,
        );
      }
      if (outcome === "not_found") throw new ProblemError("not-found", `No field has id ${id}`);
      if (outcome === "in_use") {
        const runs = await store.runsUsingField(id);
        throw new ProblemError(
          "conflict",
          `Field ${id} is an input of ${runs.length} run(s) and cannot be deleted`,
          { runs: runs.slice(0, 50) },
        );
      }
      return c.body(null, 204);
    }) as never,
  );
}

/** CSV of one time slice: one row per cell, `#` metadata lines above the header. */
function sliceCsv(f: FieldDescription, k: number, v: Float32Array): string {
  const res = f.resolution === "irregular" ? "daily" : f.resolution;
  const out = [
    `# sunlag field slice`,
    `# field: ${f.id}`,
    `# name: ${JSON.stringify(f.name)}`,
    `# time: ${formatIsoTime(f.time[k], res)} (decimal year ${f.time[k]}, step ${k})`,
    `# columns: lat = degrees north, lon = degrees east (cell centres); value in ${
      JSON.stringify(f.units)
    }; empty = missing`,
    "lat,lon,value",
  ];
  const nLon = f.lon.length;
  for (let c = 0; c < v.length; c++) {
    const x = v[c];
    out.push(`${f.lat[Math.floor(c / nLon)]},${f.lon[c % nLon]},${float32Text(x)}`);
  }
  return out.join("\n") + "\n";
}
