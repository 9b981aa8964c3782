/**
 * NetCDF over HTTP: content negotiation (`?format=netcdf` or `Accept: application/x-netcdf`),
 * the `calendar` query parameter, NetCDF-CF responses for stored series and run outputs, the
 * NetCDF upload of a series, and the mapping of NetCDF and CF time errors to RFC 9457
 * problems. The series and run routes call these functions; they hold no NetCDF logic
 * themselves.
 *
 * @module
 */
import type { Context } from "hono";
import type { RequestView } from "../routes/cache.ts";
import { z } from "@hono/zod-openapi";
import { encodeNetcdf3, netcdf3Chunks, planNetcdf3 } from "../../core/cf/netcdf3_write.ts";
import { attributeText } from "../../core/cf/netcdf_model.ts";
import { quantityOfStandardName } from "../../core/cf/cf_standard_names.ts";
import {
  CF_CALENDAR_NAMES,
  type CfCalendar,
  CfTimeError,
  parseCfCalendar,
} from "../../core/time/mod.ts";
import { canonicalUnits, QUANTITIES, type Quantity } from "../../core/series/quantities.ts";
import { type FieldError, ProblemError } from "../problems.ts";
import type { RunRecord, Store, StoredSeries } from "../store/types.ts";
import type { OutputSeries } from "../runs/kind.ts";
import { noteLinesOf } from "../runs/inherit.ts";
import { immutableHeaders, notModified } from "../routes/cache.ts";
import {
  type CachedRepresentation,
  identityRepresentation,
  type ImmutableCache,
  serveRepresentation,
} from "../routes/immutable_cache.ts";
import { checkMeta, ErrorList, finish, type SeriesMetaInput } from "../ingest/normalise.ts";
import type { IngestResult } from "../ingest/types.ts";
import { SERVICE_VERSION } from "../version.ts";
import { describePlacement } from "./cf_time_axis.ts";
import { buildSpectrumDataset } from "./spectrum_dataset.ts";
import { spectrumEnsembleSourceOf } from "../analyses/spectral_irradiance_reconstructions/ensemble.ts";
import type { SpectrumBlockIn } from "../analyses/common/spectrum_block.ts";
import { listCfVariables } from "./cf_variables.ts";
import { readCfSeries } from "./cf_series.ts";
import { NetcdfError } from "./errors.ts";
import { withNetcdf, withTempUpload } from "./open.ts";
import {
  buildSeriesDataset,
  type EnsembleSource,
  type Provenance,
  type SeriesLike,
} from "./series_dataset.ts";
import type { NetcdfSource } from "./source.ts";

/** The media type of NetCDF (classic and NetCDF-4 alike). */
export const NETCDF_MEDIA_TYPE = "application/x-netcdf";

const NETCDF_TYPES = /^application\/(x-)?netcdf$/i;

/** True for a Content-Type that names NetCDF. */
export function isNetcdfMediaType(contentType: string): boolean {
  return NETCDF_TYPES.test(contentType.split(";")[0].trim());
}

/** The `calendar` query parameter of NetCDF downloads (OpenAPI and validation). */
export const CalendarQuery = z.enum(Object.keys(CF_CALENDAR_NAMES) as [string, ...string[]])
  .optional().openapi({
    description: "NetCDF only: the CF calendar of the file's time axis (default standard). " +
      "Monthly and annual means are written on the same months and years of noleap/365_day, " +
      "all_leap/366_day and 360_day; daily series on noleap lose 29 February; a calendar " +
      "that cannot hold the series' resolution (daily data on 360_day) is refused",
    example: "noleap",
  });

/** The response content entry of a NetCDF download, for route definitions. */
export const NETCDF_CONTENT = {
  [NETCDF_MEDIA_TYPE]: { schema: z.string().openapi({ format: "binary" }) },
};

