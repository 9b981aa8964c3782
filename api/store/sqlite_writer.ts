/**
 * Large series writes off the request thread. `node:sqlite` is synchronous: writing a series of
 * a million points (24 MB of blobs, then the fsync of `synchronous = FULL`) holds the thread
 * that calls it for a few hundred milliseconds, and health checks wait behind it. A file store
 * therefore hands series above {@link OFFLOAD_POINTS} points to a Web Worker holding its own
 * connection to the same file (WAL lets readers go on meanwhile; writers take turns through
 * `BEGIN IMMEDIATE` and the busy timeout). The same `SqliteStore.putSeries` runs there, so the
 * result is the same as in the calling thread.
 *
 * @module
 */
import type { HolderSpec, SeriesMeta, StoredSeries } from "./types.ts";

/** Series with more points than this are written by the writer worker. */
export const OFFLOAD_POINTS = 50_000;

type Pending = {
  resolve(v: { created: boolean; series: SeriesMeta }): void;
  reject(e: Error): void;
};

/** A worker that writes large series to the SQLite file at `path`. */
export class SqliteWriter {
  #worker: Worker | null = null;
  #pending = new Map<number, Pending>();
  #next = 1;

  constructor(readonly path: string, readonly busyTimeoutMs: number) {}

  #start(): Worker {
    const w = new Worker(new URL("./sqlite_writer_worker.ts", import.meta.url).href, {
      type: "module",
    });
    w.onmessage = (e) => {
      if (e.data?.type === "checkpointed") {
        this.#checkpointQueued = false;
        return;
      }
      const m = e.data as {
        id: number;
        ok: boolean;
        value?: { created: boolean; series: SeriesMeta };
        error?: { name: string; message: string };
      };
      const p = this.#pending.get(m.id);
      this.#pending.delete(m.id);
      if (!p) return;
      if (m.ok) p.resolve(m.value!);
      else p.reject(Object.assign(new Error(m.error!.message), { name: m.error!.name }));
    };
    w.onerror = (e) => {
      e.preventDefault();
      for (const p of this.#pending.values()) {
        p.reject(new Error(`series writer failed: ${e.message}`));
      }
      this.#pending.clear();
      this.#checkpointQueued = false;
      w.terminate();
      this.#worker = null;
    };
    w.postMessage({ type: "open", path: this.path, busyTimeoutMs: this.busyTimeoutMs });
    return w;
  }

  /** Write `s` for `holder` in the worker (the arrays are copied, the caller keeps its own). */
  putSeries(
    s: StoredSeries,
    holder: HolderSpec,
  ): Promise<{ created: boolean; series: SeriesMeta }> {
    this.#worker ??= this.#start();
    const id = this.#next++;
    return new Promise((resolve, reject) => {
      this.#pending.set(id, { resolve, reject });
      this.#worker!.postMessage({ type: "put", id, series: s, holder });
    });
  }

  /**
   * Ask the worker to checkpoint the WAL (PASSIVE) after a large commit on another connection
   * (see `SqliteStore`); requests already queued coalesce into one.
   */
  checkpoint(): void {
    if (this.#checkpointQueued) return;
    this.#checkpointQueued = true;
    this.#worker ??= this.#start();
    this.#worker.postMessage({ type: "checkpoint" });
  }

  #checkpointQueued = false;

  /** Stop the worker (after the writes in flight). */
  async close(): Promise<void> {
    const w = this.#worker;
    this.#worker = null;
    if (!w) return;
    if (this.#pending.size) {
      await Promise.allSettled(
        [...this.#pending.values()].map((p) =>
          new Promise<void>((done) => {
            const { resolve, reject } = p;
            p.resolve = (v) => (resolve(v), done());
            p.reject = (e) => (reject(e), done());
          })
        ),
      );
    }
    w.terminate();
  }
}
