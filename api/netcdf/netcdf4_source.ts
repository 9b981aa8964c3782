/**
 * NetCDF-4 (HDF5) files, read by h5wasm in dedicated Web Workers (`h5_worker.ts`).
 *
 * A small pool of workers ({@link NETCDF4_POOL}) serves every NetCDF-4 read of the process.
 * Each worker holds its own instance of the HDF5 library (which is not thread-safe and keeps
 * global state) and runs one request at a time. A file is opened in the first worker (its
 * header is read there); when a read comes while that worker is busy, the file is also opened
 * in the next one, so the blocks of a large variable decode in parallel (each block is read
 * whole and independently: the result does not depend on which worker read it). Each request
 * has a deadline; a request that passes it (a damaged file can make the library loop) or a
 * worker that dies (the library can abort on a damaged file) fails its requests with a
 * `NetcdfError` and the worker is replaced on the next request. A worker starts on first use
 * (loading the WebAssembly module takes about 0.3 s of CPU), or earlier through
 * {@link warmNetcdf4}.
 *
 * @module
 */
import type { NetcdfVariableInfo } from "../../core/cf/netcdf_model.ts";
import { NetcdfError } from "./errors.ts";
import {
  type NetcdfHeader,
  type NetcdfSource,
  rowBlock,
  type StoredValues,
  variableOf,
} from "./source.ts";

/** Seconds an open or a read may take before the worker is replaced. */
export const NETCDF4_TIMEOUT_SECONDS = { open: 20, read: 120 };

/**
 * Reader workers: one per two cores, at most two. On a 2-core machine one: a second reader
 * decodes blocks in parallel but competes with the upload's hashing and SQLite writer for the
 * same two cores; uploads of the 150 MB benchmark field were not measurably faster with it (9
 * alternating rounds of test/bench/field_upload_run.ts --readers=1 and 2: median wall-time ratio
 * 1.06, from 0.53 to 1.26) and took 0.2 to 0.3 s more CPU and about 65 MiB more peak memory.
 * Change it before the first read (tests, benchmarks).
 */
export const NETCDF4_POOL = {
  readers: Math.max(1, Math.min(2, Math.floor((navigator.hardwareConcurrency || 1) / 2))),
};

interface Pending {
  resolve(v: Record<string, unknown>): void;
  reject(e: unknown): void;
  timer: ReturnType<typeof setTimeout>;
}

class H5Worker {
  private worker: Worker;
  private ready: Promise<void>;
  private pending = new Map<number, Pending>();
  private nextId = 1;
  /** Requests run here one at a time, in order. */
  private queue: Promise<unknown> = Promise.resolve();
  /** Requests queued or running. */
  busy = 0;
  dead = false;

  constructor(private readonly slot: number) {
    this.worker = new Worker(new URL("./h5_worker.ts", import.meta.url).href, { type: "module" });
    let markReady!: () => void, fail!: (e: unknown) => void;
    this.ready = new Promise<void>((res, rej) => {
      markReady = res;
      fail = rej;
    });
    this.ready.catch(() => undefined); // a worker warmed and never used must not be unhandled
    this.worker.onmessage = (e) => {
      const m = e.data as Record<string, unknown>;
      if (m.ready) return markReady();
      const p = this.pending.get(m.id as number);
      if (!p) return;
      this.pending.delete(m.id as number);
      clearTimeout(p.timer);
      p.resolve(m);
    };
    this.worker.onerror = (e) => {
      e.preventDefault();
      fail(new NetcdfError("corrupt", "The NetCDF-4 reader stopped on this file"));
      this.kill(new NetcdfError("corrupt", "The NetCDF-4 reader stopped on this file"));
    };
  }

  kill(reason: NetcdfError): void {
    if (this.dead) return;
    this.dead = true;
    this.worker.terminate();
    for (const p of this.pending.values()) {
      clearTimeout(p.timer);
      p.reject(reason);
    }
    this.pending.clear();
    if (pool[this.slot] === this) pool[this.slot] = null;
  }

  /** Resolves when the WebAssembly module is loaded (rejects if the worker failed first). */
  started(): Promise<void> {
    return this.ready;
  }

  /** Run `f` after the requests queued before it (one at a time per worker). */
  serial<T>(f: () => Promise<T>): Promise<T> {
    this.busy++;
    const run = this.queue.then(f, f).finally(() => this.busy--);
    this.queue = run.catch(() => undefined);
    return run;
  }

  async call(
    msg: Record<string, unknown>,
    seconds: number,
    transfer: Transferable[] = [],
  ): Promise<Record<string, unknown>> {
    await this.ready;
    if (this.dead) throw new NetcdfError("corrupt", "The NetCDF-4 reader stopped on this file");
    const id = this.nextId++;
    return await new Promise((resolve, reject) => {
      const timer = setTimeout(() => {
        this.kill(
          new NetcdfError(
            "timeout",
            `Reading the NetCDF-4 file took more than ${seconds} s; it may be damaged`,
          ),
        );
      }, seconds * 1000);
      this.pending.set(id, { resolve, reject, timer });
      this.worker.postMessage({ ...msg, id }, transfer);
    });
  }
}

const pool: (H5Worker | null)[] = [];