/**
 * Whether the request asks for NetCDF: `format=netcdf`, or no `format` and an `Accept` that
 * names application/x-netcdf. A `calendar` parameter without NetCDF is refused (it would
 * silently do nothing).
 *
 * @throws {ProblemError} 422 naming `calendar`
 */
export function wantsNetcdf(c: RequestView): boolean {
  const f = c.req.query("format");
  const accept = (c.req.header("accept") ?? "").toLowerCase();
  const yes = f ? f.toLowerCase() === "netcdf" : /application\/(x-)?netcdf/.test(accept) &&
    !/application\/json|text\/csv/.test(accept);
  if (!yes && c.req.query("calendar") !== undefined) {
    throw new ProblemError(
      "validation",
      "calendar applies to NetCDF output only (format=netcdf or Accept: application/x-netcdf)",
      { errors: [{ pointer: "/calendar", in: "query", message: "only with format=netcdf" }] },
    );
  }
  return yes;
}

/**
 * The CF calendar a NetCDF download asks for (`calendar`, default standard).
 *
 * @throws {ProblemError} 422 naming `calendar`
 */
export function calendarOf(c: RequestView): CfCalendar {
  try {
    return parseCfCalendar(c.req.query("calendar"));
  } catch (e) {
    throw cfTimeProblem(e as CfTimeError, "query");
  }
}

/** An RFC 9457 problem for a CF time error: from the query (`calendar`) or from a file. */
export function cfTimeProblem(e: CfTimeError, where: "query" | "body"): ProblemError {
  const errors: FieldError[] = where === "query"
    ? [{ pointer: "/calendar", in: "query", message: e.message }]
    : [{ pointer: "", message: e.message }];
  return new ProblemError("validation", e.message, { errors, reason: e.code });
}

/** An RFC 9457 problem for a NetCDF error. */
export function netcdfProblem(e: NetcdfError): ProblemError {
  const status = e.code === "not_netcdf" || e.code === "unsupported_format"
    ? "unsupported-media-type"
    : e.code === "too_large"
    ? "payload-too-large"
    : "validation";
  const error: FieldError = e.code === "unknown_variable"
    ? { pointer: "/variable", in: "query", message: e.message }
    : { pointer: "", message: e.message };
  return new ProblemError(
    status,
    e.message,
    {
      errors: [error],
      reason: e.code,
      ...(e.variable !== undefined ? { variable: e.variable.slice(0, 200) } : {}),
    },
    status === "unsupported-media-type"
      ? { Accept: `${NETCDF_MEDIA_TYPE}, application/json, text/csv` }
      : {},
  );
}

function asProblem(e: unknown, cfWhere: "query" | "body"): unknown {
  if (e instanceof NetcdfError) return netcdfProblem(e);
  if (e instanceof CfTimeError) return cfTimeProblem(e, cfWhere);
  return e;
}

function fileName(parts: string[]): string {
  return parts.join("_").replace(/[^A-Za-z0-9_.-]+/g, "-").slice(0, 120) + ".nc";
}

/**
 * Where a NetCDF answer of a finished run is kept once written: `key` in `cache`, when the
 * file fits the cache's bound on one entry (larger files are streamed on every request).
 */
export interface NetcdfKeep {
  cache: ImmutableCache;
  key: string;
}

/**
 * A NetCDF answer; `shared` false (an item that is not public, asked for with a key) keeps it
 * out of shared caches (`Cache-Control: private`), as every other representation of it.
 */
function respond(
  c: Context,
  build: () => ReturnType<typeof buildSeriesDataset>,
  etag: string,
  name: string,
  shared: boolean,
  keep?: NetcdfKeep,
): Response | Promise<Response> {
  let built;
  try {
    built = build();
  } catch (e) {
    throw asProblem(e, "query");
  }
  const headers = { "Vary": "Accept" };
  const rep = keep && netcdfRepresentation(built.dataset, name, etag, headers, keep.cache);
  if (rep) {
    keep.cache.set(keep.key, rep);
    return serveRepresentation(c, rep, shared);
  }
  return netcdfStreamResponse(c, built.dataset, name, {
    ...headers,
    ...immutableHeaders(etag, shared),
  });
}

