/**
 * Chart routes: server-rendered SVG of a stored series and of a finished run, with width,
 * height, theme and time range in the query. Both are immutable (content-addressed series,
 * finished runs), so they carry a strong ETag that includes the query, a one-year immutable
 * Cache-Control and answer 304 on If-None-Match.
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import type { App } from "../app_env.ts";
import type { Store, StoredSeries } from "../store/types.ts";
import { ProblemError } from "../problems.ts";
import { principalOf } from "../auth/authenticate.ts";
import { viewerOf } from "../auth/principal.ts";
import { holdingsOf, mustSeeSeries, sharedCacheable } from "../auth/access.ts";
import { RunIdString } from "../schemas/ids.ts";
import { problems } from "../schemas/common.ts";
import {
  type CachedRepresentation,
  ImmutableCache,
  serveCachedIfSeen,
  serveRepresentation,
} from "./immutable_cache.ts";
import { parseIsoTime } from "../../core/time/mod.ts";
import { renderChart, type RenderOptions } from "../charts/chart.ts";
import { shortHash } from "../charts/svg.ts";
import { renderAnyChart } from "../charts/map_chart.ts";
import { seriesChartSpec } from "../charts/series_chart.ts";
import { chartNeedsInputs, chartViews, runChartSpec } from "../charts/run_charts.ts";
import { SERVICE_VERSION } from "../version.ts";
import type { RunKind } from "../runs/kind.ts";
import { kindByName } from "../analyses/derive.ts";
import { type HotGets, QueryMemo } from "../hot_gets.ts";

/** Bump when the drawing of a chart changes for the same data and query. */
export const CHART_VERSION = "1";

const DECIMAL_YEAR = /^[+-]?\d+(\.\d+)?$/;

/** A decimal year ("1996.5") or an ISO 8601 date ("1996", "1996-08", "1996-08-15", date-time). */
function readTime(text: string, edge: "start" | "end"): number | null {
  const s = text.trim();
  if (DECIMAL_YEAR.test(s) && !/^\d{4}$/.test(s)) {
    const v = Number(s);
    return Number.isFinite(v) && Math.abs(v) <= 1e6 ? v : null;
  }
  try {
    const p = parseIsoTime(s);
    return edge === "start" ? p.start : p.end;
  } catch {
    return null;
  }
}

const TIME_MESSAGE =
  "must be a decimal year with a fraction (e.g. 1996.5) or an ISO 8601 date (1996, 1996-08, 1996-08-15)";

const timeParam = (edge: "start" | "end", what: string) =>
  z.string().refine((s) => readTime(s, edge) !== null, TIME_MESSAGE).optional().openapi({
    description: `${what} of the time range: a decimal year or an ISO 8601 date (a whole year or ` +
      `month counts from its ${edge === "start" ? "start" : "end"})`,
    example: edge === "start" ? "1996" : "2008-12",
  });

export const ChartQuery = z.object({
  width: z.coerce.number().int().min(240).max(4000).default(800).openapi({
    description: "Width in px (240–4000)",
  }),
  height: z.coerce.number().int().min(160).max(3000).default(400).openapi({
    description: "Height in px (160–3000)",
  }),
  theme: z.enum(["light", "dark"]).default("light"),
  from: timeParam("start", "Start"),
  to: timeParam("end", "End"),
});

/** The run chart's query: the common one plus the analysis' chart view. */
export const RunChartQuery = ChartQuery.extend({
  view: z.string().regex(/^[a-z][a-z0-9_]{0,39}$/, "a view name in snake_case").optional()
    .openapi({
      description: "Another chart of the run, where its analysis offers one (e.g. " +
        "`variability` for spectral reconstructions); default: the analysis' main chart",
    }),
});

type ChartQueryOut = z.output<typeof ChartQuery>;

/** Parsed render options; 422 naming `to` when the range is empty. */
function renderOptions(q: ChartQueryOut): RenderOptions {
  const from = q.from !== undefined ? readTime(q.from, "start") ?? undefined : undefined;
  const to = q.to !== undefined ? readTime(q.to, "end") ?? undefined : undefined;
  if (from !== undefined && to !== undefined && !(to > from)) {
    throw new ProblemError(
      "validation",
      `The time range is empty: to (${q.to}) must be after from (${q.from})`,
      {
        errors: [{ pointer: "/to", in: "query", message: `must be after from (${q.from})` }],
      },
    );
  }
  return { width: q.width, height: q.height, theme: q.theme, from, to };
}

