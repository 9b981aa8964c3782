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
    // Series, then fields, then runs (whose own inputs are followed in turn).
    const inputs = [
      { ids: run.input_series, noun: "series", plan: plan.series, holding: store.seriesHolding },
      {
        ids: run.input_fields ?? [],
        noun: "field",
        plan: plan.fields,
        holding: store.fieldHolding,
      },
      { ids: run.input_runs, noun: "run", plan: plan.runs, holding: store.runHolding },
    ];
    for (const { ids, noun, plan: raise, holding } of inputs) {
      for (const input of ids) {
        if (seen.has(input)) continue;
        seen.add(input);
        const h = await holding.call(store, input, ownView);
        if (h?.owner === owner) {
          if (visibilityRank(h.visibility) < visibilityRank(visibility)) raise.push(input);
          if (noun === "run") queue.push(input);
        } else if (!(await holding.call(store, input, reach))) {
          throw new ProblemError(
            "conflict",
            `Run ${id} uses ${noun} ${input}, which its owner shares less widely than ` +
              `${visibility}; ask them to share it first`,
            { input },
          );
        }
      }
    }
  }
  return plan;
}

/** One kind of shared item: where its sharing lives, who may see and change it, and how. */
interface SharedKind {
  /** The item's path, e.g. "/v1/series/{id}". */
  path: string;
  /** Its id in the path. */
  id: z.ZodType<string>;
  /** Summaries and description of GET and PUT `{path}/sharing`. */
  getSummary: string;
  putSummary: string;
  putDescription: string;
  /** The holding through which the caller sees the item (404 if none). */
  see: (store: Store, p: Principal, id: string) => Promise<Holding>;
  /** The caller's own holding of the item (403/404 otherwise). */
  hold: (store: Store, p: Principal, id: string, action: string) => Promise<Holding>;
  /** Check that the change is allowed (409 otherwise), then store it. */
  share: (store: Store, id: string, h: Holding, visibility: Visibility) => Promise<void>;
}

/** A series made less visible must stay visible to every run that uses it. */
async function shareSeries(store: Store, id: string, h: Holding, visibility: Visibility) {
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
}

/** A field made less visible must not be an input of any run. */
async function shareField(store: Store, id: string, h: Holding, visibility: Visibility) {
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
}

/**
 * A public run stays public and must have succeeded; a run shared more widely raises its
 * owner's inputs with it.
 */
async function shareRun(store: Store, id: string, h: Holding, visibility: Visibility) {
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
}

/** Series, gridded fields and runs, in the order their routes are published. */
const SHARED_KINDS: readonly SharedKind[] = [
  {
    path: "/v1/series/{id}",
    id: SeriesId,
    getSummary: "Who holds this series and who may see it (the copy you see)",
    putSummary: "Share your series with your group or everyone, or make it private again",
    putDescription: "Refused (409) when it would hide the series from runs that use it: " +
      "another owner's runs, or your own runs shared more widely.",
    see: mustSeeSeries,
    hold: mustHoldSeries,
    share: shareSeries,
  },
  {
    path: "/v1/fields/{id}",
    id: FieldId,
    getSummary: "Who holds this gridded field and who may see it (the copy you see)",
    putSummary: "Share your gridded field with your group or everyone, or make it private again",
    putDescription: "Refused (409) when it would hide the field from a run that uses it.",
    see: mustSeeField,
    hold: mustHoldField,
    share: shareField,
  },
  {
    path: "/v1/runs/{id}",
    id: RunIdString,
    getSummary: "Who holds this run and who may see it (the copy you see)",
    putSummary: "Share your run (and what it needs) with your group or everyone",
    putDescription: "Your own inputs of the run (series and runs, all the way down) are shared " +
      "at least as widely, so whoever sees the run can fetch, chart, replay and bundle it. " +
      "A public run must have succeeded and stays public: it may be cited.",
    see: mustSeeRun,
    hold: mustHoldRun,
    share: shareRun,
  },
];

const answer = { content: { "application/json": { schema: Sharing } } };

/** GET and PUT `{path}/sharing` for one kind of shared item. */
function registerSharing(app: App, store: Store, kind: SharedKind): void {
  const params = z.object({ id: kind.id.openapi({ param: { name: "id", in: "path" } }) });
  const path = `${kind.path}/sharing`;
  app.openapi(
    createRoute({
      method: "get",
      path,
      tags: ["Sharing"],
      summary: kind.getSummary,
      request: { params },
      responses: { 200: { description: "The holding", ...answer }, ...problems(404, 422) },
    }),
    async (c) => {
      const id = c.req.valid("param").id;
      const p = principalOf(c);
      c.header("Cache-Control", "no-store");
      return c.json(view(id, await kind.see(store, p, id), p), 200);
    },
  );
  app.openapi(
    createRoute({
      method: "put",
      path,
      tags: ["Sharing"],
      summary: kind.putSummary,
      description: kind.putDescription,
      middleware: [requireJson()] as const,
      request: {
        params,
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
      const h = await kind.hold(store, p, id, "share");
      await kind.share(store, id, h, visibility);
      return c.json(view(id, { ...h, visibility }, p), 200);
    },
  );
}

/** GET and PUT `/sharing` of series, gridded fields and runs. */
export function registerSharingRoutes(app: App, deps: { store: Store }): void {
  for (const kind of SHARED_KINDS) registerSharing(app, deps.store, kind);
}
