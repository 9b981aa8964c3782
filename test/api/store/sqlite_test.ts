import assert from "node:assert/strict";
import { DatabaseSync } from "node:sqlite";
import { join } from "node:path";
import { openSqliteStore, SQLITE_MIGRATIONS, type SqliteStore } from "../../../api/store/sqlite.ts";
import { SchemaMismatchError } from "../../../api/store/errors.ts";
import { lazyResult, resultBytesOf, resultTextOf } from "../../../api/store/result_text.ts";
import {
  assertUpgradedV1Rows,
  makeRun,
  makeSeries,
  storeSuite,
  V1_ROWS_SQL,
} from "./store_suite.ts";

storeSuite("SqliteStore (file)", async () => {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-store-" });
  const path = join(dir, "nested", "store.db");
  return {
    shared: true,
    open: () => openSqliteStore({ path }),
    dispose: () => Deno.remove(dir, { recursive: true }),
  };
});

storeSuite("SqliteStore (:memory:)", () =>
  Promise.resolve({
    shared: false,
    open: () => openSqliteStore({ path: ":memory:" }),
    dispose: () => Promise.resolve(),
  }));

async function withDir(body: (dir: string) => Promise<void>): Promise<void> {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-store-" });
  try {
    await body(dir);
  } finally {
    await Deno.remove(dir, { recursive: true });
  }
}

Deno.test("openSqliteStore() sets WAL, busy timeout, full sync and foreign keys", async () => {
  await withDir(async (dir) => {
    const path = join(dir, "a.db");
    const store = await openSqliteStore({ path, busyTimeoutMs: 4321 });
    // SQLite: synchronous 2 = FULL, foreign_keys 1 = on
    assert.deepEqual(store.settings(), {
      journal_mode: "wal",
      busy_timeout: 4321,
      synchronous: 2,
      foreign_keys: 1,
      wal_autocheckpoint: 1000,
    });
    await store.close();
    // WAL is a property of the file: a fresh connection sees it too.
    const db = new DatabaseSync(path);
    try {
      assert.equal(
        (db.prepare("PRAGMA journal_mode").get() as { journal_mode: string })
          .journal_mode,
        "wal",
      );
    } finally {
      db.close();
    }
  });
});

Deno.test("openSqliteStore() records each migration once, in order", async () => {
  await withDir(async (dir) => {
    const path = join(dir, "m.db");
    for (let i = 0; i < 3; i++) {
      const store = await openSqliteStore({ path });
      const versions = store.schemaVersions();
      assert.deepEqual(
        versions.map((v) => [v.version, v.name]),
        SQLITE_MIGRATIONS.map((m) => [m.version, m.name]),
      );
      await store.close();
    }
  });
});

Deno.test("openSqliteStore() applies only the steps a file is missing", async () => {
  await withDir(async (dir) => {
    const path = join(dir, "up.db");
    const v1 = await openSqliteStore({ path });
    await v1.putSeries(makeSeries("before-upgrade"));
    await v1.close();
    const step2 = {
      version: SQLITE_MIGRATIONS.length + 1,
      name: "test: add a notes table",
      sql: "CREATE TABLE notes (id INTEGER PRIMARY KEY, body TEXT NOT NULL)",
    };
    const v2 = await openSqliteStore({ path, migrations: [...SQLITE_MIGRATIONS, step2] });
    try {
      assert.deepEqual(v2.schemaVersions().map((v) => v.version), [
        ...SQLITE_MIGRATIONS.map((m) => m.version),
        step2.version,
      ]);
      assert.ok(await v2.getSeriesMeta(makeSeries("before-upgrade").id), "data lost in upgrade");
    } finally {
      await v2.close();
    }
    // The newer file is refused by the older schema, and nothing is written to it.
    await assert.rejects(() => openSqliteStore({ path }), SchemaMismatchError);
  });
});

Deno.test("openSqliteStore() upgrades a store written before owners: the local owner holds all", async () => {
  await withDir(async (dir) => {
    const path = join(dir, "v1.db");
    await (await openSqliteStore({ path, migrations: SQLITE_MIGRATIONS.slice(0, 1) })).close();
    const db = new DatabaseSync(path);
    try {
      for (const sql of V1_ROWS_SQL) db.exec(sql);
    } finally {
      db.close();
    }
    const store = await openSqliteStore({ path });
    try {
      await assertUpgradedV1Rows(store);
    } finally {
      await store.close();
    }
  });
});

