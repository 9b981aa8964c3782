/**
 * The SQLite file store's writer worker (api/store/sqlite_writer.ts): a large series and a
 * field's blocks are written there, through another connection, and read back exactly by the
 * store's own connection; an error there keeps its class.
 *
 * @module
 */
import assert from "node:assert/strict";
import { openSqliteStore } from "../../../api/store/sqlite.ts";
import { OFFLOAD_POINTS, SqliteWriter } from "../../../api/store/sqlite_writer.ts";
import { DuplicateRunError, MissingInputError } from "../../../api/store/errors.ts";
import { DEFAULT_HOLDER } from "../../../api/store/common.ts";
import { LARGE_RESULT_BYTES, lazyResult, resultBytesOf } from "../../../api/store/result_text.ts";
import { makeRun, makeSeries } from "./store_suite.ts";
import { fieldId, makeFieldStaging, storeField } from "./field_store_suite.ts";

Deno.test("SqliteWriter: large series and field blocks written in the worker read back exactly; errors keep their class", async (t) => {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-writer-" });
  const store = await openSqliteStore({ path: `${dir}/store.db` });
  try {
    await t.step("a series over the offload threshold", async () => {
      const s = makeSeries("writer", { n: OFFLOAD_POINTS + 10 });
      const put = await store.putSeries(s);
      assert.equal(put.created, true);
      const back = await store.getSeries(s.id);
      assert.ok(back);
      assert.deepEqual(Array.from(back.value), Array.from(s.value));
      assert.equal((await store.putSeries(s)).created, false);
    });
    await t.step("a field's blocks", async () => {
      const { id, values, staging } = await storeField(store, "writer", {
        nTime: 7,
        blockRows: 3,
      });
      const back = await store.readFieldSteps(id, 0, staging.n_time);
      assert.deepEqual(Array.from(back), Array.from(values));
    });
    await t.step(
      "a block of the wrong shape is a RangeError, as in the request thread",
      async () => {
        const { staging } = await storeField(store, "writer-2", { nTime: 4, blockRows: 2 });
        const stage = await store.beginField({ ...staging, name: "another" });
        await assert.rejects(
          () => store.putFieldBlock(stage, 0, 0, 2, new Float32Array(3)),
          RangeError,
        );
        await store.abortField(stage);
      },
    );
  } finally {
    await store.close();
    await Deno.remove(dir, { recursive: true });
  }
});

Deno.test("SqliteStore: a field upload runs without the automatic WAL checkpoint until its last concurrent upload is committed or aborted", async () => {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-writer-" });
  const store = await openSqliteStore({ path: `${dir}/store.db` });
  const memory = await openSqliteStore({ path: ":memory:" });
  const auto = (s = store) => s.settings().wal_autocheckpoint;
  const blocks = async (s: typeof store, stage: number, label: string) => {
    const { staging, values } = makeFieldStaging(label, { nTime: 5, blockRows: 2 });
    const per = staging.n_lat * staging.n_lon;
    for (let b = 0, t = 0; t < 5; b++, t += 2) {
      const rows = Math.min(2, 5 - t);
      await s.putFieldBlock(stage, b, t, rows, values.slice(t * per, (t + rows) * per));
    }
  };
  try {
    assert.equal(auto(), 1000);
    const a = await store.beginField(makeFieldStaging("a", { nTime: 5, blockRows: 2 }).staging);
    assert.equal(auto(), 0);
    const b = await store.beginField(makeFieldStaging("b", { nTime: 5, blockRows: 2 }).staging);
    await blocks(store, a, "a");
    await blocks(store, b, "b");
    await store.commitField(a, fieldId("a"));
    assert.equal(auto(), 0, "another upload is still in progress");
    await store.abortField(b);
    assert.equal(auto(), 1000);
    // a failed commit (a block missing), then the abort that follows it
    const c = await store.beginField(makeFieldStaging("c", { nTime: 5, blockRows: 2 }).staging);
    await assert.rejects(() => store.commitField(c, fieldId("c")), RangeError);
    assert.equal(auto(), 0);
    await store.abortField(c);
    assert.equal(auto(), 1000);
    assert.ok(await store.getField(fieldId("a")));
    assert.equal(await store.getField(fieldId("b")), null);
    assert.equal(await store.dropStagedFields(-1), 0);
    // without a writer worker (in memory), commits checkpoint as usual
    const m = await memory.beginField(makeFieldStaging("m", { nTime: 5, blockRows: 2 }).staging);
    assert.equal(auto(memory), 1000);
    await blocks(memory, m, "m");
    await memory.commitField(m, fieldId("m"));
    assert.equal(auto(memory), 1000);
  } finally {
    await store.close();
    await memory.close();
    await Deno.remove(dir, { recursive: true });
  }
});

