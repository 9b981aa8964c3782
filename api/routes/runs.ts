/**
 * Run routes: list, fetch, replay, cancel, progress events (SSE), outputs as JSON or CSV, and
 * saving an output as a stored series with lineage.
 *
 * @module
 */
import { ensembleSourceOf } from "../analyses/common/ensemble_members.ts";
import { bandAttributes } from "../analyses/common/uncertainty_band.ts";
import { runLabel } from "../runs/label.ts";
import { resultBytesOf } from "../store/result_text.ts";
import { createRoute, z } from "@hono/zod-openapi";
import { streamSSE } from "hono/streaming";
import type { App } from "../app_env.ts";
import type { RunRecord, Store } from "../store/types.ts";
import type { RunService } from "../runs/service.ts";
import type { OutputSeries } from "../runs/kind.ts";
import { ProblemError } from "../problems.ts";
import { RunIdParam } from "../schemas/ids.ts";
import type { Config } from "../config.ts";
import { principalOf } from "../auth/authenticate.ts";
import { holderOf, isLimited, viewerOf } from "../auth/principal.ts";
import { mustHoldRun, mustSeeRun, sharedCacheable } from "../auth/access.ts";
import { checkStorage } from "../limits/quotas.ts";
import {
  PageQuery,
  pageSchema,
  problems,
  RunSchema,
  RunStatusSchema,
  RunSummarySchema,
} from "../schemas/common.ts";
import { outputToCsv } from "../export/csv.ts";
import { wantsCsv } from "./format.ts";
import { notModified, type RequestView, setImmutableHeaders, withQuery } from "./cache.ts";
import { joinBytes } from "../bytes.ts";
import {
  identityRepresentation,
  ImmutableCache,
  serveCachedIfSeen,
  serveRepresentation,
  serveStored,
} from "./immutable_cache.ts";
import { type HotGets, QueryMemo } from "../hot_gets.ts";
import {
  calendarOf,
  CalendarQuery,
  NETCDF_CONTENT,
  runOutputNetcdfResponse,
  wantsNetcdf,
} from "../netcdf/http.ts";

const FINAL = new Set(["succeeded", "failed", "cancelled"]);

/** The public view of a run record. */
export function runView(r: RunRecord) {
  return { ...r, label: runLabel(r.id) };
}

/** Stands in for the result while the rest of a run is serialised (unguessable per process). */
const RESULT_SLOT = `result-slot-${crypto.randomUUID()}`;

/**
 * The JSON of a run's public view (plus `extra` members) as UTF-8 bytes: the result's bytes
 * are the ones made when it was computed or read from the store (api/store/result_text.ts),
 * spliced in where the result goes rather than serialised again (one copy of them, no string).
 */
export function runViewBytes(
  r: RunRecord,
  extra: Record<string, unknown> = {},
): Uint8Array<ArrayBuffer> {
  const parts = runViewParts(r, extra);
  // one piece: the view encoded here (an ArrayBuffer of its own)
  if (parts.length === 1) return parts[0] as Uint8Array<ArrayBuffer>;
  return joinBytes(parts);
}

/**
 * {@link runViewBytes} in pieces, without joining them: the text before the result, the
 * result's own bytes (not copied) and the text after it; or one piece for a run without result
 * bytes. Joined, they are the bytes of {@link runViewBytes}.
 */
export function runViewParts(
  r: RunRecord,
  extra: Record<string, unknown> = {},
): Uint8Array[] {
  const bytes = resultBytesOf(r.result);
  if (bytes === undefined) return [encoder.encode(JSON.stringify({ ...runView(r), ...extra }))];
  const shell = JSON.stringify({ ...runView(r), result: RESULT_SLOT, ...extra });
  const slot = `"result":"${RESULT_SLOT}"`;
  const at = shell.indexOf(slot);
  const head = encoder.encode(shell.slice(0, at) + `"result":`);
  const tail = encoder.encode(shell.slice(at + slot.length));
  return [head, bytes, tail];
}

const encoder = new TextEncoder();

const RunId = RunIdParam;