/**
 * A NetCDF-3 file written whole as a cached representation with the headers its streamed
 * response has (`netcdfStreamResponse`, the caching headers aside); null when the planned file
 * is larger than `cache` keeps in one entry.
 */
export function netcdfRepresentation(
  dataset: Parameters<typeof planNetcdf3>[0],
  name: string,
  etag: string,
  headers: Record<string, string>,
  cache: ImmutableCache,
): CachedRepresentation | null {
  const total = planNetcdf3(dataset).totalBytes;
  if (total > cache.maxEntryBytes) return null;
  return identityRepresentation(etag, encodeNetcdf3(dataset) as Uint8Array<ArrayBuffer>, {
    "Content-Type": NETCDF_MEDIA_TYPE,
    "Content-Length": String(total),
    "Content-Disposition": `attachment; filename="${name}"`,
    ...headers,
  });
}

/**
 * A 200 response streaming a NetCDF-3 file a member at a time (`netcdf3Chunks`), with its
 * exact `Content-Length` from the planned layout, as an attachment named `name`; `headers`
 * adds the caching headers.
 */
export function netcdfStreamResponse(
  c: Context,
  dataset: Parameters<typeof planNetcdf3>[0],
  name: string,
  headers: Record<string, string>,
): Response {
  const layout = planNetcdf3(dataset);
  const chunks = netcdf3Chunks(dataset);
  const body = new ReadableStream<Uint8Array>({
    pull(ctl) {
      const r = chunks.next();
      if (r.done) ctl.close();
      else ctl.enqueue(r.value);
    },
  });
  return new Response(body, {
    status: 200,
    headers: {
      "Content-Type": NETCDF_MEDIA_TYPE,
      "Content-Length": String(layout.totalBytes),
      "Content-Disposition": `attachment; filename="${name}"`,
      "X-Request-Id": c.get("requestId" as never) ?? "",
      ...headers,
    },
  });
}

/** A stored series as a `SeriesLike`. */
export function seriesLikeOf(s: StoredSeries): SeriesLike {
  return {
    name: s.name,
    quantity: s.quantity,
    units: s.units,
    time: s.time,
    value: s.value,
    uncertainty: s.uncertainty,
    description: s.description,
    resolution: s.resolution,
  };
}

/**
 * `GET /v1/series/{id}?format=netcdf[&calendar=...]`: the series as NetCDF-CF (classic). A
 * series never changes, so with `cache` its file on each calendar is written once and kept
 * (bounded; a larger file is streamed on every request).
 *
 * @throws {ProblemError} 404 for an unknown id, 422 for a calendar that cannot hold it
 */
export async function seriesNetcdfResponse(
  c: Context,
  store: Store,
  id: string,
  shared: boolean,
  cache?: ImmutableCache,
): Promise<Response> {
  const calendar = calendarOf(c);
  if (!(await store.getSeriesMeta(id))) {
    throw new ProblemError("not-found", `No series has id ${id}`);
  }
  const etag = `"${id}-netcdf-${calendar}-${SERVICE_VERSION}"`;
  const nm = notModified(c, etag, shared);
  if (nm) return nm;
  const key = `${id}-netcdf-${calendar}`;
  const hit = cache?.get(key);
  if (hit) return await serveRepresentation(c, hit, shared);
  const s = await store.getSeries(id);
  if (!s) throw new ProblemError("not-found", `No series has id ${id}`);
  const prov: Provenance = {
    title: s.name,
    history: [
      `sunlag ${SERVICE_VERSION}: stored series ${s.id} written as NetCDF-CF on the ${calendar} calendar` +
      (s.derived_from ? `; the series was derived from run ${s.derived_from}` : ""),
    ],
    references: [
      `sunlag series ${s.id}: /v1/series/${s.id}`,
      ...(s.source ? [`source of the data: ${s.source}`] : []),
    ],
    seriesId: s.id,
    ...(s.derived_from ? { runId: s.derived_from } : {}),
    warnings: [],
    cautions: [],
  };
  const short = s.id.replace(/^sha256:/, "").slice(0, 12);
  return await respond(
    c,
    () => buildSeriesDataset(seriesLikeOf(s), prov, { calendar }),
    etag,
    fileName([s.quantity, short, calendar]),
    shared,
    cache && { cache, key },
  );
}

