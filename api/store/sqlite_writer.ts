/**
 * Large series writes off the request thread. `node:sqlite` is synchronous: writing a series of
 * a million points (24 MB of blobs, then the fsync of `synchronous = FULL`) holds the thread
 * that calls it for a few hundred milliseconds, and health checks wait behind it. A file store
 * therefore hands series above {@link OFFLOAD_POINTS} points to a Web Worker holding its own
 * connection to the same file (WAL lets readers go on meanwhile; writers take turns through
 * `BEGIN IMMEDIATE` and the busy timeout). The same `SqliteStore.putSeries` runs there, so the
 * result is the same as in the calling thread. A run whose result is large (a daily
 * reconstruction's 38 MB) is written there as well, by `SqliteStore.putRun`: its commit no longer
 * holds the request thread (100-120 ms), which meanwhile sends the response (see
 * api/runs/service.ts `submit`). A field upload's blocks (4 MiB each) go the same
 * way, so the request thread hashes one block while the worker writes the one before.
 *
 * @module
 */
import type { HolderSpec, RunRecord, SeriesMeta, StoredSeries } from "./types.ts";
import { DuplicateRunError, MissingInputError } from "./errors.ts";

/** Series with more points than this are written by the writer worker. */
export const OFFLOAD_POINTS = 50_000;

/**
 * After writing a large run the worker ends once it has been idle this long, ms (a fresh one
 * starts with the next write): an idle thread collects no garbage, and it would keep the last
 * large results' bytes (38 MB each for a daily reconstruction) as long as it lives.
 */
export const RETIRE_IDLE_MS = 5000;

type Pending = {
  // deno-lint-ignore no-explicit-any
  resolve(v: any): void;
  reject(e: Error): void;
};

/** An error as it crosses from the worker: its name, message and the fields its class needs. */
export interface WorkerError {
  name: string;
  message: string;
  runId?: string;
  inputKind?: "series" | "run" | "field";
  inputId?: string;
}

/** `err` as a {@link WorkerError}. */
export function workerError(err: unknown): WorkerError {
  const e = err as Partial<WorkerError> | undefined;
  return {
    name: e?.name ?? "Error",
    message: String(e?.message ?? err),
    ...(typeof e?.runId === "string" ? { runId: e.runId } : {}),
    ...(typeof e?.inputKind === "string" ? { inputKind: e.inputKind } : {}),
    ...(typeof e?.inputId === "string" ? { inputId: e.inputId } : {}),
  };
}

/**
 * The worker's error as the class it had (the store's run errors, RangeError, TypeError), else
 * an Error of that name.
 */
function rebuildError(e: WorkerError): Error {
  if (e.name === "DuplicateRunError" && e.runId) return new DuplicateRunError(e.runId);
  if (e.name === "MissingInputError" && e.runId && e.inputKind && e.inputId) {
    return new MissingInputError(e.runId, e.inputKind, e.inputId);
  }
  const Kind = e.name === "RangeError" ? RangeError : e.name === "TypeError" ? TypeError : Error;
  const out = new Kind(e.message);
  if (out.name !== e.name) out.name = e.name;
  return out;
}

/** A worker that writes large series and field blocks to the SQLite file at `path`. */
export class SqliteWriter {
  #worker: Worker | null = null;
  #pending = new Map<number, Pending>();
  #next = 1;

  /**
   * @param writeCounter the buffer of the file's write counter in the opening thread
   *   (api/store/sqlite_changes.ts): the worker's connection counts its writes there
   */
  constructor(
    readonly path: string,
    readonly busyTimeoutMs: number,
    readonly writeCounter: SharedArrayBuffer = new SharedArrayBuffer(4),
    readonly retireIdleMs: number = RETIRE_IDLE_MS,
  ) {}

  /** True while a worker thread is running (it starts on the first write). */
  get running(): boolean {
    return this.#worker !== null;
  }

  /** A large run was written since the worker started: retire it once idle. */
  #wroteLarge = false;
  #retireTimer: ReturnType<typeof setTimeout> | undefined;

