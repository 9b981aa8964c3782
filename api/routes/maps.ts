/**
 * Map downloads of gridded runs (solar-signal maps, field composites): `GET
 * /v1/runs/{id}/map` as JSON (the map part of the result), CSV of cells (`format=csv`) or
 * NetCDF-CF (`format=netcdf`), each carrying the run's provenance and cautions. Finished runs
 * never change, so the answers are immutable and revalidate with their ETag.
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import type { Context } from "hono";
import type { App } from "../app_env.ts";
import type { RunRecord, Store } from "../store/types.ts";
import { ProblemError } from "../problems.ts";
import { problems } from "../schemas/common.ts";
import { immutableHeaders, notModified } from "./cache.ts";
import {
  type CachedRepresentation,
  identityRepresentation,
  ImmutableCache,
  serveCachedIfSeen,
  serveRepresentation,
  serveStored,
} from "./immutable_cache.ts";
import { type HotGets, QueryMemo } from "../hot_gets.ts";
import { type MapPart, MapPartSchema } from "../analyses/common/map_result.ts";
import { ncText } from "../../core/cf/netcdf_model.ts";
import { buildMapDataset, type LagMaps } from "../netcdf/map_dataset.ts";
import { NETCDF_CONTENT, netcdfRepresentation, netcdfStreamResponse } from "../netcdf/http.ts";
import type { Provenance } from "../netcdf/series_dataset.ts";
import { SERVICE_VERSION } from "../version.ts";
import { principalOf } from "../auth/authenticate.ts";
import { mustSeeRun, sharedCacheable } from "../auth/access.ts";

/** The parts of a gridded result the downloads read. */
const GriddedResult = z.object({
  map: MapPartSchema,
  lag_unit: z.string().optional(),
  lag_maps: z.object({
    lags: z.array(z.number()),
    r: z.array(z.array(z.number().nullable())),
    p: z.array(z.array(z.number().nullable())),
  }).nullable().optional(),
  field: z.object({ id: z.string(), name: z.string() }).optional(),
  field_significance: z.unknown().optional(),
  warnings: z.array(z.string()).default([]),
  cautions: z.array(z.string()).default([]),
});

type Gridded = z.output<typeof GriddedResult>;

/** The map of a finished run, or the problem saying why there is none. */
async function mapOf(
  c: Context,
  store: Store,
  id: string,
): Promise<{ run: RunRecord; g: Gridded; shared: boolean }> {
  const p = principalOf(c);
  const holding = await mustSeeRun(store, p, id);
  const run = await store.getRun(id);
  if (!run) throw new ProblemError("not-found", `No run has id ${id}`);
  if (run.status !== "succeeded" || !run.result) {
    throw new ProblemError(
      "conflict",
      `Run ${id} has status ${run.status}; its map exists once it has succeeded`,
      {},
      { "Cache-Control": "no-store" },
    );
  }
  const parsed = GriddedResult.safeParse(run.result);
  if (!parsed.success) {
    throw new ProblemError("not-found", `Run ${id} (${run.kind}) has no map`);
  }
  return { run, g: parsed.data, shared: sharedCacheable(p, holding) };
}

/** The provenance of a run's map. */
function provenance(run: RunRecord, g: Gridded): Provenance {
  return {
    title: `${run.kind} map${g.field ? ` of ${g.field.name}` : ""} (sunlag run ${run.id})`,
    history: [
      `${run.created_at}: sunlag ${run.service_version} ran ${run.kind} (algorithm ${run.algorithm_version}) as run ${run.id}`,
      `sunlag ${SERVICE_VERSION}: the map written as NetCDF-CF`,
    ],
    references: [
      `sunlag run ${run.id}: /v1/runs/${run.id} (parameters, inputs, versions, seed, result digest); replay with POST /v1/runs/${run.id}/replay`,
      ...(g.field ? [`input field ${g.field.id}: /v1/fields/${g.field.id}`] : []),
    ],
    runId: run.id,
    resultDigest: `sha256:${run.result_digest ?? ""}`,
    dateCreated: run.created_at,
    warnings: g.warnings,
    cautions: g.cautions,
  };
}

/** CSV of the cells: one row per cell, the map's variables as columns. */
export function mapCsv(run: RunRecord, g: Gridded): string {
  const m: MapPart = g.map;
  const clean = (s: string) => s.replace(/[\r\n]+/g, " ");
  const out = [
    "# sunlag map",
    `# run: ${run.id} (${run.kind}, algorithm ${run.algorithm_version})`,
    `# result_digest: sha256:${run.result_digest ?? ""}`,
    ...(g.field ? [`# field: ${g.field.id}`] : []),
    "# columns: lat = degrees north, lon = degrees east (cell centres); cell = i * n_lon + j; " +
    "empty = left out of the analysis",
    ...m.variables.map((v) => `# ${v.name}: ${clean(v.long_name)} [${v.units}]`),
    ...g.warnings.map((w) => `# warning: ${clean(w)}`),
    ...g.cautions.map((c) => `# caution: ${clean(c)}`),
    ["lat", "lon", "cell", ...m.variables.map((v) => v.name)].join(","),
  ];
  const nLon = m.grid.lon.length;
  const cells = m.grid.lat.length * nLon;
  for (let c = 0; c < cells; c++) {
    const row = [String(m.grid.lat[Math.floor(c / nLon)]), String(m.grid.lon[c % nLon]), String(c)];
    for (const v of m.variables) {
      const x = v.values[c];
      row.push(x === null ? "" : String(x));
    }
    out.push(row.join(","));
  }
  return out.join("\n") + "\n";
}

