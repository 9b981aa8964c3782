/**
 * The whole service over each adapter, through HTTP: routes must not care which store is
 * behind them, and a restart on the same store keeps everything.
 */
import assert from "node:assert/strict";
import { join } from "node:path";
import postgres from "postgres";
import { assertProblem, makeTestApp, monthlySeries, uploadSeries } from "../helpers.ts";
import { pgUnavailableReason, startPgServer } from "./pg_cluster.ts";

const pg = await startPgServer();

/** Each adapter as a SUNLAG_STORE spec on fresh storage, with its cleanup. */
const adapters: {
  name: string;
  kind: string;
  ignore: boolean;
  make(): Promise<{ spec: string; dispose(): Promise<void> }>;
}[] = [
  {
    name: "SQLite file",
    kind: "sqlite",
    ignore: false,
    async make() {
      const dir = await Deno.makeTempDir({ prefix: "sunlag-svc-" });
      return {
        spec: `sqlite:${join(dir, "svc.db")}`,
        dispose: () => Deno.remove(dir, { recursive: true }),
      };
    },
  },
  {
    name: pg ? "PostgreSQL" : `PostgreSQL (skipped: ${pgUnavailableReason})`,
    kind: "postgres",
    ignore: pg === null,
    async make() {
      const db = `sunlag_svc_${Deno.pid}_${Math.floor(performance.now())}`;
      const admin = postgres(pg!.adminUrl, { max: 1, onnotice: () => {} });
      await admin.unsafe(`CREATE DATABASE ${db}`);
      await admin.end();
      return {
        spec: pg!.urlFor(db),
        async dispose() {
          const a = postgres(pg!.adminUrl, { max: 1, onnotice: () => {} });
          await a.unsafe(`DROP DATABASE IF EXISTS ${db} WITH (FORCE)`);
          await a.end();
        },
      };
    },
  },
];

for (const adapter of adapters) {
  Deno.test({
    name: `service over ${adapter.name}: upload, run, refuse delete, survive a restart`,
    ignore: adapter.ignore,
    async fn() {
      const storage = await adapter.make();
      try {
        const series = monthlySeries(
          "station record, synthetic",
          "temperature_anomaly",
          "K",
          1990,
          36,
          (i) => (i === 7 ? null : Math.sin(i / 3)),
        );
        let runId: string;
        let seriesId: string;
        {
          const svc = await makeTestApp({ store: storage.spec });
          try {
            const health = await (await svc.get("/v1/health")).json();
            assert.deepEqual(health.store, { kind: adapter.kind, reachable: true });

            seriesId = await uploadSeries(svc, series);
            const again = await svc.post("/v1/series", series);
            assert.equal(again.status, 200, "identical upload must return the stored series");
            assert.equal((await again.json()).series.id, seriesId);

            const run = await svc.post("/v1/resampling", { series: seriesId, to: "annual" });
            assert.equal(run.status, 201, JSON.stringify(await run.clone().json()));
            runId = (await run.json()).id;

            const del = await svc.app.request(`/v1/series/${seriesId}`, { method: "DELETE" });
            assert.deepEqual((await assertProblem(del, 409)).runs, [runId]);
          } finally {
            await svc.close();
          }
        }
        {
          const svc = await makeTestApp({ store: storage.spec });
          try {
            const got = await (await svc.get(`/v1/series/${seriesId}`)).json();
            assert.equal(got.id, seriesId);
            const list = await (await svc.get("/v1/runs?kind=resampling")).json();
            assert.deepEqual(list.items.map((r: { id: string }) => r.id), [runId]);
            const run = await (await svc.get(`/v1/runs/${runId}`)).json();
            assert.equal(run.status, "succeeded");
            assert.deepEqual(run.input_series, [seriesId]);
          } finally {
            await svc.close();
          }
        }
      } finally {
        await storage.dispose();
      }
    },
  });
}
