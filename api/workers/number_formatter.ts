/**
 * A second thread for a compute worker's largest serialisations: while the worker writes a
 * large result's canonical JSON (api/runs/json.ts `canonicalJsonBytesParallel`), this thread
 * formats about two fifths of its long arrays of numbers. Formatting numbers is most of that
 * work (a 153,000-day reconstruction: 3.2 million numbers, 38 MB), and the worker's own thread
 * is the only one busy meanwhile. The thread is started on first use and ends with the worker
 * that made it.
 *
 * @module
 */
import type { NumberFormatter } from "../runs/json.ts";

/** A formatter thread; {@link NumberFormatterThread.format} is a `NumberFormatter`. */
export class NumberFormatterThread {
  #worker: Worker | null = null;
  #next = 1;
  #waiting = new Map<number, { resolve(b: Uint8Array[]): void; reject(e: Error): void }>();

  #start(): Worker {
    const w = new Worker(new URL("./number_format_worker.ts", import.meta.url).href, {
      type: "module",
    });
    w.onmessage = (e) => {
      const m = e.data as { id: number; bytes?: Uint8Array[]; error?: string };
      const p = this.#waiting.get(m.id);
      this.#waiting.delete(m.id);
      if (m.bytes) p?.resolve(m.bytes);
      else p?.reject(new Error(`number formatter: ${m.error}`));
    };
    w.onerror = (e) => {
      e.preventDefault();
      for (const p of this.#waiting.values()) p.reject(new Error(`number formatter: ${e.message}`));
      this.#waiting.clear();
      w.terminate();
      this.#worker = null;
    };
    return w;
  }

  /** Start the thread now (it is otherwise started by the first `format`). */
  start(): void {
    this.#worker ??= this.#start();
  }

  /** The arrays' JSON texts as UTF-8 bytes, made in the thread (the arrays are transferred). */
  readonly format: NumberFormatter = (arrays) => {
    this.#worker ??= this.#start();
    const id = this.#next++;
    return new Promise((resolve, reject) => {
      this.#waiting.set(id, { resolve, reject });
      this.#worker!.postMessage({ id, arrays }, arrays.map((a) => a.buffer));
    });
  };

  /** End the thread. */
  close(): void {
    this.#worker?.terminate();
    this.#worker = null;
    for (const p of this.#waiting.values()) p.reject(new Error("number formatter closed"));
    this.#waiting.clear();
  }
}
