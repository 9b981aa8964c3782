/**
 * The series writer worker (see api/store/sqlite_writer.ts): `{ type: "open", path,
 * busyTimeoutMs, writeCounter }`, then
 * `{ type: "put", id, series, holder }` or
 * `{ type: "field-block", id, stage, index, tStart, rows, values }` → `{ id, ok, value | error }`;
 * `{ type: "checkpoint" }` → `{ type: "checkpointed" }` (a PASSIVE WAL checkpoint; a failure is
 * left to the next one).
 *
 * @module
 */
/// <reference lib="deno.worker" />
import { openSqliteStore, type SqliteStore } from "./sqlite.ts";

let store: Promise<SqliteStore> | null = null;

self.onmessage = async (e: MessageEvent) => {
  const m = e.data;
  if (m.type === "open") {
    store = openSqliteStore({
      path: m.path,
      busyTimeoutMs: m.busyTimeoutMs,
      offload: false,
      // its writes are counted where the request thread's access checks look
      writeCounter: new Int32Array(m.writeCounter),
    });
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
  if (m.type === "put" || m.type === "field-block") {
    try {
      const s = await store!;
      const value = m.type === "put"
        ? await s.putSeries(m.series, m.holder)
        : await s.putFieldBlock(m.stage, m.index, m.tStart, m.rows, m.values);
      self.postMessage({ id: m.id, ok: true, value });
    } catch (err) {
      const error = {
        name: (err as Error)?.name ?? "Error",
        message: String((err as Error)?.message ?? err),
      };
      self.postMessage({ id: m.id, ok: false, error });
    }
  }
};
