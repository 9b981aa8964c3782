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
import { setProductEngineSetting } from "../../api/workers/openblas_product.ts";
import type { ComputeExecutor } from "../../api/runs/service.ts";
import type { RunKind } from "../../api/runs/kind.ts";
import { randomStream } from "../../core/random/mod.ts";

export interface TestService extends Service {
  /** Stop workers and close the store. */
  close(): Promise<void>;
  /** Shorthand for `app.request` with a JSON body. */
  post(path: string, body: unknown, headers?: Record<string, string>): Promise<Response>;
  get(path: string, headers?: Record<string, string>): Promise<Response>;
}

/** A service over `sqlite::memory:` (or `store`), in-thread compute unless `workers` > 0. */
export async function makeTestApp(
  opts: { config?: Partial<Config>; workers?: number; store?: string; kinds?: RunKind[] } = {},
): Promise<TestService> {
  const config = testConfig({ ...opts.config, workers: opts.workers ?? 0 });
  const store = await openStoreFromSpec(opts.store ?? "sqlite::memory:");
  setProductEngineSetting(config.blas);
  const pool = opts.workers ? new WorkerPool(opts.workers, undefined, { blas: config.blas }) : null;
  const executor: ComputeExecutor = pool ?? new InThreadExecutor();
  const svc = createService({ store, config, executor, kinds: opts.kinds });
  return {
    ...svc,
    async close() {
      await svc.runs.settle();
      pool?.terminate();
      svc.uploads.terminate();
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

/**
 * An invented attribution case: monthly TSI with an 11-year cycle (1 W m-2 peak to trough) and
 * an AR(1) ENSO-like index; the temperature follows solar by 6 months (0.1 K per W m-2) and
 * ENSO by 2 months (0.05 K per unit), plus AR(1) noise and an optional trend per month.
 * Returns a `/v1/attributions` request searching solar lags 0–12 and ENSO lags 0–6.
 */
export function inventedAttributionRequest(
  opts: { n: number; startYear: number; trendPerMonth?: number; seed?: number },
) {
  const { n, startYear, trendPerMonth = 0, seed = 21 } = opts;
  const st = randomStream(seed, 0);
  const L = 12;
  const tsi: number[] = [], enso: number[] = [];
  let en = 0;
  for (let i = 0; i < n + L; i++) {
    tsi.push(1361 + 0.5 * Math.sin((2 * Math.PI * i) / 132) + 0.2 * st.normal());
    en = 0.9 * en + 0.4 * st.normal();
    enso.push(en);
  }
  const temp: number[] = [];
  let e = 0;
  for (let i = 0; i < n; i++) {
    e = 0.5 * e + 0.02 * st.normal();
    // solar acts 6 months later, ENSO 2 months later (indices shifted by L)
    temp.push(
      0.1 * (tsi[i + L - 6] - 1361) + 0.05 * enso[i + L - 2] + trendPerMonth * i + e,
    );
  }
  const ms = (name: string, q: string, u: string, v: number[], off: number) =>
    monthlySeries(name, q, u, startYear, n, (i) => v[i + off]);
  return {
    climate: ms("Invented station", "temperature_anomaly", "K", temp, 0),
    regressors: [
      {
        name: "solar",
        role: "solar",
        series: ms("Invented TSI", "tsi", "W m-2", tsi, L),
        min_lag: 0,
        max_lag: 12,
      },
      {
        name: "enso",
        role: "enso",
        series: ms("Invented ENSO", "enso_index", "1", enso, L),
        min_lag: 0,
        max_lag: 6,
      },
    ],
    // the fewest surrogates of the test that pays for the solar lag search (each repeats it)
    surrogates: 100,
  };
}
