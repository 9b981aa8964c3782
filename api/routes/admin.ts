/**
 * Accounts: `GET /v1/me` (who the caller is and whether this instance requires keys), and the
 * admin routes under `/v1/admin/` (only for the admin role; see api/auth/authorise.ts): make
 * owners, make API keys for them (the key is in the answer once and never again; only its
 * hash is stored), list and revoke keys, and see an owner's usage against its quotas.
 *
 * @module
 */
import { createRoute, z } from "@hono/zod-openapi";
import type { App } from "../app.ts";
import type { Config } from "../config.ts";
import type { ApiKeyRecord, Role, Store } from "../store/types.ts";
import { DuplicateOwnerError } from "../store/errors.ts";
import { ProblemError } from "../problems.ts";
import { problems } from "../schemas/common.ts";
import { OWNER_ID_PATTERN } from "../schemas/ids.ts";
import { principalOf } from "../auth/authenticate.ts";
import { newApiKey } from "../auth/keys.ts";
import type { RunQuotas } from "../limits/quotas.ts";
import { requireJson } from "./media.ts";

const RoleSchema = z.enum(["reader", "writer", "admin"] as [Role, ...Role[]]).openapi({
  description: "reader: read what is shared with it; writer: also upload, run, share, delete " +
    "and cancel its own; admin: everything, including these routes",
});
const OwnerId = z.string().regex(
  OWNER_ID_PATTERN,
  "must be 1-63 of a-z, 0-9, _ and -, " +
    "starting with a letter or digit",
);

const Owner = z.object({
  id: OwnerId,
  name: z.string(),
  role: RoleSchema,
  group: z.string(),
  created_at: z.string(),
}).openapi("Owner");

const NewOwner = z.object({
  id: OwnerId,
  name: z.string().min(1).max(200),
  role: RoleSchema.default("writer"),
  group: z.string().min(1).max(100).regex(/^[\x20-\x7e]+$/, "printable ASCII").default("default")
    .openapi({ description: 'Owners of one group see each other\'s "group" items' }),
}).strict().openapi("NewOwner");

const KeyView = z.object({
  id: z.string(),
  owner: z.string(),
  label: z.string().nullable(),
  role: RoleSchema.nullable().openapi({ description: "Narrows the owner's role; null = its role" }),
  created_at: z.string(),
  expires_at: z.string().nullable(),
  revoked_at: z.string().nullable(),
}).openapi("ApiKey");

const NewKey = z.object({
  label: z.string().max(200).optional(),
  role: RoleSchema.optional().openapi({ description: "Narrow the owner's role for this key" }),
  expires_at: z.iso.datetime().optional().openapi({
    description: "ISO 8601 UTC time after which the key is refused",
  }),
}).strict().openapi("NewApiKey");

const CreatedKey = KeyView.extend({
  key: z.string().openapi({ description: "The key: shown in this answer only, store it now" }),
}).openapi("CreatedApiKey");

const Me = z.object({
  owner: z.string().nullable(),
  role: RoleSchema.nullable(),
  group: z.string().nullable(),
  authenticated_by: z.enum(["local", "admin-key", "api-key", "anonymous"]),
  keys_required: z.boolean(),
}).openapi("Me");

function keyView(k: ApiKeyRecord) {
  return {
    id: k.id,
    owner: k.owner,
    label: k.label,
    role: k.role,
    created_at: k.created_at,
    expires_at: k.expires_at,
    revoked_at: k.revoked_at,
  };
}

const json = <T extends z.ZodType>(schema: T) => ({
  content: { "application/json": { schema } },
});

