/**
 * Sharing: who holds a series or run and who may see it (`private`: its owner and admins;
 * `group`: every owner of the owner's group; `public`: everyone, without a key).
 *
 * Sharing a run shares what it needs: the owner's own inputs (series and input runs, all the
 * way down) are raised to at least the run's visibility, so anyone who may see a run may also
 * fetch, chart, replay and bundle it; an input the owner does not hold must already be shared
 * that widely by its own owner. A run made public must have succeeded and stays public (it may
 * be cited, and finished runs never change), and a series stays at least as visible as the runs
 * that use it.
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import type { App } from "../app.ts";
import type { Holding, Store, Viewer, Visibility } from "../store/types.ts";
import { VISIBILITIES } from "../store/types.ts";
import { visibilityRank } from "../store/common.ts";
import { ProblemError } from "../problems.ts";
import { problems } from "../schemas/common.ts";
import { SeriesId } from "../schemas/series_ref.ts";
import { RunIdString } from "../schemas/ids.ts";
import { principalOf } from "../auth/authenticate.ts";
import type { Principal } from "../auth/principal.ts";
import {
  mustHoldField,
  mustHoldRun,
  mustHoldSeries,
  mustSeeField,
  mustSeeRun,
  mustSeeSeries,
} from "../auth/access.ts";
import { FieldId } from "../analyses/common/field_ref.ts";
import { requireJson } from "./media.ts";

const VisibilitySchema = z.enum(VISIBILITIES as [Visibility, ...Visibility[]]).openapi({
  description: "`private` (owner and admins), `group` (the owner's group), `public` (everyone)",
});

const Sharing = z.object({
  id: z.string(),
  owner: z.string(),
  visibility: VisibilitySchema,
  created_at: z.string(),
  yours: z.boolean().openapi({ description: "True when the caller holds this copy" }),
}).openapi("Sharing");

const ShareRequest = z.object({ visibility: VisibilitySchema }).strict().openapi("ShareRequest");

function view(id: string, h: Holding, p: Principal) {
  return {
    id,
    owner: h.owner,
    visibility: h.visibility,
    created_at: h.created_at,
    yours: h.owner === p.owner,
  };
}

/** A viewer that sees what `visibility` shares with the audience of an owner in `group`. */
function audience(visibility: Visibility, group: string): Viewer {
  return visibility === "public"
    ? { owner: null, group: null, admin: false }
    : { owner: "\u0000audience", group, admin: false };
}

/** The owner's group (an admin acting on another owner's item uses that owner's). */
async function groupOf(store: Store, owner: string): Promise<string> {
  return (await store.getOwner(owner))?.group ?? "";
}

/**
 * Plan the holdings to raise so that `visibility` of run `id` (held by `owner`) shares its
 * whole input closure; throws a 409 naming an input that cannot be shared that widely.
 */
async function shareClosure(
  store: Store,
  owner: string,
  id: string,
  visibility: Visibility,
): Promise<{ series: string[]; runs: string[]; fields: string[] }> {
  const group = await groupOf(store, owner);
  const ownView: Viewer = { owner, group, admin: false };
  const reach = audience(visibility, group);
  const plan = { series: [] as string[], runs: [] as string[], fields: [] as string[] };
  const seen = new Set<string>([id]);
  const queue = [id];
  while (queue.length) {
    const run = await store.getRun(queue.shift()!);
    if (!run) continue;
    for (const sid of run.input_series) {
      if (seen.has(sid)) continue;
      seen.add(sid);
      const h = await store.seriesHolding(sid, ownView);
      if (h?.owner === owner) {
        if (visibilityRank(h.visibility) < visibilityRank(visibility)) plan.series.push(sid);
      } else if (!(await store.seriesHolding(sid, reach))) {
        throw new ProblemError(
          "conflict",
          `Run ${id} uses series ${sid}, which its owner shares less widely than ${visibility}; ` +
            "ask them to share it first",
          { input: sid },
        );
      }
    }
    for (const fid of run.input_fields ?? []) {
      if (seen.has(fid)) continue;
      seen.add(fid);
      const h = await store.fieldHolding(fid, ownView);
      if (h?.owner === owner) {
        if (visibilityRank(h.visibility) < visibilityRank(visibility)) plan.fields.push(fid);
      } else if (!(await store.fieldHolding(fid, reach))) {
        throw new ProblemError(
          "conflict",
          `Run ${id} uses field ${fid}, which its owner shares less widely than ${visibility}; ` +
            "ask them to share it first",
          { input: fid },
        );
      }
    }
    for (const rid of run.input_runs) {
      if (seen.has(rid)) continue;
      seen.add(rid);
      const h = await store.runHolding(rid, ownView);
      if (h?.owner === owner) {
        if (visibilityRank(h.visibility) < visibilityRank(visibility)) plan.runs.push(rid);
        queue.push(rid);
      } else if (!(await store.runHolding(rid, reach))) {
        throw new ProblemError(
          "conflict",
          `Run ${id} uses run ${rid}, which its owner shares less widely than ${visibility}; ` +
            "ask them to share it first",
          { input: rid },
        );
      }
    }
  }
  return plan;
}

