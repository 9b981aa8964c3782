/**
 * Test helpers for a shared instance: a service that requires keys (an admin key is
 * configured), owners made through the admin API, and request shorthands that send a key.
 *
 * @module
 */
import assert from "node:assert/strict";
import type { Config } from "../../../api/config.ts";
import type { RunKind } from "../../../api/runs/kind.ts";
import { makeTestApp, monthlySeries, type TestService } from "../helpers.ts";

export const ADMIN_KEY = "test-admin-key-0123456789abcdef0123456789";

/** A caller: its key, and requests that carry it. */
export interface Caller {
  owner: string;
  key: string;
  get(path: string, headers?: Record<string, string>): Promise<Response>;
  post(path: string, body?: unknown, headers?: Record<string, string>): Promise<Response>;
  put(path: string, body: unknown): Promise<Response>;
  del(path: string): Promise<Response>;
}

export interface SharedInstance extends TestService {
  admin: Caller;
  anonymous: Caller;
  /** Make an owner with a key (through the admin API). */
  owner(id: string, opts?: { role?: string; group?: string }): Promise<Caller>;
}

/** A caller sending `key` (none when empty). */
export function caller(svc: TestService, owner: string, key: string): Caller {
  const auth: Record<string, string> = key ? { Authorization: `Bearer ${key}` } : {};
  const req = (path: string, init: RequestInit & { headers?: Record<string, string> }) =>
    Promise.resolve(svc.app.request(path, { ...init, headers: { ...auth, ...init.headers } }));
  return {
    owner,
    key,
    get: (path, headers = {}) => req(path, { headers }),
    post: (path, body, headers = {}) =>
      req(path, {
        method: "POST",
        headers: body === undefined ? headers : { "content-type": "application/json", ...headers },
        body: body === undefined ? undefined : JSON.stringify(body),
      }),
    put: (path, body) =>
      req(path, {
        method: "PUT",
        headers: { "content-type": "application/json" },
        body: JSON.stringify(body),
      }),
    del: (path) => req(path, { method: "DELETE" }),
  };
}

/** A service that requires keys, with an admin caller. */
export async function sharedInstance(
  opts: { config?: Partial<Config>; workers?: number; kinds?: RunKind[] } = {},
): Promise<SharedInstance> {
  const svc = await makeTestApp({ ...opts, config: { adminKey: ADMIN_KEY, ...opts.config } });
  const admin = caller(svc, "local", ADMIN_KEY);
  return {
    ...svc,
    admin,
    anonymous: caller(svc, "", ""),
    async owner(id, o = {}) {
      const made = await admin.post("/v1/admin/owners", {
        id,
        name: `Owner ${id}`,
        role: o.role ?? "writer",
        group: o.group ?? "lab",
      });
      assert.equal(made.status, 201, await made.clone().text());
      const k = await admin.post(`/v1/admin/owners/${id}/keys`, { label: "test" });
      assert.equal(k.status, 201, await k.clone().text());
      return caller(svc, id, (await k.json()).key);
    },
  };
}

/** A small monthly series; `label` makes its content (and so its id) distinct. */
export function smallSeries(label: string, n = 48) {
  return monthlySeries(
    `Series ${label}`,
    "temperature_anomaly",
    "K",
    1990,
    n,
    (i) => Math.sin(i / 5) + label.length * 0.01,
  );
}

/** Upload as `who`; returns the id (asserting 200/201). */
export async function upload(who: Caller, series: unknown): Promise<string> {
  const res = await who.post("/v1/series", series);
  const body = await res.json();
  assert.ok(res.status === 201 || res.status === 200, JSON.stringify(body));
  return body.series.id;
}