Deno.test("openSqliteStore() refuses a file whose migration history differs", async () => {
  await withDir(async (dir) => {
    const path = join(dir, "other.db");
    await (await openSqliteStore({ path })).close();
    const renamed = SQLITE_MIGRATIONS.map((m) => ({ ...m, name: m.name + " (other)" }));
    await assert.rejects(() => openSqliteStore({ path, migrations: renamed }), SchemaMismatchError);
    await assert.rejects(
      () => openSqliteStore({ path, migrations: [{ ...SQLITE_MIGRATIONS[0], version: 2 }] }),
      SchemaMismatchError,
    );
  });
});

Deno.test("openSqliteStore() rolls back a failing migration completely", async () => {
  await withDir(async (dir) => {
    const path = join(dir, "fail.db");
    const broken = [...SQLITE_MIGRATIONS, {
      version: SQLITE_MIGRATIONS.length + 1,
      name: "test: broken step",
      sql: "CREATE TABLE half (x INTEGER); THIS IS NOT SQL;",
    }];
    await assert.rejects(() => openSqliteStore({ path, migrations: broken }));
    const db = new DatabaseSync(path);
    try {
      const tables = (db.prepare("SELECT name FROM sqlite_master WHERE type = 'table'").all() as {
        name: string;
      }[]).map((r) => r.name);
      assert.ok(!tables.includes("half"), "partial migration left behind");
      assert.ok(!tables.includes("series"), "earlier steps of the failed open left behind");
    } finally {
      db.close();
    }
    const ok = await openSqliteStore({ path });
    assert.equal(ok.schemaVersions().length, SQLITE_MIGRATIONS.length);
    await ok.close();
  });
});

Deno.test("SqliteStore stores points as little-endian Float64 blobs, one row per series", async () => {
  await withDir(async (dir) => {
    const path = join(dir, "blob.db");
    const store = await openSqliteStore({ path });
    const s = makeSeries("blob", { values: [1, -0, 1360.8, 5e-324], uncertainty: true });
    await store.putSeries(s);
    await store.close();
    const db = new DatabaseSync(path);
    try {
      const rows = db.prepare("SELECT time, value, uncertainty FROM series_points").all() as {
        time: Uint8Array;
        value: Uint8Array;
        uncertainty: Uint8Array;
      }[];
      assert.equal(rows.length, 1);
      const expect = (xs: Float64Array) => {
        const b = new Uint8Array(xs.length * 8);
        const v = new DataView(b.buffer);
        xs.forEach((x, i) => v.setFloat64(i * 8, x, true));
        return [...b];
      };
      assert.deepEqual([...rows[0].value], expect(s.value));
      assert.deepEqual([...rows[0].time], expect(s.time));
      assert.deepEqual([...rows[0].uncertainty], expect(s.uncertainty!));
      // IEEE 754: 1.0 = 0x3FF0000000000000, stored low byte first
      assert.deepEqual([...rows[0].value.subarray(0, 8)], [0, 0, 0, 0, 0, 0, 0xf0, 0x3f]);
    } finally {
      db.close();
    }
  });
});

Deno.test("SqliteStore.getSeries() refuses a corrupt point blob instead of misreading it", async () => {
  await withDir(async (dir) => {
    const path = join(dir, "corrupt.db");
    const store = await openSqliteStore({ path });
    const s = makeSeries("corrupt", { n: 10 });
    await store.putSeries(s);
    const db = new DatabaseSync(path);
    db.prepare("UPDATE series_points SET value = ?").run(new Uint8Array(12));
    db.close();
    await assert.rejects(() => store.getSeries(s.id), RangeError);
    await store.close();
  });
});

Deno.test("SqliteStore.deleteSeries() is refused by the database itself for a used series", async () => {
  // The in-use rule is also a foreign key, so even a raw delete cannot orphan a run.
  await withDir(async (dir) => {
    const path = join(dir, "fk.db");
    const store = await openSqliteStore({ path });
    const s = makeSeries("fk");
    await store.putSeries(s);
    await store.putRun(makeRun("fk", { inputSeries: [s.id] }));
    await store.close();
    const db = new DatabaseSync(path);
    try {
      db.exec("PRAGMA foreign_keys = ON");
      assert.throws(() => db.prepare("DELETE FROM series WHERE id = ?").run(s.id), /FOREIGN KEY/);
    } finally {
      db.close();
    }
  });
});