function optionsKey(o: RenderOptions): string {
  return `${o.width}x${o.height}-${o.theme}-${o.from ?? ""}-${o.to ?? ""}`;
}

function etagFor(resource: string, o: RenderOptions): string {
  return `"chart-${resource}-${optionsKey(o)}-s${SERVICE_VERSION}-c${CHART_VERSION}"`;
}

/** The tag, and cache key, of a series chart. */
function seriesChartTag(id: string, o: RenderOptions): string {
  return etagFor(`series-${id.replace(/^sha256:/, "")}`, o);
}

/** The cache key of a run chart (found by run id, query and view alone). */
function runChartKey(id: string, o: RenderOptions, view: string | undefined): string {
  return `run-${id}-${optionsKey(o)}-${view ?? ""}`;
}

const SVG_HEADERS = {
  "Content-Type": "image/svg+xml; charset=utf-8",
  "X-Content-Type-Options": "nosniff",
  // The SVG runs no script and loads nothing; say so to browsers that open it directly.
  "Content-Security-Policy": "default-src 'none'; style-src 'unsafe-inline'; sandbox",
};

const encoder = new TextEncoder();

function svgRepresentation(svg: string, etag: string): CachedRepresentation {
  return { etag, body: encoder.encode(svg), headers: SVG_HEADERS };
}

const svgContent = { "image/svg+xml": { schema: z.string().openapi({ format: "binary" }) } };

/**
 * Register the chart routes. Rendered charts of succeeded runs and of stored series are kept
 * in `cache` (they never change); a stored series is still looked up on every request, so a
 * deleted one answers 404.
 */