/** The cache key of an output download, and whether it is NetCDF (`wantsNetcdf`). */
function outputKey(c: RequestView, id: string, name: string) {
  if (wantsNetcdf(c)) {
    return { key: `output/${id}/${name}/netcdf/${calendarOf(c)}`, netcdf: true, format: "netcdf" };
  }
  const format = wantsCsv(c) ? "csv" : "json";
  return { key: `output/${id}/${name}/${format}`, netcdf: false, format };
}

/** `outputKey`, or null where it refuses the query (answered in the route's order). */
function tryOutputKey(c: RequestView, id: string, name: string) {
  try {
    return outputKey(c, id, name);
  } catch {
    return null;
  }
}

async function mustGetRun(store: Store, id: string): Promise<RunRecord> {
  const r = await store.getRun(id);
  if (!r) throw new ProblemError("not-found", `No run has id ${id}`);
  return r;
}

export function registerRunRoutes(
  app: App,
  deps: {
    store: Store;
    runs: RunService;
    config?: Config;
    hot?: HotGets;
    /** Where downloads of succeeded runs are kept once made (api/routes/immutable_cache.ts). */
    downloads?: ImmutableCache;
  },
): void {
  const { store, runs } = deps;
  const runCache = new ImmutableCache();
  const downloads = deps.downloads ?? new ImmutableCache();
  // A succeeded run's outputs as JSON, CSV or NetCDF (and their 304s) from the cache, ahead
  // of the middleware, for query strings the route validated.
  const outputQueries = new QueryMemo<{ format?: string; calendar?: string }>();
  deps.hot?.add(
    "/v1/runs/:id/outputs/:name",
    ({ view, principal, params: [id, name], search }) => {
      const q = outputQueries.get(search);
      if (!q) return null;
      const c = withQuery(view, q);
      const hit = downloads.get(outputKey(c, id, name).key);
      if (!hit) return null;
      return serveCachedIfSeen(store, [{ kind: "run", id }], principal, c, hit, serveStored);
    },
  );
  // A succeeded run's JSON from the cache, ahead of the middleware (api/hot_gets.ts); the
  // route takes no query, so any query string is served as it is here.
  deps.hot?.add("/v1/runs/:id", ({ view, principal, params: [id] }) => {
    const hit = runCache.get(id);
    if (!hit) return null;
    return serveCachedIfSeen(store, [{ kind: "run", id }], principal, view, hit);
  });
  // The kinds this service offers (the registry, or the kinds injected into the app).
  const kindNames = runs.kinds.map((k) => k.kind).sort() as [string, ...string[]];
  const KindFilter = z.enum(kindNames, {
    error: (iss) =>
      `unknown run kind ${JSON.stringify(iss.input)}; valid kinds: ${kindNames.join(", ")}`,
  }).openapi({ description: "Only runs of this kind" });

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/runs",
      tags: ["Runs"],
      summary: "List runs, newest first",
      request: {
        query: PageQuery.extend({
          kind: KindFilter.optional(),
          status: RunStatusSchema.optional(),
        }),
      },
      responses: {
        200: {
          description: "A page of runs",
          content: {
            "application/json": {
              schema: pageSchema(RunSummarySchema),
            },
          },
        },
        ...problems(422),
      },
    }),
    async (c) => {
      const q = c.req.valid("query");
      const page = await store.listRuns({ ...q, viewer: viewerOf(principalOf(c)) });
      const items = page.items.map((r) => ({ ...r, label: runLabel(r.id) }));
      return c.json({ ...page, items, limit: q.limit, offset: q.offset }, 200);
    },
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/runs/{id}",
      tags: ["Runs"],
      summary: "One run: parameters, inputs, versions, seed, status, result and its digest",
      request: { params: RunId },
      responses: {
        200: { description: "The run", content: { "application/json": { schema: RunSchema } } },
        304: { description: "Not modified (finished runs are immutable)" },
        ...problems(404, 422),
      },
    }),
    async (c) => {
      // A succeeded run never changes: answer repeated GETs (and 304s) from memory, once the
      // caller is known to see it.
      const holding = await mustSeeRun(store, principalOf(c), c.req.valid("param").id);
      const shared = sharedCacheable(principalOf(c), holding);
      const hit = runCache.get(c.req.valid("param").id);
      if (hit) return serveRepresentation(c, hit, shared) as never;
      const run = await mustGetRun(store, c.req.valid("param").id);
      if (FINAL.has(run.status)) {
        const etag = `"run-${run.id}-${run.status}-${run.result_digest ?? "none"}"`;
        if (run.status === "succeeded") {
          const rep = {
            etag,
            body: runViewBytes(run),
            headers: { "Content-Type": "application/json" },
          };
          runCache.set(run.id, rep);
          return serveRepresentation(c, rep, shared) as never;
        }
        const nm = notModified(c, etag, shared);
        if (nm) return nm;
        setImmutableHeaders(c, etag, shared);
      } else {
        c.header("Cache-Control", "no-store");
      }
      return c.json(runView(run), 200);
    },
  );

  app.openapi(
    createRoute({
      method: "post",
      path: "/v1/runs/{id}/replay",
      tags: ["Runs"],
      summary: "Recompute a run from its stored inputs and compare result digests",
      request: { params: RunId },
      responses: {
        200: {
          description: "Comparison of the stored and recomputed digests",
          content: {
            "application/json": {
              schema: z.object({
                run_id: z.string(),
                kind: z.string(),
                identical: z.boolean(),
                stored_digest: z.string(),
                replay_digest: z.string().nullable(),
                algorithm_version: z.object({ recorded: z.string(), current: z.string() }),
                algorithm_version_changed: z.boolean(),
                service_version: z.object({ recorded: z.string(), current: z.string() }),
                note: z.string(),
              }).openapi("Replay"),
            },
          },
        },
        ...problems(401, 404, 409, 422, 429),
      },
    }),
    async (c) => {
      await mustSeeRun(store, principalOf(c), c.req.valid("param").id);
      const run = await mustGetRun(store, c.req.valid("param").id);
      const { result: _r, ...rep } = await runs.replay(run);
      return c.json(rep as never, 200);
    },
  );

  app.openapi(
    createRoute({
      method: "post",
      path: "/v1/runs/{id}/cancel",
      tags: ["Runs"],
      summary: "Stop a queued or running run (its owner or an admin)",
      request: { params: RunId },
      responses: {
        200: {
          description: "The cancelled run",
          content: { "application/json": { schema: RunSchema } },
        },
        ...problems(401, 403, 404, 409),
      },
    }),
    async (c) => {
      await mustHoldRun(store, principalOf(c), c.req.valid("param").id, "cancel");
      const r = await runs.cancel(c.req.valid("param").id);
      if (!r) throw new ProblemError("not-found", `No run has id ${c.req.valid("param").id}`);
      return c.json(runView(r), 200);
    },
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/runs/{id}/events",
      tags: ["Runs"],
      summary: "Server-Sent Events: progress (0–1, estimated seconds left) and the final status",
      request: { params: RunId },
      responses: {
        200: {
          description: "text/event-stream of `progress` and `status` events",
          content: { "text/event-stream": { schema: z.string() } },
        },
        ...problems(404),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id = c.req.valid("param").id;
      await mustSeeRun(store, principalOf(c), id);
      const first = await mustGetRun(store, id);
      return streamSSE(c, async (stream) => {
        const send = (event: string, data: unknown) =>
          stream.writeSSE({ event, data: JSON.stringify(data) });
        await send("status", { id, status: first.status, progress: first.progress });
        if (FINAL.has(first.status)) return;
        await new Promise<void>((resolve) => {
          let closed = false;
          const finish = () => {
            if (closed) return;
            closed = true;
            unsubscribe?.();
            clearInterval(timer);
            resolve();
          };
          const unsubscribe = runs.subscribe(id, (e) => {
            send(e.type, e).then(() => {
              if (e.type === "status" && FINAL.has(e.status)) finish();
            }, finish);
          });
          // Poll as a fallback (e.g. the run finished between the read and the subscription).
          const timer = setInterval(async () => {
            const r = await store.getRun(id);
            if (!r || FINAL.has(r.status)) {
              if (r) await send("status", { id, status: r.status, progress: r.progress });
              finish();
            }
          }, 500);
          stream.onAbort(finish);
          if (!unsubscribe) {
            store.getRun(id).then(async (r) => {
              if (r && FINAL.has(r.status)) {
                await send("status", { id, status: r.status, progress: r.progress });
                finish();
              }
            });
          }
        });
      });
    }) as never,
  );

  const OutputParams = RunId.extend({
    name: z.string().openapi({ param: { name: "name", in: "path" } }),
  });

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/runs/{id}/outputs/{name}",
      tags: ["Runs"],
      summary: "One series-like output of a run, as JSON, CSV (`Accept: text/csv` or " +
        "`?format=csv`) or NetCDF-CF (`Accept: application/x-netcdf` or `?format=netcdf`)",
      request: {
        params: OutputParams,
        query: z.object({
          format: z.enum(["json", "csv", "netcdf"]).optional(),
          calendar: CalendarQuery,
        }),
      },
      responses: {
        200: {
          description: "The output series",
          content: {
            "application/json": { schema: z.record(z.string(), z.unknown()) },
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
      const { id, name } = c.req.valid("param");
      outputQueries.remember(c.req.url, c.req.valid("query"));
      const holding = await mustSeeRun(store, principalOf(c), id);
      const shared = sharedCacheable(principalOf(c), holding);
      const cached = tryOutputKey(c, id, name);
      const hit = cached && downloads.get(cached.key);
      if (hit) return serveStored(c, hit, shared);
      const run = await mustGetRun(store, id);
      const o = (run.result?.outputs as Record<string, OutputSeries> | undefined)?.[name];
      if (!o) {
        const names = Object.keys((run.result?.outputs ?? {}) as object);
        throw new ProblemError(
          "not-found",
          `Run ${id} has no output named "${name}"` +
            (names.length ? `; outputs: ${names.join(", ")}` : "; it has no series outputs"),
        );
      }
      // a succeeded run never changes: its outputs are written once and kept (bounded)
      const keep = run.status === "succeeded";
      const key = outputKey(c, id, name);
      if (key.netcdf) {
        // an output with ensemble members carries them on a realization dimension, and the
        // band's statement of what it contains as global attributes
        return runOutputNetcdfResponse(
          c,
          run,
          name,
          o,
          shared,
          ensembleSourceOf(run.result, name),
          bandAttributes(run.result),
          keep ? { cache: downloads, key: key.key } : undefined,
        );
      }
      const csv = key.format === "csv";
      const etag = `"run-${run.id}-${run.result_digest}-${name}-${csv ? "csv" : "json"}"`;
      const nm = notModified(c, etag, shared);
      if (nm) return nm;
      const rep = identityRepresentation(
        etag,
        csv ? outputToCsv(run, name, o) : JSON.stringify({
          run_id: run.id,
          result_digest: run.result_digest,
          warnings: run.result?.warnings ?? [],
          cautions: run.result?.cautions ?? [],
          ...(run.result?.inherited ? { inherited: run.result.inherited } : {}),
          ...o,
        }),
        { "Content-Type": csv ? "text/csv; charset=utf-8" : "application/json", Vary: "Accept" },
      );
      if (keep) downloads.set(key.key, rep);
      return serveRepresentation(c, rep, shared);
    }) as never,
  );

  app.openapi(
    createRoute({
      method: "post",
      path: "/v1/runs/{id}/outputs/{name}/series",
      tags: ["Runs"],
      summary: "Save an output of a run as a stored series with lineage (`derived_from`)",
      request: { params: OutputParams },
      responses: {
        201: {
          description: "Stored",
          content: {
            "application/json": { schema: z.object({ id: z.string(), derived_from: z.string() }) },
          },
        },
        ...problems(404, 409),
      },
    }),
    async (c) => {
      const { id, name } = c.req.valid("param");
      const principal = principalOf(c);
      await mustSeeRun(store, principal, id);
      const run = await mustGetRun(store, id);
      if (run.status !== "succeeded") {
        throw new ProblemError(
          "conflict",
          `Run ${id} has status ${run.status}; it has no outputs yet`,
        );
      }
      if (isLimited(principal) && deps.config) {
        const o = (run.result?.outputs as Record<string, OutputSeries> | undefined)?.[name];
        await checkStorage(store, principal.owner!, (o?.time.length ?? 0) * 24, deps.config.quotas);
      }
      const sid = await runs.saveOutput(run, name, holderOf(principal));
      c.header("Location", `/v1/series/${sid}`);
      return c.json({ id: sid, derived_from: run.id }, 201);
    },
  );
}