const CHILD = new URL("./sqlite_child.ts", import.meta.url).pathname;

Deno.test("SqliteStore: two processes writing to one file at once never fail with BUSY", async () => {
  await withDir(async (dir) => {
    const path = join(dir, "shared.db");
    await (await openSqliteStore({ path })).close();
    const count = 200;
    const children = ["p1", "p2"].map((tag) =>
      new Deno.Command(Deno.execPath(), {
        args: ["run", "-A", CHILD, "writer", path, tag, String(count)],
        stdin: "piped",
        stdout: "piped",
        stderr: "piped",
      }).spawn()
    );
    // Collect each writer's output; release both only once both have opened the store.
    const outputs = children.map((c) => {
      let text = "";
      let onReady = () => {};
      const ready = new Promise<void>((ok) => onReady = ok);
      const all = (async () => {
        for await (const chunk of c.stdout.pipeThrough(new TextDecoderStream())) {
          text += chunk;
          if (text.startsWith("ready\n")) onReady();
        }
        return text;
      })();
      return { ready, all, status: c.status, stderr: new Response(c.stderr).text() };
    });
    await Promise.all(outputs.map((o) => o.ready));
    for (const c of children) {
      const w = c.stdin.getWriter();
      await w.write(new Uint8Array([1]));
      await w.close();
    }
    const spans: [number, number][] = [];
    for (const o of outputs) {
      const [out, status, err] = await Promise.all([o.all, o.status, o.stderr]);
      assert.equal(status.code, 0, `writer failed: ${err}`);
      assert.doesNotMatch(err, /busy|locked/i);
      const start = Number(/^start (\d+)$/m.exec(out)?.[1]);
      const done = /^done (\d+) (\d+)$/m.exec(out);
      assert.ok(done, `writer did not finish: ${out.slice(-200)}`);
      assert.equal(Number(done[1]), count);
      spans.push([start, Number(done[2])]);
    }
    // The two writers' busy periods overlapped, so the lock was really contended.
    assert.ok(
      Math.max(spans[0][0], spans[1][0]) < Math.min(spans[0][1], spans[1][1]),
      `writers did not overlap: ${JSON.stringify(spans)}`,
    );
    const store: SqliteStore = await openSqliteStore({ path });
    try {
      assert.equal((await store.listSeries({ limit: 0, offset: 0 })).total, 2 * count);
      assert.equal(
        (await store.listRuns({ status: "succeeded", limit: 0, offset: 0 })).total,
        2 * count,
      );
      assert.equal(store.integrityCheck(), "ok");
    } finally {
      await store.close();
    }
  });
});

Deno.test("SqliteStore: a large result is committed without the WAL checkpoint, which the writer worker makes", async () => {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-store-" });
  const path = join(dir, "sunlag.db");
  const text = JSON.stringify({ values: Array.from({ length: 600_000 }, (_, i) => i / 7) });
  const bytes = new TextEncoder().encode(text);
  assert.ok(bytes.length > 8 << 20);
  const run = { ...makeRun("large-result"), result: lazyResult(bytes) };
  let store = await openSqliteStore({ path });
  try {
    await store.putRun(run);
    assert.equal(resultTextOf((await store.getRun(run.id))!.result), text);
    // the database file receives the pages only by a checkpoint: the writer's, after the commit
    const until = Date.now() + 20_000;
    while (Deno.statSync(path).size < bytes.length && Date.now() < until) {
      await new Promise((r) => setTimeout(r, 50));
    }
    assert.ok(Deno.statSync(path).size >= bytes.length, "the WAL was checkpointed");
  } finally {
    await store.close();
  }
  store = await openSqliteStore({ path });
  try {
    assert.deepEqual(resultBytesOf((await store.getRun(run.id))!.result), bytes);
    assert.equal(await store.integrityCheck(), "ok");
  } finally {
    await store.close();
    await Deno.remove(dir, { recursive: true });
  }
});