/** The provenance of a file written from a run's result (`what` names the part written). */
function runProvenance(run: RunRecord, title: string, what: string, calendar: string): Provenance {
  // the run's own warnings and cautions, then those of the runs it is built on
  const notes = noteLinesOf(run.result);
  return {
    title: `${title} (sunlag run ${run.id}, ${run.kind})`,
    history: [
      `${run.created_at}: sunlag ${run.service_version} ran ${run.kind} (algorithm ${run.algorithm_version}) as run ${run.id}`,
      `sunlag ${SERVICE_VERSION}: ${what} written as NetCDF-CF on the ${calendar} calendar`,
    ],
    references: [
      `sunlag run ${run.id}: /v1/runs/${run.id} (parameters, inputs, versions, seed, result digest); replay with POST /v1/runs/${run.id}/replay`,
    ],
    runId: run.id,
    resultDigest: `sha256:${run.result_digest ?? ""}`,
    dateCreated: run.created_at,
    warnings: notes.warnings,
    cautions: notes.cautions,
  };
}

/**
 * `GET /v1/runs/{id}/outputs/{name}?format=netcdf[&calendar=...]`: one output as NetCDF-CF,
 * with the run's id, result digest, warnings and cautions in the global attributes. An
 * ensemble, when given, is written as `<variable>_realizations` (realization × time), one
 * member at a time as the response streams.
 *
 * @throws {ProblemError} 409 for an output off calendar time, 422 for an unfit calendar
 */
export function runOutputNetcdfResponse(
  c: Context,
  run: RunRecord,
  name: string,
  o: OutputSeries,
  shared: boolean,
  ensemble?: EnsembleSource,
  attributes: [string, string][] = [],
  keep?: NetcdfKeep,
): Response | Promise<Response> {
  const calendar = calendarOf(c);
  if (o.time_axis && o.time_axis !== "decimal_year") {
    throw new ProblemError(
      "conflict",
      `Output "${name}" of run ${run.id} has a ${
        o.time_axis.replace(/_/g, " ")
      } axis, not calendar time; NetCDF-CF output needs calendar time (use CSV or JSON)`,
    );
  }
  const etag = `"run-${run.id}-${run.result_digest}-${name}-netcdf-${calendar}-${SERVICE_VERSION}"`;
  const nm = notModified(c, etag, shared);
  if (nm) return nm;
  const prov = { ...runProvenance(run, o.name, `output "${name}"`, calendar), attributes };
  const s: SeriesLike = {
    name: o.name,
    quantity: o.quantity,
    units: o.units,
    time: o.time,
    value: o.value,
    uncertainty: o.uncertainty ?? null,
    lower: o.lower ?? null,
    upper: o.upper ?? null,
    interval: o.interval ?? null,
    description: o.description ?? null,
  };
  return respond(
    c,
    () => buildSeriesDataset(s, prov, { calendar, ensemble }),
    etag,
    fileName([run.id, name, calendar]),
    shared,
    keep,
  );
}

/**
 * `GET /v1/runs/{id}/spectrum?format=netcdf[&calendar=...]`: a run's spectrum over time as
 * NetCDF-CF with a `wavelength` coordinate and `wavelength_bnds` (api/netcdf/spectrum_dataset.ts).
 *
 * @throws {ProblemError} 422 for a calendar that cannot hold the spectrum's resolution
 */
