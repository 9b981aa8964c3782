/**
 * The queue that carries runs from the process that accepted them to a worker. Delivery is
 * at least once: a job may run twice (after a worker's death, or a duplicate delivery), so
 * the run's writes are leased and conditional (see `Store.claimRun`/`updateLeased`).
 *
 * @module
 */

/** What a worker does with one delivered run: resolve when done, throw to be retried later. */
export type RunHandler = (runId: string) => Promise<void>;

export interface QueueStats {
  /** Runs waiting for a worker. */
  depth: number;
  /** Runs being computed now. */
  active: number;
  /** Age of the oldest waiting run, seconds (null when none waits). */
  oldest_seconds: number | null;
  /** Workers seen by the queue recently. */
  workers_seen: number;
}

export interface RunQueue {
  /** "in-process" or "pg-boss". */
  readonly engine: string;
  /** True when queued runs die with this process (the start-up sweep may fail them). */
  readonly volatile: boolean;
  enqueue(runId: string): Promise<void>;
  /** Start taking runs (worker role). */
  work(handler: RunHandler): Promise<void>;
  stats(): Promise<QueueStats>;
  /** Wait for the runs this process is computing (tests, shutdown). */
  settle(): Promise<void>;
  close(): Promise<void>;
}