export function registerAdminRoutes(
  app: App,
  deps: { store: Store; config: Config; quotas?: RunQuotas },
): void {
  const { store } = deps;

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/me",
      tags: ["Accounts"],
      summary: "Who you are to this instance, and whether it requires API keys",
      responses: { 200: { description: "The caller", ...json(Me) } },
    }),
    (c) => {
      const p = principalOf(c);
      c.header("Cache-Control", "no-store");
      return c.json({
        owner: p.owner,
        role: p.role,
        group: p.group,
        authenticated_by: p.via,
        keys_required: deps.config.adminKey !== null,
      }, 200);
    },
  );

  app.openapi(
    createRoute({
      method: "post",
      path: "/v1/admin/owners",
      tags: ["Accounts"],
      summary: "Add an owner (admin)",
      middleware: [requireJson()] as const,
      request: { body: { required: true, ...json(NewOwner) } },
      responses: {
        201: { description: "The owner", ...json(Owner) },
        ...problems(401, 403, 409, 415, 422),
      },
    }),
    async (c) => {
      const b = c.req.valid("json");
      const owner = { ...b, created_at: new Date().toISOString() };
      try {
        await store.putOwner(owner);
      } catch (e) {
        if (e instanceof DuplicateOwnerError) {
          throw new ProblemError("conflict", `An owner with id "${b.id}" already exists`);
        }
        throw e;
      }
      c.header("Location", `/v1/admin/owners/${owner.id}`);
      return c.json(owner, 201);
    },
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/admin/owners",
      tags: ["Accounts"],
      summary: "List owners (admin)",
      responses: {
        200: { description: "Every owner", ...json(z.object({ items: z.array(Owner) })) },
        ...problems(401, 403),
      },
    }),
    async (c) => c.json({ items: await store.listOwners() }, 200),
  );

  const OwnerParam = z.object({ owner: OwnerId.openapi({ param: { name: "owner", in: "path" } }) });

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/admin/owners/{owner}/usage",
      tags: ["Accounts"],
      summary: "An owner's usage against its quotas, on this instance (admin)",
      request: { params: OwnerParam },
      responses: {
        200: {
          description: "Usage",
          ...json(z.object({
            owner: z.string(),
            stored_bytes: z.number(),
            runs_computing: z.number().int(),
            runs_waiting: z.number().int(),
            compute_seconds_last_hour: z.number(),
          })),
        },
        ...problems(401, 403, 404),
      },
    }),
    async (c) => {
      const id = c.req.valid("param").owner;
      if (!(await store.getOwner(id))) throw new ProblemError("not-found", `No owner "${id}"`);
      const counts = deps.quotas?.counts(id) ?? { running: 0, queued: 0 };
      return c.json({
        owner: id,
        stored_bytes: await store.storedBytes(id),
        runs_computing: counts.running,
        runs_waiting: counts.queued,
        compute_seconds_last_hour: deps.quotas?.usage(id).seconds ?? 0,
      }, 200);
    },
  );

  app.openapi(
    createRoute({
      method: "post",
      path: "/v1/admin/owners/{owner}/keys",
      tags: ["Accounts"],
      summary: "Make an API key for an owner (admin); the answer is the only copy of the key",
      middleware: [requireJson()] as const,
      request: { params: OwnerParam, body: { required: true, ...json(NewKey) } },
      responses: {
        201: { description: "The key, once", ...json(CreatedKey) },
        ...problems(401, 403, 404, 415, 422),
      },
    }),
    async (c) => {
      const ownerId = c.req.valid("param").owner;
      const b = c.req.valid("json");
      if (!(await store.getOwner(ownerId))) {
        throw new ProblemError("not-found", `No owner "${ownerId}"`);
      }
      if (b.expires_at !== undefined && Date.parse(b.expires_at) <= Date.now()) {
        throw new ProblemError("validation", "expires_at is in the past", {
          errors: [{ pointer: "/expires_at", message: "must be in the future" }],
        });
      }
      const k = newApiKey();
      const rec: ApiKeyRecord = {
        id: k.id,
        owner: ownerId,
        hash: k.hash,
        label: b.label ?? null,
        role: b.role ?? null,
        created_at: new Date().toISOString(),
        expires_at: b.expires_at === undefined ? null : new Date(b.expires_at).toISOString(),
        revoked_at: null,
      };
      await store.putApiKey(rec);
      c.header("Cache-Control", "no-store");
      return c.json({ ...keyView(rec), key: k.key }, 201);
    },
  );

  app.openapi(
    createRoute({
      method: "get",
      path: "/v1/admin/keys",
      tags: ["Accounts"],
      summary: "List API keys, never the keys themselves (admin)",
      request: { query: z.object({ owner: OwnerId.optional() }) },
      responses: {
        200: { description: "Keys", ...json(z.object({ items: z.array(KeyView) })) },
        ...problems(401, 403, 422),
      },
    }),
    async (c) => {
      const owner = c.req.valid("query").owner;
      return c.json({ items: (await store.listApiKeys(owner)).map(keyView) }, 200);
    },
  );

  app.openapi(
    createRoute({
      method: "delete",
      path: "/v1/admin/keys/{key}",
      tags: ["Accounts"],
      summary: "Revoke an API key (admin); it is refused from then on",
      request: {
        params: z.object({
          key: z.string().regex(/^[0-9a-f]{16}$/, "must be a key id (16 hex digits)").openapi({
            param: { name: "key", in: "path" },
          }),
        }),
      },
      responses: { 204: { description: "Revoked" }, ...problems(401, 403, 404, 422) },
    }),
    // deno-lint-ignore no-explicit-any
    (async (c: any) => {
      const id = c.req.valid("param").key;
      if (!(await store.revokeApiKey(id, new Date().toISOString()))) {
        throw new ProblemError("not-found", `No valid key has id ${id}`);
      }
      return c.body(null, 204);
    }) as never,
  );
}
