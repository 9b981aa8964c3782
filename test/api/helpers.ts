/**
 * Test helpers: an in-process service over an in-memory SQLite store (no socket, no workers
 * unless asked), and small request shorthands.
 *
 * @module
 */
import assert from "node:assert/strict";
import { createService, type Service } from "../../api/app.ts";
import { type Config, testConfig } from "../../api/config.ts";
import { openStoreFromSpec } from "../../api/store/mod.ts";
import { InThreadExecutor } from "../../api/runs/service.ts";
import { WorkerPool } from "../../api/workers/pool.ts";
import type { ComputeExecutor } from "../../api/runs/service.ts";

export interface TestService extends Service {
  /** Stop workers and close the store. */
  close(): Promise<void>;
  /** Shorthand for `app.request` with a JSON body. */
  post(path: string, body: unknown, headers?: Record<string, string>): Promise<Response>;
  get(path: string, headers?: Record<string, string>): Promise<Response>;
}

/** A service over `sqlite::memory:` (or `store`), in-thread compute unless `workers` > 0. */
export async function makeTestApp(
  opts: { config?: Partial<Config>; workers?: number; store?: string } = {},
): Promise<TestService> {
  const config = testConfig({ ...opts.config, workers: opts.workers ?? 0 });
  const store = await openStoreFromSpec(opts.store ?? "sqlite::memory:");
  const pool = opts.workers ? new WorkerPool(opts.workers) : null;
  const executor: ComputeExecutor = pool ?? new InThreadExecutor();
  const svc = createService({ store, config, executor });
  return {
    ...svc,
    async close() {
      await svc.runs.settle();
      pool?.terminate();
      await store.close();
    },
    post: (path, body, headers = {}) =>
      Promise.resolve(svc.app.request(path, {
        method: "POST",
        headers: { "content-type": "application/json", ...headers },
        body: JSON.stringify(body),
      })),
    get: (path, headers = {}) => Promise.resolve(svc.app.request(path, { headers })),
  };
}

/** Upload a JSON series and return its id (asserting 200/201). */
export async function uploadSeries(svc: TestService, series: unknown): Promise<string> {
  const res = await svc.post("/v1/series", series);
  const body = await res.json();
  assert.ok(res.status === 201 || res.status === 200, `upload failed: ${JSON.stringify(body)}`);
  return body.series.id as string;
}

/** A monthly series helper: `n` months from `startYear`-01 with values from `f(i)`. */
export function monthlySeries(
  name: string,
  quantity: string,
  units: string,
  startYear: number,
  n: number,
  f: (i: number) => number | null,
  extra: Record<string, unknown> = {},
) {
  const time: string[] = [];
  const value: (number | null)[] = [];
  for (let i = 0; i < n; i++) {
    const y = startYear + Math.floor(i / 12);
    const m = (i % 12) + 1;
    time.push(`${y}-${String(m).padStart(2, "0")}`);
    value.push(f(i));
  }
  return { name, quantity, units, time, value, ...extra };
}

/** Assert an RFC 9457 problem response and return its body. */
export async function assertProblem(res: Response, status: number) {
  assert.equal(res.status, status, `expected ${status}, got ${res.status}`);
  assert.match(res.headers.get("content-type") ?? "", /application\/problem\+json/);
  assert.ok(res.headers.get("x-request-id"));
  const body = await res.json();
  assert.equal(body.status, status);
  assert.equal(typeof body.type, "string");
  assert.equal(typeof body.title, "string");
  assert.equal(typeof body.detail, "string");
  return body;
}
