/**
 * The embedded queue: a run is handed to this process' handler at once. Queued runs do not
 * survive the process, so the start-up sweep fails the ones a previous process left.
 *
 * @module
 */
import type { QueueStats, RunHandler, RunQueue } from "./types.ts";

export class InProcessQueue implements RunQueue {
  readonly engine = "in-process";
  readonly volatile = true;
  #handler: RunHandler | null = null;
  readonly #pending = new Set<Promise<void>>();
  readonly #waiting: { id: string; at: number }[] = [];

  enqueue(runId: string): Promise<void> {
    if (!this.#handler) {
      this.#waiting.push({ id: runId, at: Date.now() });
      return Promise.resolve();
    }
    this.#start(runId);
    return Promise.resolve();
  }

  #start(runId: string): void {
    const p = this.#handler!(runId).then(() => {}, () => {});
    this.#pending.add(p);
    p.finally(() => this.#pending.delete(p));
  }

  work(handler: RunHandler): Promise<void> {
    this.#handler = handler;
    for (const w of this.#waiting.splice(0)) this.#start(w.id);
    return Promise.resolve();
  }

  stats(): Promise<QueueStats> {
    const oldest = this.#waiting[0]?.at;
    return Promise.resolve({
      depth: this.#waiting.length,
      active: this.#pending.size,
      oldest_seconds: oldest === undefined ? null : (Date.now() - oldest) / 1000,
      workers_seen: this.#handler ? 1 : 0,
    });
  }

  async settle(): Promise<void> {
    while (this.#pending.size) await Promise.all([...this.#pending]);
  }

  async close(): Promise<void> {
    await this.settle();
  }
}