export function registerSharingRoutes(app: App, deps: { store: Store }): void {
  const { store } = deps;
  const SeriesParam = z.object({ id: SeriesId.openapi({ param: { name: "id", in: "path" } }) });
  const RunParam = z.object({ id: RunIdString.openapi({ param: { name: "id", in: "path" } }) });
  const answer = { content: { "application/json": { schema: Sharing } } };

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/series/{id}/sharing",
      tags: ["Sharing"],
      summary: "Who holds this series and who may see it (the copy you see)",
      request: { params: SeriesParam },
      responses: { 200: { description: "The holding", ...answer }, ...problems(404, 422) },
    }),
    async (c) => {
      const id = c.req.valid("param").id;
      const p = principalOf(c);
      c.header("Cache-Control", "no-store");
      return c.json(view(id, await mustSeeSeries(store, p, id), p), 200);
    },
  );

  app.openapi(
    createRoute({
      method: "put",
      path: "/v1/series/{id}/sharing",
      tags: ["Sharing"],
      summary: "Share your series with your group or everyone, or make it private again",
      description: "Refused (409) when it would hide the series from runs that use it: " +
        "another owner's runs, or your own runs shared more widely.",
      middleware: [requireJson()] as const,
      request: {
        params: SeriesParam,
        body: { required: true, content: { "application/json": { schema: ShareRequest } } },
      },
      responses: {
        200: { description: "The holding after the change", ...answer },
        ...problems(401, 403, 404, 409, 415, 422),
      },
    }),
    async (c) => {
      const id = c.req.valid("param").id;
      const { visibility } = c.req.valid("json");
      const p = principalOf(c);
      const h = await mustHoldSeries(store, p, id, "share");
      if (visibilityRank(visibility) < visibilityRank(h.visibility)) {
        const usage = await store.seriesUsage(id, h.owner);
        if (usage.others > 0) {
          throw new ProblemError(
            "conflict",
            `Series ${id} is used by ${usage.others} run(s) of owners it was shared with; it ` +
              "stays shared so they can be replayed",
          );
        }
        const ownView: Viewer = { owner: h.owner, group: null, admin: false };
        for (const rid of usage.own.slice(0, 1000)) {
          const rh = await store.runHolding(rid, ownView);
          if (rh && visibilityRank(rh.visibility) > visibilityRank(visibility)) {
            throw new ProblemError(
              "conflict",
              `Series ${id} is an input of run ${rid}, which is ${rh.visibility}; the series ` +
                `stays at least ${rh.visibility}`,
              { runs: [rid] },
            );
          }
        }
      }
      await store.setSeriesVisibility(id, h.owner, visibility);
      return c.json(view(id, { ...h, visibility }, p), 200);
    },
  );

  const FieldParam = z.object({
    id: FieldId.openapi({ param: { name: "id", in: "path" } }),
  });

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/fields/{id}/sharing",
      tags: ["Sharing"],
      summary: "Who holds this gridded field and who may see it (the copy you see)",
      request: { params: FieldParam },
      responses: { 200: { description: "The holding", ...answer }, ...problems(404, 422) },
    }),
    async (c) => {
      const id = c.req.valid("param").id;
      const p = principalOf(c);
      c.header("Cache-Control", "no-store");
      return c.json(view(id, await mustSeeField(store, p, id), p), 200);
    },
  );

  app.openapi(
    createRoute({
      method: "put",
      path: "/v1/fields/{id}/sharing",
      tags: ["Sharing"],
      summary: "Share your gridded field with your group or everyone, or make it private again",
      description: "Refused (409) when it would hide the field from a run that uses it.",
      middleware: [requireJson()] as const,
      request: {
        params: FieldParam,
        body: { required: true, content: { "application/json": { schema: ShareRequest } } },
      },
      responses: {
        200: { description: "The holding after the change", ...answer },
        ...problems(401, 403, 404, 409, 415, 422),
      },
    }),
    async (c) => {
      const id = c.req.valid("param").id;
      const { visibility } = c.req.valid("json");
      const p = principalOf(c);
      const h = await mustHoldField(store, p, id, "share");
      if (visibilityRank(visibility) < visibilityRank(h.visibility)) {
        const users = await store.runsUsingField(id);
        if (users.length > 0) {
          throw new ProblemError(
            "conflict",
            `Field ${id} is an input of ${users.length} run(s); it stays ${h.visibility} so ` +
              "they can be replayed",
          );
        }
      }
      await store.setFieldVisibility(id, h.owner, visibility);
      return c.json(view(id, { ...h, visibility }, p), 200);
    },
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/runs/{id}/sharing",
      tags: ["Sharing"],
      summary: "Who holds this run and who may see it (the copy you see)",
      request: { params: RunParam },
      responses: { 200: { description: "The holding", ...answer }, ...problems(404, 422) },
    }),
    async (c) => {
      const id = c.req.valid("param").id;
      const p = principalOf(c);
      c.header("Cache-Control", "no-store");
      return c.json(view(id, await mustSeeRun(store, p, id), p), 200);
    },
  );

  app.openapi(
    createRoute({
      method: "put",
      path: "/v1/runs/{id}/sharing",
      tags: ["Sharing"],
      summary: "Share your run (and what it needs) with your group or everyone",
      description: "Your own inputs of the run (series and runs, all the way down) are shared " +
        "at least as widely, so whoever sees the run can fetch, chart, replay and bundle it. " +
        "A public run must have succeeded and stays public: it may be cited.",
      middleware: [requireJson()] as const,
      request: {
        params: RunParam,
        body: { required: true, content: { "application/json": { schema: ShareRequest } } },
      },
      responses: {
        200: { description: "The holding after the change", ...answer },
        ...problems(401, 403, 404, 409, 415, 422),
      },
    }),
    async (c) => {
      const id = c.req.valid("param").id;
      const { visibility } = c.req.valid("json");
      const p = principalOf(c);
      const h = await mustHoldRun(store, p, id, "share");
      if (h.visibility === "public" && visibility !== "public") {
        throw new ProblemError(
          "conflict",
          `Run ${id} is public and stays public: a public run may be cited`,
        );
      }
      if (visibility === "public") {
        const run = await store.getRun(id);
        if (run?.status !== "succeeded") {
          throw new ProblemError(
            "conflict",
            `Run ${id} has status ${run?.status}; only a succeeded run can be made public`,
          );
        }
      }
      if (visibilityRank(visibility) > visibilityRank(h.visibility)) {
        const plan = await shareClosure(store, h.owner, id, visibility);
        for (const sid of plan.series) await store.setSeriesVisibility(sid, h.owner, visibility);
        for (const rid of plan.runs) await store.setRunVisibility(rid, h.owner, visibility);
        for (const fid of plan.fields) await store.setFieldVisibility(fid, h.owner, visibility);
      }
      await store.setRunVisibility(id, h.owner, visibility);
      return c.json(view(id, { ...h, visibility }, p), 200);
    },
  );
}
