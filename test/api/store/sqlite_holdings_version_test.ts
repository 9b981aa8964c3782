/**
 * When the SQLite store's remembered access-check answers are forgotten: at once after this
 * connection's own writes, and after another connection's commit from the next microtask
 * checkpoint on (the event loop hands over requests, messages and timers only there), never
 * later. Requests taken in within one checkpoint share one `PRAGMA data_version` read.
 */
import assert from "node:assert/strict";
import { join } from "node:path";
import { openSqliteStore } from "../../../api/store/sqlite.ts";
import type { Viewer } from "../../../api/store/types.ts";
import { at, makeSeries } from "./store_suite.ts";

const other: Viewer = { owner: "other", group: null, admin: false };
const holder = { owner: "alice", visibility: "private" as const };
/** A macrotask boundary: every microtask queued so far has run. */
const nextTask = () => new Promise((r) => setTimeout(r, 0));

Deno.test("SQLite access checks see own writes at once, other connections' by the next task", async () => {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-holdings-" });
  const path = join(dir, "store.db");
  const a = await openSqliteStore({ path });
  const b = await openSqliteStore({ path });
  try {
    const s = makeSeries("holdings version");
    await a.putOwner({
      id: "alice",
      name: "Alice",
      role: "writer",
      group: "g1",
      created_at: at(0),
    });
    await a.putSeries(s, holder);
    await nextTask();
    assert.equal(await a.seriesHolding(s.id, other), null);

    // this connection's write: seen by the very next check, in the same synchronous run
    const shared = a.setSeriesVisibility(s.id, "alice", "public");
    const seen = a.seriesHolding(s.id, other);
    assert.equal(await shared, true);
    assert.equal((await seen)?.visibility, "public");

    // another connection's commit, then a check in the same run as a check made before it:
    // the two are taken as concurrent, one data_version read answers both
    await nextTask();
    const before = a.seriesHolding(s.id, other);
    const hidden = b.setSeriesVisibility(s.id, "alice", "private");
    const together = a.seriesHolding(s.id, other);
    assert.equal(await hidden, true);
    assert.equal((await before)?.visibility, "public");
    assert.equal((await together)?.visibility, "public");
    // ... and any check after the next checkpoint sees it
    await nextTask();
    assert.equal(await a.seriesHolding(s.id, other), null);
    // a check with no check before it in its run reads data_version itself
    await b.setSeriesVisibility(s.id, "alice", "public");
    assert.equal((await a.seriesHolding(s.id, other))?.visibility, "public");
    // a write of this connection that fails (no such owner) and rolls back changes nothing
    await nextTask();
    await assert.rejects(a.putSeries(s, { owner: "nobody", visibility: "private" }));
    assert.equal((await a.seriesHolding(s.id, other))?.visibility, "public");
  } finally {
    await a.close();
    await b.close();
    await Deno.remove(dir, { recursive: true });
  }
});
