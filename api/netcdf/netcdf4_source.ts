/**
 * NetCDF-4 (HDF5) files, read by h5wasm in a dedicated Web Worker (`h5_worker.ts`).
 *
 * One worker serves every NetCDF-4 read of the process, one request at a time (the HDF5
 * library is not thread-safe and keeps its own global state). Each request has a deadline; a
 * request that passes it (a damaged file can make the library loop) or a worker that dies (the
 * library can abort on a damaged file) fails its requests with a `NetcdfError` and the worker
 * is replaced on the next request. The worker starts on first use (about 0.1 s to load the
 * WebAssembly module).
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
  dead = false;

  constructor() {
    this.worker = new Worker(new URL("./h5_worker.ts", import.meta.url).href, { type: "module" });
    let markReady!: () => void, fail!: (e: unknown) => void;
    this.ready = new Promise<void>((res, rej) => {
      markReady = res;
      fail = rej;
    });
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
    if (shared === this) shared = null;
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

let shared: H5Worker | null = null;
/** Requests queue here: one at a time per worker. */
let queue: Promise<unknown> = Promise.resolve();

function worker(): H5Worker {
  if (!shared || shared.dead) shared = new H5Worker();
  return shared;
}

function serial<T>(f: () => Promise<T>): Promise<T> {
  const run = queue.then(f, f);
  queue = run.catch(() => undefined);
  return run;
}

/**
 * Stop the NetCDF-4 worker (tests and shutdown). A later read starts a new one.
 */
export function stopNetcdf4Worker(): void {
  shared?.kill(new NetcdfError("timeout", "The NetCDF-4 reader was stopped"));
  shared = null;
}

/**
 * Open a NetCDF-4 file (read only).
 *
 * @param path the file
 * @returns the open source
 * @throws {NetcdfError} `corrupt` when HDF5 cannot open it, `timeout` when it takes too long
 */
export async function openNetcdf4(path: string): Promise<NetcdfSource> {
  return await serial(async () => {
    const w = worker();
    const r = await w.call({ op: "open", path }, NETCDF4_TIMEOUT_SECONDS.open);
    if (!r.ok) {
      throw new NetcdfError(
        "corrupt",
        "The file has the HDF5 signature of NetCDF-4 but its structure cannot be read",
      );
    }
    return new Netcdf4Source(w, r.handle as number, r.header as NetcdfHeader);
  });
}

class Netcdf4Source implements NetcdfSource {
  constructor(
    private readonly w: H5Worker,
    private readonly handle: number,
    readonly header: NetcdfHeader,
  ) {}

  async read(name: string, start?: number, rows?: number): Promise<StoredValues> {
    const v: NetcdfVariableInfo = variableOf(this.header, name);
    if (v.type === "string" || (v.type as string) === "compound") {
      throw new NetcdfError("not_numeric", `Variable "${name}" does not hold numbers`, {
        variable: name,
      });
    }
    const [s, n] = rowBlock(v, start, rows);
    return await serial(async () => {
      if (this.w.dead) {
        throw new NetcdfError("corrupt", "The NetCDF-4 reader stopped on this file");
      }
      const r = await this.w.call(
        { op: "read", handle: this.handle, name, start: s, rows: n, total: v.shape[0] ?? 1 },
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
    if (this.w.dead) return;
    await serial(async () => {
      if (!this.w.dead) await this.w.call({ op: "close", handle: this.handle }, 10);
    }).catch(() => undefined);
  }
}