Deno.test("SqliteWriter: a run with a result over the offload threshold is inserted in the worker, read back byte for byte, and its errors keep their class", async () => {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-writer-" });
  const store = await openSqliteStore({ path: `${dir}/store.db` });
  const sent: string[] = [];
  const original = SqliteWriter.prototype.putRun;
  SqliteWriter.prototype.putRun = function (r, bytes, holder) {
    sent.push(r.id);
    return original.call(this, r, bytes, holder);
  };
  try {
    // a result just over the threshold, and one just under it (written in this thread)
    const big = new TextEncoder().encode(
      JSON.stringify({ values: Array.from({ length: LARGE_RESULT_BYTES / 4 }, (_, i) => i) }),
    );
    assert.ok(big.length >= LARGE_RESULT_BYTES);
    const run = { ...makeRun("large"), result: lazyResult(big) };
    await store.putOwner({
      id: "alice",
      name: "alice",
      role: "writer",
      group: "lab",
      created_at: "2026-01-01T00:00:00Z",
    });
    const owner = { owner: "alice", visibility: "private" as const };
    await store.putRun(run, owner);
    assert.deepEqual(sent, [run.id]);
    const back = await store.getRun(run.id);
    assert.ok(back);
    assert.deepEqual(resultBytesOf(back.result), big);
    assert.equal(back.result_digest, run.result_digest);
    const alice = { owner: "alice", group: "lab", admin: false };
    assert.equal((await store.runHolding(run.id, alice))?.visibility, "private");
    // the caller's bytes are its own still (a copy was transferred)
    assert.equal(resultBytesOf(run.result)!.length, big.length);
    // bytes in shared memory (as a compute worker makes a large result's) are read as they are
    const shared = new Uint8Array(new SharedArrayBuffer(big.length));
    shared.set(big);
    const sharedRun = { ...makeRun("large, shared"), result: lazyResult(shared) };
    await store.putRun(sharedRun, owner);
    assert.deepEqual(
      resultBytesOf((await store.getRun(sharedRun.id))!.result),
      big,
    );
    assert.equal(resultBytesOf(sharedRun.result), shared);

    await assert.rejects(() => store.putRun(run, owner), DuplicateRunError);
    const orphan = {
      ...makeRun("orphan", { inputSeries: [makeSeries("never stored").id] }),
      result: lazyResult(big),
    };
    const err = await store.putRun(orphan).then(() => null, (e) => e);
    assert.ok(err instanceof MissingInputError, String(err));
    assert.equal(err.inputKind, "series");
    assert.equal(await store.getRun(orphan.id), null);
    await assert.rejects(
      () =>
        store.putRun({ ...makeRun("bad"), result: lazyResult(big) }, {
          owner: "alice",
          visibility: "everyone" as never,
        }),
      RangeError,
    );

    const small = {
      ...makeRun("small"),
      result: lazyResult(big.slice(0, LARGE_RESULT_BYTES - 1)),
    };
    await store.putRun(small);
    assert.ok(await store.getRun(small.id));
    // the duplicate and the orphan went to the worker; the bad visibility and the small one not
    assert.deepEqual(sent, [run.id, sharedRun.id, run.id, orphan.id]);
  } finally {
    SqliteWriter.prototype.putRun = original;
    await store.close();
    await Deno.remove(dir, { recursive: true });
  }
});

Deno.test("SqliteWriter: after a large run the worker ends once idle, and the next write starts another", async () => {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-writer-" });
  const path = `${dir}/store.db`;
  // the schema, and a connection of this thread that reads what the worker wrote
  const store = await openSqliteStore({ path, offload: false });
  const writer = new SqliteWriter(path, 10_000, new SharedArrayBuffer(4), 50);
  const bytes = (label: string) =>
    new TextEncoder().encode(JSON.stringify({ label, values: [1, 2, 3] }));
  try {
    const a = { ...makeRun("retire a"), result: lazyResult(bytes("a")) };
    await writer.putRun(a, bytes("a"), DEFAULT_HOLDER);
    assert.equal(writer.running, true);
    await new Promise((r) => setTimeout(r, 200));
    assert.equal(writer.running, false, "retired once idle");
    // a series write alone does not retire it
    await writer.putSeries(makeSeries("retire", { n: 10 }), DEFAULT_HOLDER);
    await new Promise((r) => setTimeout(r, 200));
    assert.equal(writer.running, true);
    const b = { ...makeRun("retire b"), result: lazyResult(bytes("b")) };
    await writer.putRun(b, bytes("b"), DEFAULT_HOLDER);
    assert.deepEqual(resultBytesOf((await store.getRun(a.id))!.result), bytes("a"));
    assert.deepEqual(resultBytesOf((await store.getRun(b.id))!.result), bytes("b"));
  } finally {
    await writer.close();
    await store.close();
    await Deno.remove(dir, { recursive: true });
  }
});