export function registerChartRoutes(
  app: App,
  deps: { store: Store; kinds: readonly RunKind[]; cache?: ImmutableCache; hot?: HotGets },
): void {
  const { store } = deps;
  const cache = deps.cache ?? new ImmutableCache();
  // Query strings the routes validated, and the charts they cached: served ahead of the
  // middleware (api/hot_gets.ts) after the same access checks.
  const seriesQueries = new QueryMemo<RenderOptions>();
  const runQueries = new QueryMemo<{ opts: RenderOptions; view: string | undefined }>();
  deps.hot?.add("/v1/series/:id/chart.svg", ({ view, principal, params: [id], search }) => {
    const opts = seriesQueries.get(search);
    const rep = opts && cache.get(seriesChartTag(id, opts));
    if (!rep) return null;
    return serveCachedIfSeen(store, [{ kind: "series", id }], principal, view, rep);
  });
  deps.hot?.add("/v1/runs/:id/chart.svg", ({ view, principal, params: [id], search }) => {
    const q = runQueries.get(search);
    const rep = q && cache.get(runChartKey(id, q.opts, q.view));
    if (!rep) return null;
    const items = [{ kind: "run" as const, id }, ...(rep.requires ?? [])];
    return serveCachedIfSeen(store, items, principal, view, rep);
  });

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/series/{id}/chart.svg",
      tags: ["Charts"],
      summary: "A stored series as a standalone SVG chart (immutable, cacheable)",
      description:
        "Server-rendered SVG (no script, no external font): the series over decimal years with its " +
        "±1σ band when it has uncertainties, axes labelled with quantity and units, light or dark theme. " +
        "Long series are drawn with the minimum and maximum per pixel column, so no spike is lost.",
      request: {
        params: z.object({
          id: z.string().openapi({ param: { name: "id", in: "path" }, example: "sha256:..." }),
        }),
        query: ChartQuery,
      },
      responses: {
        200: { description: "The chart", content: svgContent },
        304: { description: "Not modified" },
        ...problems(404, 422),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id: string = c.req.valid("param").id;
      const opts = renderOptions(c.req.valid("query"));
      seriesQueries.remember(c.req.url, opts);
      const etag = seriesChartTag(id, opts);
      const holding = await mustSeeSeries(store, principalOf(c), id);
      let rep = cache.get(etag);
      if (!rep) {
        const s = await store.getSeries(id);
        if (!s) throw new ProblemError("not-found", `No series has id ${id}`);
        const svg = renderChart(seriesChartSpec(s), { ...opts, idPrefix: "s" + shortHash(etag) });
        rep = svgRepresentation(svg, etag);
        cache.set(etag, rep);
      }
      return serveRepresentation(c, rep, sharedCacheable(principalOf(c), holding));
    }) as never,
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/runs/{id}/chart.svg",
      tags: ["Charts"],
      summary: "A finished run as a standalone SVG chart fit for its kind (immutable, cacheable)",
      description:
        "Reconstructions with their uncertainty band, lag correlations with the significance envelope, " +
        "cycle tables over the smoothed series, periodograms with false-alarm levels, attributions " +
        "with their contributions; other kinds draw their series-like outputs as lines with bands. " +
        "The run's cautions are printed under the plot. Only succeeded runs have charts (409 otherwise).",
      request: {
        params: z.object({
          id: RunIdString.openapi({ param: { name: "id", in: "path" } }),
        }),
        query: RunChartQuery,
      },
      responses: {
        200: { description: "The chart", content: svgContent },
        304: { description: "Not modified" },
        ...problems(404, 409, 422),
      },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id: string = c.req.valid("param").id;
      const query = c.req.valid("query");
      const opts = renderOptions(query);
      const view: string | undefined = query.view;
      runQueries.remember(c.req.url, { opts, view });
      // A succeeded run never changes: its chart is found by run id, query and view alone, once
      // the caller is known to see the run. The inputs it draws are those the caller may see.
      // One access check asks for the run and for the inputs drawn into its cached chart.
      const principal = principalOf(c);
      const key = runChartKey(id, opts, view);
      const viewer = viewerOf(principal);
      let rep = cache.get(key);
      const held = await holdingsOf(store, [{ kind: "run", id }, ...(rep?.requires ?? [])], viewer);
      const holding = held[0];
      if (!holding) throw new ProblemError("not-found", `No run has id ${id}`);
      for (let i = 1; i < held.length; i++) if (!held[i]) rep = undefined;
      let cacheable = true;
      if (!rep) {
        const run = await store.getRun(id);
        if (!run) throw new ProblemError("not-found", `No run has id ${id}`);
        if (run.status !== "succeeded" || !run.result) {
          throw new ProblemError(
            "conflict",
            `Run ${id} has status ${run.status}; a chart exists once it has succeeded`,
            {},
            { "Cache-Control": "no-store" },
          );
        }
        const etag = etagFor(`run-${run.id}-${run.result_digest}${view ? `-${view}` : ""}`, opts);
        const inputs: StoredSeries[] = [];
        const kind = kindByName(deps.kinds, run.kind);
        if (view !== undefined && !chartViews(kind).includes(view)) {
          const views = chartViews(kind);
          throw new ProblemError(
            "validation",
            `Runs of kind ${run.kind} have no chart view "${view}"` +
              (views.length
                ? `; views: ${views.join(", ")}`
                : "; they have only the default chart"),
            { errors: [{ pointer: "/view", in: "query", message: "unknown chart view" }] },
          );
        }
        if (chartNeedsInputs(kind)) {
          for (const sid of run.input_series.slice(0, 4)) {
            if (!(await store.seriesHolding(sid, viewer))) {
              cacheable = false; // drawn without an input this caller may not see
              continue;
            }
            const s = await store.getSeries(sid);
            if (s && s.n <= 500_000) inputs.push(s);
          }
        }
        const svg = renderAnyChart(runChartSpec(run, kind, inputs, view), {
          ...opts,
          idPrefix: "r" + shortHash(etag),
        });
        rep = {
          ...svgRepresentation(svg, etag),
          requires: inputs.map((s) => ({ kind: "series", id: s.id })),
        };
        if (cacheable) cache.set(key, rep);
      }
      return serveRepresentation(c, rep, sharedCacheable(principalOf(c), holding));
    }) as never,
  );
}