export function runSpectrumNetcdfResponse(
  c: Context,
  run: RunRecord,
  s: SpectrumBlockIn,
  shared: boolean,
  keep?: NetcdfKeep,
): Response | Promise<Response> {
  const calendar = calendarOf(c);
  const etag =
    `"run-${run.id}-${run.result_digest}-spectrum-netcdf-${calendar}-${SERVICE_VERSION}"`;
  const nm = notModified(c, etag, shared);
  if (nm) return nm;
  const prov = runProvenance(run, s.name, "spectrum", calendar);
  return respond(
    c,
    () => buildSpectrumDataset(s, prov, calendar, spectrumEnsembleSourceOf(run.result, s)),
    etag,
    fileName([run.id, "spectrum", calendar]),
    shared,
    keep,
  );
}

/** Query parameters of a NetCDF upload, besides the text-upload ones it shares. */
export const NetcdfUploadQuery = z.object({
  name: z.string().min(1).max(200).optional(),
  quantity: z.enum(QUANTITIES).optional(),
  units: z.string().max(60).optional(),
  description: z.string().max(4000).optional(),
  source: z.string().max(2000).optional(),
  version: z.string().max(40).optional(),
  variable: z.string().min(1).max(200).optional(),
  uncertainty: z.string().min(1).max(200).optional(),
}).strict();

/** The `variable` parameter, for the upload route's OpenAPI query. */
export const VariableQuery = z.string().min(1).max(200).optional().openapi({
  description: "NetCDF upload: the variable to store (1-D along a CF time coordinate; " +
    "dimensions of size 1 are dropped). Default: the only such variable in the file. With " +
    "NetCDF, `uncertainty` names the uncertainty variable (default: one linked through " +
    "ancillary_variables with a standard_error standard name)",
  example: "tsi",
});

/**
 * The one data variable along time with `others` more dimensions (0: a series, 1: a spectral
 * record), or a 422 at /variable listing them when there is none or several.
 */
export function onlyTimeDataVariable(src: NetcdfSource, others: 0 | 1): string {
  const found = timeDataVariables(src, others);
  if (found.length === 1) return found[0];
  const what = others === 0 ? "series" : "spectral record (time and one wavelength dimension)";
  throw new ProblemError(
    "validation",
    found.length === 0
      ? `The file has no variable along a CF time coordinate that could be a ${what}`
      : `The file has ${found.length} variables that could be a ${what}: name one with variable= (${
        found.slice(0, 20).join(", ")
      })`,
    {
      errors: [{ pointer: "/variable", in: "query", message: "required: choose one" }],
      variables: found.slice(0, 50),
    },
  );
}

/**
 * Data variables along a CF time coordinate with `others` more dimensions longer than 1 (0
 * for series, 1 for spectral records), uncertainty variables left out.
 */
export function timeDataVariables(src: NetcdfSource, others: 0 | 1 = 0): string[] {
  return listCfVariables(src.header)
    .filter((v) =>
      v.role === "data" && v.time_dimension !== null &&
      v.shape.filter((n, i) => n !== 1 && v.dimensions[i] !== v.time_dimension).length ===
        others &&
      !/standard_error$/.test(v.standard_name ?? "")
    )
    .map((v) => v.name);
}

/**
 * Read a NetCDF upload (`POST /v1/series` with Content-Type application/x-netcdf) into a
 * normalised series, or the reasons there is none. The body is streamed to a temporary file,
 * read, and deleted; nothing is stored here.
 *
 * @param c the request
 * @param limitBytes the body limit
 * @returns the ingest outcome, as for JSON and text uploads
 * @throws {ProblemError} 415 (not NetCDF), 413 (too large), 422 (bad query, unusable file)
 */
