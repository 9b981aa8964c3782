import assert from "node:assert/strict";
import postgres from "postgres";
import { openPostgresStore, POSTGRES_MIGRATIONS } from "../../../api/store/postgres.ts";
import { SchemaMismatchError } from "../../../api/store/errors.ts";
import { openStoreFromSpec } from "../../../api/store/mod.ts";
import { lazyResult, resultBytesOf, resultTextOf } from "../../../api/store/result_text.ts";
import {
  assertUpgradedV1Rows,
  makeRun,
  makeSeries,
  type StoreBacking,
  storeSuite,
  V1_ROWS_SQL,
} from "./store_suite.ts";
import { type PgServer, pgUnavailableReason, startPgServer } from "./pg_cluster.ts";

const server = await startPgServer();
const ignore = server === null;
const suffix = ignore ? ` (skipped: ${pgUnavailableReason})` : "";

let dbCounter = 0;

/** A fresh database on the test server, dropped on dispose. */
async function freshDatabase(srv: PgServer): Promise<{ url: string; drop(): Promise<void> }> {
  const name = `sunlag_test_${Deno.pid}_${dbCounter++}`;
  const admin = postgres(srv.adminUrl, { max: 1, onnotice: () => {} });
  try {
    await admin.unsafe(`CREATE DATABASE ${name}`);
  } finally {
    await admin.end();
  }
  return {
    url: srv.urlFor(name),
    async drop() {
      const a = postgres(srv.adminUrl, { max: 1, onnotice: () => {} });
      try {
        await a.unsafe(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
      } finally {
        await a.end();
      }
    },
  };
}

storeSuite("PostgresStore" + suffix, async (): Promise<StoreBacking> => {
  const db = await freshDatabase(server!);
  return {
    shared: true,
    open: () => openPostgresStore({ url: db.url, max: 4 }),
    dispose: () => db.drop(),
  };
}, { ignore });

async function withDatabase(body: (url: string) => Promise<void>): Promise<void> {
  const db = await freshDatabase(server!);
  try {
    await body(db.url);
  } finally {
    await db.drop();
  }
}

Deno.test({
  name: "openPostgresStore() records each migration once and refuses a newer schema" + suffix,
  ignore,
  async fn() {
    await withDatabase(async (url) => {
      // Several instances starting at once apply each step exactly once.
      const stores = await Promise.all([1, 2, 3].map(() => openPostgresStore({ url, max: 1 })));
      for (const s of stores) {
        assert.deepEqual(
          (await s.schemaVersions()).map((v) => [v.version, v.name]),
          POSTGRES_MIGRATIONS.map((m) => [m.version, m.name]),
        );
        await s.close();
      }
      const step2 = {
        version: POSTGRES_MIGRATIONS.length + 1,
        name: "test: add a notes table",
        sql: "CREATE TABLE notes (id INTEGER PRIMARY KEY)",
      };
      const newer = await openPostgresStore({ url, migrations: [...POSTGRES_MIGRATIONS, step2] });
      assert.equal((await newer.schemaVersions()).length, POSTGRES_MIGRATIONS.length + 1);
      await newer.close();
      await assert.rejects(() => openPostgresStore({ url }), SchemaMismatchError);
    });
  },
});

Deno.test({
  name: "openPostgresStore() upgrades a store written before owners: the local owner holds all" +
    suffix,
  ignore,
  async fn() {
    await withDatabase(async (url) => {
      await (await openPostgresStore({ url, migrations: POSTGRES_MIGRATIONS.slice(0, 1) }))
        .close();
      const sql = postgres(url, { max: 1, onnotice: () => {} });
      try {
        for (const q of V1_ROWS_SQL) await sql.unsafe(q);
      } finally {
        await sql.end();
      }
      const store = await openPostgresStore({ url });
      try {
        await assertUpgradedV1Rows(store);
      } finally {
        await store.close();
      }
    });
  },
});

Deno.test({
  name: "openPostgresStore() keeps results stored as text readable as the same bytes" + suffix,
  ignore,
  async fn() {
    // Before step 5 the result column was TEXT; the step converts each row to the UTF-8 bytes of
    // its text, which are the canonical bytes the service hashed and served.
    await withDatabase(async (url) => {
      const before = POSTGRES_MIGRATIONS.findIndex((m) => m.name === "run results as bytes");
      assert.ok(before > 0);
      const old = await openPostgresStore({
        url,
        migrations: POSTGRES_MIGRATIONS.slice(0, before),
      });
      const text = '{"label":"été ☀ 𝛼","values":[1,null,2.5e-7]}';
      const run = { ...makeRun("text-result"), result: JSON.parse(text) };
      try {
        const sql = postgres(url, { max: 1, onnotice: () => {} });
        try {
          const type = await sql`SELECT data_type FROM information_schema.columns
            WHERE table_name = 'runs' AND column_name = 'result'`;
          assert.equal(type[0].data_type, "text");
          await sql`INSERT INTO runs (id, kind, created_at, updated_at, status, progress, params,
              service_version, algorithm_version, result, result_digest)
            VALUES (${run.id}, ${run.kind}, ${run.created_at}, ${run.updated_at}, 'succeeded', 1,
              '{}', '0.1.0', '1', ${text}, ${"0".repeat(64)})`;
        } finally {
          await sql.end();
        }
      } finally {
        await old.close();
      }
      const store = await openPostgresStore({ url });
      try {
        const got = await store.getRun(run.id);
        assert.equal(resultTextOf(got!.result), text);
        assert.deepEqual(resultBytesOf(got!.result), new TextEncoder().encode(text));
        assert.deepEqual(got!.result, JSON.parse(text));
        // a result written now is stored as those bytes, byte for byte
        const again = {
          ...makeRun("bytes-result"),
          result: lazyResult(new TextEncoder().encode(text)),
        };
        await store.putRun(again);
        assert.equal(resultTextOf((await store.getRun(again.id))!.result), text);
        const sql = postgres(url, { max: 1, onnotice: () => {} });
        try {
          const rows = await sql`SELECT id, convert_from(result, 'UTF8') AS t,
              pg_column_compression(result) AS c FROM runs
            WHERE id IN ${sql([run.id, again.id])} ORDER BY id`;
          assert.deepEqual(rows.map((r) => r.t), [text, text]);
        } finally {
          await sql.end();
        }
      } finally {
        await store.close();
      }
    });
  },
});

Deno.test({
  name: "openPostgresStore() rolls back a failing migration completely" + suffix,
  ignore,
  async fn() {
    await withDatabase(async (url) => {
      const broken = [...POSTGRES_MIGRATIONS, {
        version: POSTGRES_MIGRATIONS.length + 1,
        name: "test: broken step",
        sql: "CREATE TABLE half (x INTEGER); THIS IS NOT SQL;",
      }];
      await assert.rejects(() => openPostgresStore({ url, migrations: broken }));
      const sql = postgres(url, { max: 1, onnotice: () => {} });
      try {
        const tables = (await sql`SELECT tablename FROM pg_tables WHERE schemaname = 'public'`)
          .map((r) => r.tablename);
        assert.deepEqual(tables, [], "partial migration left behind");
      } finally {
        await sql.end();
      }
    });
  },
});

Deno.test({
  name: "PostgresStore: a delete racing runs that use the series never orphans a run" + suffix,
  ignore,
  async fn() {
    // Either the delete wins (the runs are refused as missing input) or a run wins (the delete
    // answers in_use); never both, whatever the interleaving.
    await withDatabase(async (url) => {
      const a = await openPostgresStore({ url, max: 4 });
      const b = await openPostgresStore({ url, max: 4 });
      try {
        for (let round = 0; round < 15; round++) {
          const s = makeSeries(`race-${round}`);
          await a.putSeries(s);
          const runs = [0, 1, 2].map((k) => makeRun(`race-${round}-${k}`, { inputSeries: [s.id] }));
          const [del, ...puts] = await Promise.allSettled([
            a.deleteSeries(s.id),
            ...runs.map((r) => b.putRun(r)),
          ]);
          assert.equal(del.status, "fulfilled");
          const stored = puts.filter((p) => p.status === "fulfilled").length;
          const outcome = (del as PromiseFulfilledResult<string>).value;
          if (outcome === "deleted") {
            assert.equal(stored, 0, `round ${round}: a run was stored for a deleted series`);
            assert.equal(await a.getSeriesMeta(s.id), null);
          } else {
            assert.equal(outcome, "in_use");
            assert.ok(stored > 0, `round ${round}: in_use without a stored run`);
            assert.ok(await a.getSeriesMeta(s.id));
          }
          for (const p of puts) {
            if (p.status === "rejected") {
              assert.equal((p.reason as Error).name, "MissingInputError", String(p.reason));
            }
          }
        }
      } finally {
        await a.close();
        await b.close();
      }
    });
  },
});

Deno.test({
  name: "openStoreFromSpec() opens a PostgreSQL store from a postgres:// URL" + suffix,
  ignore,
  async fn() {
    await withDatabase(async (url) => {
      const store = await openStoreFromSpec(url);
      try {
        assert.equal(store.kind, "postgres");
        assert.equal(await store.ping(), true);
      } finally {
        await store.close();
      }
    });
  },
});

Deno.test({
  name: "PostgresStore.ping() answers false once its database is gone" + suffix,
  ignore,
  async fn() {
    const db = await freshDatabase(server!);
    const store = await openPostgresStore({ url: db.url, max: 1 });
    try {
      assert.equal(await store.ping(), true);
      await db.drop(); // terminates the store's connections; reconnecting then fails
      assert.equal(await store.ping(), false);
    } finally {
      await store.close();
    }
  },
});
