/**
 * When the SQLite store's remembered access-check answers are forgotten: at once after a write
 * by any connection this process opens on the file (this store, another store of the same
 * file, the series-writer worker), through the shared write counter; after a write by another
 * program, once `PRAGMA data_version` is read again (at most `outsideCheckMs` later).
 */
import assert from "node:assert/strict";
import { join } from "node:path";
import { DatabaseSync } from "node:sqlite";
import { openSqliteStore } from "../../../api/store/sqlite.ts";
import { OFFLOAD_POINTS } from "../../../api/store/sqlite_writer.ts";
import type { Viewer } from "../../../api/store/types.ts";
import { at, makeSeries } from "./store_suite.ts";

const bob: Viewer = { owner: "bob", group: "g2", admin: false };
const alice = { owner: "alice", visibility: "private" as const };
/** Never read data_version again after the first check: only the counter can tell. */
const NEVER = 1e12;

Deno.test("SQLite access checks see this process's writes at once, from any connection", async () => {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-holdings-" });
  const path = join(dir, "store.db");
  const a = await openSqliteStore({ path, outsideCheckMs: NEVER });
  const b = await openSqliteStore({ path, outsideCheckMs: NEVER });
  try {
    for (const o of ["alice", "bob"]) {
      await a.putOwner({ id: o, name: o, role: "writer", group: `g-${o}`, created_at: at(0) });
    }
    const s = makeSeries("holdings version");
    await a.putSeries(s, alice);
    assert.equal(await a.seriesHolding(s.id, bob), null);

    // this store's own write: seen by the very next check
    assert.equal(await a.setSeriesVisibility(s.id, "alice", "public"), true);
    assert.equal((await a.seriesHolding(s.id, bob))?.visibility, "public");
    // another store's connection to the same file, in this thread
    assert.equal(await b.setSeriesVisibility(s.id, "alice", "private"), true);
    assert.equal(await a.seriesHolding(s.id, bob), null);
    // a failed write (no such owner) rolls back and changes nothing
    await assert.rejects(a.putSeries(s, { owner: "nobody", visibility: "private" }));
    assert.equal(await a.seriesHolding(s.id, bob), null);

    // the series-writer worker's connection (a series over OFFLOAD_POINTS points): bob's own
    // holding of the same content, stored there, is seen here at once
    const big = makeSeries("holdings version, large", { n: OFFLOAD_POINTS + 1 });
    await a.putSeries(big, alice);
    assert.equal(await a.seriesHolding(big.id, bob), null);
    const put = await a.putSeries(big, { owner: "bob", visibility: "private" });
    assert.equal(put.created, true);
    assert.equal((await a.seriesHolding(big.id, bob))?.owner, "bob");
  } finally {
    await a.close();
    await b.close();
    await Deno.remove(dir, { recursive: true });
  }
});

Deno.test("SQLite access checks see another program's writes through data_version", async () => {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-holdings-" });
  const path = join(dir, "store.db");
  const a = await openSqliteStore({ path }); // reads data_version when 1 ms old
  const never = await openSqliteStore({ path, outsideCheckMs: NEVER });
  const other = new DatabaseSync(path); // not through sunlag: no counter
  try {
    await a.putOwner({ id: "alice", name: "a", role: "writer", group: "g1", created_at: at(0) });
    const s = makeSeries("holdings version, outside");
    await a.putSeries(s, alice);
    assert.equal(await a.seriesHolding(s.id, bob), null);
    assert.equal(await never.seriesHolding(s.id, bob), null);
    other.prepare("UPDATE series_holdings SET visibility = 'public' WHERE series_id = ?").run(s.id);
    await new Promise((r) => setTimeout(r, 5));
    assert.equal((await a.seriesHolding(s.id, bob))?.visibility, "public");
    // without the data_version read the counter cannot know
    assert.equal(await never.seriesHolding(s.id, bob), null);
  } finally {
    other.close();
    await a.close();
    await never.close();
    await Deno.remove(dir, { recursive: true });
  }
});