export async function ingestNetcdfUpload(c: Context, limitBytes: number): Promise<IngestResult> {
  const raw = c.req.query();
  const parsed = NetcdfUploadQuery.safeParse(raw);
  if (!parsed.success) {
    const errors: FieldError[] = parsed.error.issues.map((i) => ({
      pointer: i.code === "unrecognized_keys"
        ? `/${(i as { keys: string[] }).keys[0]}`
        : "/" + i.path.map(String).join("/"),
      in: "query",
      message: i.code === "unrecognized_keys"
        ? `${(i as { keys: string[] }).keys.join(", ")} applies to text uploads, not NetCDF`
        : i.message,
    }));
    throw new ProblemError(
      "validation",
      "The query parameters of the NetCDF upload failed validation: " +
        errors.map((e) => `${e.pointer}: ${e.message}`).join("; "),
      { errors },
    );
  }
  const q = parsed.data;
  try {
    return await withTempUpload(
      c.req.raw.body,
      limitBytes,
      (path) =>
        withNetcdf(path, async (src) => {
          const name = q.variable ?? onlyTimeDataVariable(src, 0);
          const s = await readCfSeries(src, name, { uncertainty: q.uncertainty });
          return toNormalised(src, s, name, q);
        }),
    );
  } catch (e) {
    throw asProblem(e, "body");
  }
}

function toNormalised(
  src: NetcdfSource,
  s: Awaited<ReturnType<typeof readCfSeries>>,
  name: string,
  q: z.output<typeof NetcdfUploadQuery>,
): IngestResult {
  const errors = new ErrorList();
  const fileUnits = attributeText(s.attributes, "units");
  const stdName = attributeText(s.attributes, "standard_name");
  const quantity = q.quantity ?? (stdName ? quantityOfStandardName(stdName) : undefined);
  const fromFile = new Set<string>();
  if (q.units === undefined && fileUnits !== undefined) fromFile.add("units");
  if (q.quantity === undefined && quantity !== undefined) fromFile.add("quantity");
  const meta: SeriesMetaInput = {
    name: q.name ?? attributeText(s.attributes, "long_name") ?? name,
    quantity: quantity ?? null,
    units: q.units ?? fileUnits ?? null,
    description: q.description ?? null,
    source: q.source ?? attributeText(src.header.attributes, "source") ?? null,
    version: q.version ?? null,
  };
  const at = (field: keyof SeriesMetaInput) =>
    fromFile.has(field)
      ? { pointer: "", in: "body" as const }
      : { pointer: `/${field}`, in: "query" as const };
  const checked = checkMeta(meta, at, errors);
  if (q.units !== undefined && fileUnits !== undefined && quantity !== undefined) {
    const a = canonicalUnits(quantity as Quantity, q.units);
    const b = canonicalUnits(quantity as Quantity, fileUnits);
    if (!(a.ok && b.ok ? a.units === b.units : q.units.trim() === fileUnits.trim())) {
      errors.add({
        pointer: "/units",
        in: "query",
        message: `units "${q.units}" contradict the file's units "${fileUnits}" of "${name}"`,
      });
    }
  }
  const t = s.time.decimalYears;
  return finish(
    {
      time: t,
      value: s.values,
      uncertainty: s.uncertainty,
      where: (i) => ({ pointer: "", column: name, row: i }),
      // Too few or too many points: the variable chosen is at fault.
      whole: { pointer: "/variable", in: "query", column: name },
    },
    checked,
    "reject",
    errors,
    {
      format: src.header.format,
      variable: name,
      ...(s.uncertaintyVariable ? { uncertainty_variable: s.uncertaintyVariable } : {}),
      calendar: s.time.calendar,
      time_units: s.time.units,
      time_placement: describePlacement(s.time.placement, s.time.calendar),
      ...(fromFile.size ? { metadata_from_file: [...fromFile].sort() } : {}),
    },
  );
}
