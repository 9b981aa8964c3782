/**
 * The series writer worker (see api/store/sqlite_writer.ts): `{ type: "open", path,
 * busyTimeoutMs, writeCounter }`, then
 * `{ type: "put", id, series, holder }`, `{ type: "run", id, run, bytes, holder }` (the run
 * without its result, and the result's canonical bytes) or
 * `{ type: "field-block", id, stage, index, tStart, rows, values }` → `{ id, ok, value | error }`;
 * `{ type: "checkpoint" }` → `{ type: "checkpointed" }` (a PASSIVE WAL checkpoint; a failure is
 * left to the next one); `{ type: "close" }` closes the connection, then this thread.
 *
 * @module
 */
/// <reference lib="deno.worker" />
import { openSqliteStore, type SqliteStore } from "./sqlite.ts";
import { workerError } from "./sqlite_writer.ts";
import { lazyResult } from "./result_text.ts";

let store: Promise<SqliteStore> | null = null;

self.onmessage = async (e: MessageEvent) => {
  const m = e.data;
  if (m.type === "open") {
    store = openSqliteStore({
      path: m.path,
      busyTimeoutMs: m.busyTimeoutMs,
      offload: false,
      // a large result's commit skips the automatic checkpoint; this thread does it after
      checkpointLater: true,
      // its writes are counted where the request thread's access checks look
      writeCounter: new Int32Array(m.writeCounter),
    });
    return;
  }
  if (m.type === "close") {
    try {
      await (await store)?.close();
    } finally {
      self.close();
    }
    return;
  }
  if (m.type === "checkpoint") {
    try {
      (await store!).checkpointWal();
    } catch {
      // busy or closing: the next commit's automatic checkpoint does it
    }
    self.postMessage({ type: "checkpointed" });
    return;
  }
  if (m.type === "put" || m.type === "field-block" || m.type === "run") {
    try {
      const s = await store!;
      const value = m.type === "put"
        ? await s.putSeries(m.series, m.holder)
        : m.type === "run"
        ? await s.putRun({ ...m.run, result: lazyResult(m.bytes) }, m.holder)
        : await s.putFieldBlock(m.stage, m.index, m.tStart, m.rows, m.values);
      self.postMessage({ id: m.id, ok: true, value });
    } catch (err) {
      self.postMessage({ id: m.id, ok: false, error: workerError(err) });
    }
  }
};