  #idle(): void {
    if (!this.#wroteLarge || this.#pending.size > 0 || this.#checkpointQueued) return;
    clearTimeout(this.#retireTimer);
    const timer = setTimeout(() => this.#retire(), this.retireIdleMs);
    // a service that is stopping does not wait for it
    Deno.unrefTimer(timer as unknown as number);
    this.#retireTimer = timer;
  }

  #retire(): void {
    this.#retireTimer = undefined;
    const w = this.#worker;
    if (!w || this.#pending.size > 0 || this.#checkpointQueued) return;
    this.#worker = null;
    this.#wroteLarge = false;
    // it closes its connection, then its thread; the next write starts another
    w.postMessage({ type: "close" });
  }

  #start(): Worker {
    const w = new Worker(new URL("./sqlite_writer_worker.ts", import.meta.url).href, {
      type: "module",
    });
    w.onmessage = (e) => {
      if (e.data?.type === "checkpointed") {
        this.#checkpointQueued = false;
        if (w === this.#worker) this.#idle();
        return;
      }
      const m = e.data as {
        id: number;
        ok: boolean;
        value?: unknown;
        error?: WorkerError;
      };
      const p = this.#pending.get(m.id);
      this.#pending.delete(m.id);
      if (!p) return;
      if (m.ok) p.resolve(m.value!);
      else p.reject(rebuildError(m.error!));
      if (w === this.#worker) this.#idle();
    };
    w.onerror = (e) => {
      e.preventDefault();
      for (const p of this.#pending.values()) {
        p.reject(new Error(`SQLite writer failed: ${e.message}`));
      }
      this.#pending.clear();
      this.#checkpointQueued = false;
      w.terminate();
      this.#worker = null;
    };
    w.postMessage({
      type: "open",
      path: this.path,
      busyTimeoutMs: this.busyTimeoutMs,
      writeCounter: this.writeCounter,
    });
    return w;
  }

  #send<T>(message: Record<string, unknown>, transfer: Transferable[] = []): Promise<T> {
    clearTimeout(this.#retireTimer);
    this.#worker ??= this.#start();
    const id = this.#next++;
    return new Promise((resolve, reject) => {
      this.#pending.set(id, { resolve, reject });
      this.#worker!.postMessage({ ...message, id }, transfer);
    });
  }

  /** Write `s` for `holder` in the worker (the arrays are copied, the caller keeps its own). */
  putSeries(
    s: StoredSeries,
    holder: HolderSpec,
  ): Promise<{ created: boolean; series: SeriesMeta }> {
    return this.#send({ type: "put", series: s, holder });
  }

  /**
   * Insert the run `r` for `holder` in the worker (`SqliteStore.putRun` there), its result given
   * as its canonical bytes (the caller keeps its own). Bytes in shared memory (a large result,
   * api/store/result_text.ts) are read there as they are; other bytes are copied here and the
   * copy transferred (for 38 MB: 14 ms in this thread and 1 ms in the worker, against 14 ms in
   * each for a structured clone).
   */
  putRun(r: RunRecord, bytes: Uint8Array, holder: HolderSpec): Promise<void> {
    const run = { ...r, result: null };
    this.#wroteLarge = true;
    if (bytes.buffer instanceof SharedArrayBuffer) {
      return this.#send({ type: "run", run, bytes, holder });
    }
    const copy = bytes.slice();
    return this.#send({ type: "run", run, bytes: copy, holder }, [copy.buffer]);
  }

  /**
   * Write one block of a staged field in the worker (`SqliteStore.putFieldBlock` there; the
   * values are copied). An upload's blocks then go to the file while the request thread hashes
   * the next one and the NetCDF reader decodes the one after.
   */
  putFieldBlock(
    stage: number,
    index: number,
    tStart: number,
    rows: number,
    values: Float32Array,
  ): Promise<void> {
    return this.#send({ type: "field-block", stage, index, tStart, rows, values });
  }

  /**
   * Ask the worker to checkpoint the WAL (PASSIVE) after a large commit on another connection
   * (see `SqliteStore`); requests already queued coalesce into one.
   */
  checkpoint(): void {
    clearTimeout(this.#retireTimer);
    if (this.#checkpointQueued) return;
    this.#checkpointQueued = true;
    this.#worker ??= this.#start();
    this.#worker.postMessage({ type: "checkpoint" });
  }

  #checkpointQueued = false;

  /** Stop the worker (after the writes in flight). */
  async close(): Promise<void> {
    clearTimeout(this.#retireTimer);
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