/** The NetCDF-CF dataset of a run's map. */
function mapDataset(run: RunRecord, g: Gridded) {
  const lagMaps: LagMaps | null = g.lag_maps
    ? {
      lags: g.lag_maps.lags,
      lagUnits: g.lag_unit ?? "1",
      variables: [
        { name: "r_lag", long_name: "Correlation at each lag", units: "1", values: g.lag_maps.r },
        {
          name: "p_lag",
          long_name: "Two-sided analytic p at each lag",
          units: "1",
          values: g.lag_maps.p,
        },
      ],
    }
    : null;
  const extra = g.field_significance !== undefined
    ? [ncText("field_significance", JSON.stringify(g.field_significance))]
    : [];
  return buildMapDataset(g.map, provenance(run, g), extra, lagMaps);
}

/**
 * The representation of a run's map in `format`, made once (JSON, CSV, and NetCDF-CF when it
 * fits `cache`'s bound on one entry); null for a NetCDF file larger than that.
 */
function mapRepresentation(
  run: RunRecord,
  g: Gridded,
  format: "json" | "csv" | "netcdf",
  etag: string,
  cache: ImmutableCache,
): CachedRepresentation | null {
  if (format === "netcdf") {
    return netcdfRepresentation(mapDataset(run, g), `${run.id}_map.nc`, etag, {}, cache);
  }
  if (format === "csv") {
    return identityRepresentation(etag, mapCsv(run, g), {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="${run.id}_map.csv"`,
    });
  }
  return identityRepresentation(etag, JSON.stringify(g.map), {
    "Content-Type": "application/json",
  });
}

export function registerMapRoutes(
  app: App,
  deps: { store: Store; hot?: HotGets; downloads?: ImmutableCache },
): void {
  const { store } = deps;
  const downloads = deps.downloads ?? new ImmutableCache();
  const key = (id: string, format: string) => `map/${id}/${format}`;
  // A succeeded run's map (and its 304) from the cache, ahead of the middleware, for query
  // strings the route validated.
  const queries = new QueryMemo<{ format: string }>();
  deps.hot?.add("/v1/runs/:id/map", ({ view, principal, params: [id], search }) => {
    const q = queries.get(search);
    const hit = q && downloads.get(key(id, q.format));
    if (!hit) return null;
    return serveCachedIfSeen(store, [{ kind: "run", id }], principal, view, hit, serveStored);
  });
  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/runs/{id}/map",
      tags: ["Runs"],
      summary: "The map of a gridded run: JSON, CSV of cells (format=csv) or NetCDF-CF " +
        "(format=netcdf)",
      description: "For runs of the map analyses (solar-signal maps, field composites). NetCDF: " +
        "one variable per map quantity on (lat, lon) with units and long names, the " +
        "significance mask as a CF flag variable, per-lag r and p when kept, and the run's id, " +
        "result digest, history, warnings and cautions in the global attributes.",
      request: {
        params: z.object({
          id: z.string().regex(/^[0-9a-f-]{36}$/, "must be a run id (UUIDv7)").openapi({
            param: { name: "id", in: "path" },
          }),
        }),
        query: z.object({ format: z.enum(["json", "csv", "netcdf"]).default("json") }),
      },
      responses: {
        200: {
          description: "The map",
          content: {
            "application/json": { schema: MapPartSchema },
            "text/csv": { schema: z.string() },
            ...NETCDF_CONTENT,
          },
        },
        304: { description: "Not modified" },
        ...problems(404, 409, 422),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id: string = c.req.valid("param").id;
      const format: "json" | "csv" | "netcdf" = c.req.valid("query").format;
      queries.remember(c.req.url, { format });
      const principal = principalOf(c);
      const hit = downloads.get(key(id, format));
      if (hit) {
        // a succeeded run's map never changes: served as made, once the caller may see it
        const holding = await mustSeeRun(store, principal, id);
        return serveStored(c, hit, sharedCacheable(principal, holding));
      }
      const { run, g, shared } = await mapOf(c, store, id);
      const etag = `"map-${run.id}-${run.result_digest}-${format}-${SERVICE_VERSION}"`;
      const nm = notModified(c, etag, shared);
      if (nm) return nm;
      const rep = mapRepresentation(run, g, format, etag, downloads);
      if (!rep) {
        return netcdfStreamResponse(
          c,
          mapDataset(run, g),
          `${run.id}_map.nc`,
          immutableHeaders(etag, shared),
        );
      }
      downloads.set(key(id, format), rep);
      return serveRepresentation(c, rep, shared);
    }) as never,
  );
}