function worker(slot: number): H5Worker {
  let w = pool[slot];
  if (!w || w.dead) pool[slot] = w = new H5Worker(slot);
  return w;
}

/**
 * Start the reader workers now, so that loading the WebAssembly module (about 0.3 s of CPU per
 * worker) overlaps with other work: an upload calls this when its first bytes show the HDF5
 * signature, while the rest of the body is still being written to disk.
 *
 * @returns resolves when they are ready (or failed: the next read starts new ones)
 */
export function warmNetcdf4(): Promise<void> {
  const started: Promise<void>[] = [];
  for (let i = 0; i < NETCDF4_POOL.readers; i++) started.push(worker(i).started());
  return Promise.all(started).then(() => undefined, () => undefined);
}

/**
 * Stop the NetCDF-4 workers (tests and shutdown). A later read starts new ones.
 */
export function stopNetcdf4Worker(): void {
  for (const w of [...pool]) w?.kill(new NetcdfError("timeout", "The NetCDF-4 reader was stopped"));
  pool.length = 0;
}

const CORRUPT = "The file has the HDF5 signature of NetCDF-4 but its structure cannot be read";

/**
 * Open a NetCDF-4 file (read only).
 *
 * @param path the file
 * @returns the open source
 * @throws {NetcdfError} `corrupt` when HDF5 cannot open it, `timeout` when it takes too long
 */
export async function openNetcdf4(path: string): Promise<NetcdfSource> {
  const w = worker(0);
  return await w.serial(async () => {
    const r = await w.call({ op: "open", path, header: true }, NETCDF4_TIMEOUT_SECONDS.open);
    if (!r.ok) throw new NetcdfError("corrupt", CORRUPT);
    return new Netcdf4Source(path, w, r.handle as number, r.header as NetcdfHeader);
  });
}

/** The file opened in one worker: the worker and the file's handle there. */
interface Opened {
  w: H5Worker;
  handle: Promise<number>;
}

class Netcdf4Source implements NetcdfSource {
  /** Where the file is open: the first worker, then others as reads overlap. */
  private readonly opened: Opened[];
  readonly concurrentReads = NETCDF4_POOL.readers;

  constructor(
    private readonly path: string,
    w: H5Worker,
    handle: number,
    readonly header: NetcdfHeader,
  ) {
    this.opened = [{ w, handle: Promise.resolve(handle) }];
  }

  /**
   * The worker for the next read: the first idle one where the file is open, else the file
   * opened in the next worker of the pool, else the least busy.
   */
  private pick(): Opened {
    const idle = this.opened.find((o) => o.w.busy === 0);
    if (idle) return idle;
    if (this.opened.length < NETCDF4_POOL.readers) {
      const w = worker(this.opened.length);
      const handle = w.serial(async () => {
        const r = await w.call({ op: "open", path: this.path }, NETCDF4_TIMEOUT_SECONDS.open);
        if (!r.ok) throw new NetcdfError("corrupt", CORRUPT);
        return r.handle as number;
      });
      handle.catch(() => undefined); // awaited by the read that opened it
      const o = { w, handle };
      this.opened.push(o);
      return o;
    }
    return this.opened.reduce((a, b) => (b.w.busy < a.w.busy ? b : a));
  }

  async read(name: string, start?: number, rows?: number): Promise<StoredValues> {
    const v: NetcdfVariableInfo = variableOf(this.header, name);
    if (v.type === "string" || (v.type as string) === "compound") {
      throw new NetcdfError("not_numeric", `Variable "${name}" does not hold numbers`, {
        variable: name,
      });
    }
    const [s, n] = rowBlock(v, start, rows);
    if (this.opened.some((o) => o.w.dead)) {
      throw new NetcdfError("corrupt", "The NetCDF-4 reader stopped on this file");
    }
    const { w, handle } = this.pick();
    return await w.serial(async () => {
      const h = await handle;
      if (w.dead) {
        throw new NetcdfError("corrupt", "The NetCDF-4 reader stopped on this file");
      }
      const r = await w.call(
        { op: "read", handle: h, name, start: s, rows: n, total: v.shape[0] ?? 1 },
        NETCDF4_TIMEOUT_SECONDS.read,
      );
      if (!r.ok) {
        throw new NetcdfError(
          r.error === "not_numeric" ? "not_numeric" : "corrupt",
          r.error === "not_numeric"
            ? `Variable "${name}" does not hold numbers`
            : `The data of variable "${name}" cannot be read (damaged or an unsupported filter)`,
          { variable: name },
        );
      }
      const values = r.values as StoredValues;
      const expected = v.shape.length ? n * v.shape.slice(1).reduce((a, b) => a * b, 1) : 1;
      if (values.length !== expected) {
        throw new NetcdfError(
          "corrupt",
          `Variable "${name}" returned ${values.length} values, expected ${expected}`,
          {
            variable: name,
          },
        );
      }
      return values;
    });
  }

  async close(): Promise<void> {
    await Promise.all(this.opened.map(async ({ w, handle }) => {
      if (w.dead) return;
      await w.serial(async () => {
        const h = await handle;
        if (!w.dead) await w.call({ op: "close", handle: h }, 10);
      }).catch(() => undefined);
    }));
  }
}
