/**
 * Store speed for one 150,000-point series (about 410 years of daily values) with uncertainty:
 * putSeries and getSeries on the SQLite file store (WAL, synchronous FULL, so each put pays a
 * sync to disk), on the in-memory store, and on PostgreSQL (an ephemeral local cluster with
 * fsync off) when the server binaries exist. Medians: test/bench/store_medians.ts.
 *
 *   deno bench -A test/bench/store_bench.ts
 *
 * Each put uses a fresh id and the series is deleted again outside the timed section, so the
 * file does not grow with the iteration count.
 */
import { join } from "node:path";
import { openSqliteStore } from "../../api/store/sqlite.ts";
import postgres from "postgres";
import { openPostgresStore } from "../../api/store/postgres.ts";
import type { Store, StoredSeries } from "../../api/store/types.ts";
import { startPgServer } from "../api/store/pg_cluster.ts";
import { makeSeries, seriesId } from "../api/store/store_suite.ts";

const N = 150_000;
const dir = await Deno.makeTempDir({ prefix: "sunlag-bench-" });
globalThis.addEventListener("unload", () => Deno.removeSync(dir, { recursive: true }));

const stores: Record<string, Store> = {
  file: await openSqliteStore({ path: join(dir, "bench.db") }),
  memory: await openSqliteStore({ path: ":memory:" }),
};
const pg = await startPgServer();
if (pg) {
  const admin = postgres(pg.adminUrl, { max: 1, onnotice: () => {} });
  await admin.unsafe("CREATE DATABASE sunlag_bench");
  await admin.end();
  stores["postgres, local"] = await openPostgresStore({ url: pg.urlFor("sunlag_bench") });
}
const template = makeSeries("bench", { n: N, uncertainty: true });
for (const store of Object.values(stores)) await store.putSeries(template);

let counter = 0;
function fresh(): StoredSeries {
  return { ...template, id: seriesId(`bench-put-${counter++}`) };
}

for (const [where, store] of Object.entries(stores)) {
  Deno.bench({
    name: `putSeries 150,000 points (${where})`,
    group: "put",
    baseline: where === "file",
    n: 60,
    warmup: 5,
    async fn(b) {
      const s = fresh();
      b.start();
      await store.putSeries(s);
      b.end();
      await store.deleteSeries(s.id);
    },
  });
  Deno.bench({
    name: `getSeries 150,000 points (${where})`,
    group: "get",
    baseline: where === "file",
    n: 200,
    warmup: 10,
    async fn() {
      const got = await store.getSeries(template.id);
      if (got?.n !== N) throw new Error("bench: series missing");
    },
  });
}
