/**
 * The SQLite file store's writer worker (api/store/sqlite_writer.ts): a large series and a
 * field's blocks are written there, through another connection, and read back exactly by the
 * store's own connection; an error there keeps its class.
 *
 * @module
 */
import assert from "node:assert/strict";
import { openSqliteStore } from "../../../api/store/sqlite.ts";
import { OFFLOAD_POINTS } from "../../../api/store/sqlite_writer.ts";
import { makeSeries } from "./store_suite.ts";
import { storeField } from "./field_store_suite.ts";

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
