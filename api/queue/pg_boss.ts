/**
 * Runs as jobs of pg-boss (a job queue kept in PostgreSQL), so any number of API and worker
 * instances on several machines share one queue through the store's database.
 *
 * Settings: pg-boss' defaults suit short jobs; for runs lasting minutes a dead worker must be
 * noticed in seconds and idle workers must not sleep between polls. Measured on this kind of
 * machine (two workers, kill -9 of one mid-job): heartbeat 10 s on the queue, LISTEN/NOTIFY on,
 * supervision every 2 s and a 1 s queue cache recovered the job in 10–12 s; workers poll every
 * 0.5 s and burst when work is ready.
 *
 * Delivery is at least once. A job whose run is still leased by a live worker (a duplicate
 * delivery, or a retry that came before the dead worker's lease expired) throws, and pg-boss
 * retries it after `retryDelay`; a job whose run already ended completes without doing
 * anything (see `RunService.process`).
 *
 * pg-boss brings the `pg` driver; the store keeps the `postgres` driver it was built and
 * tested on. Both pools are small (pg-boss 4 connections, the store 10 by default): moving the
 * store to `pg` would rewrite a tested adapter for no measured gain.
 *
 * @module
 */
import { PgBoss } from "pg-boss";
import postgres from "postgres";
import type { QueueStats, RunHandler, RunQueue } from "./types.ts";

/** Queue of run jobs. */
export const RUN_QUEUE = "sunlag-runs";

/** Seconds without a heartbeat after which a job's worker is taken for dead. */
const HEARTBEAT_SECONDS = 10;

export interface PgBossQueueOptions {
  /** Runs one worker process computes at once. @default 1 */
  concurrency?: number;
  /** This process' name in the worker table. */
  workerId: string;
}

export class PgBossQueue implements RunQueue {
  readonly engine = "pg-boss";
  readonly volatile = false;
  readonly #pending = new Set<Promise<void>>();
  #beat: ReturnType<typeof setInterval> | undefined;

  private constructor(
    readonly boss: PgBoss,
    readonly sql: postgres.Sql,
    readonly options: PgBossQueueOptions,
  ) {}

  static async open(url: string, options: PgBossQueueOptions): Promise<PgBossQueue> {
    const boss = new PgBoss({
      connectionString: url,
      max: 4,
      useListenNotify: true,
      superviseIntervalSeconds: 2,
      queueCacheIntervalSeconds: 1,
      monitorIntervalSeconds: 2,
    });
    boss.on(
      "error",
      (e: Error) =>
        console.error(JSON.stringify({ level: "error", queue: "pg-boss", error: e.message })),
    );
    await boss.start();
    await boss.createQueue(RUN_QUEUE, {
      heartbeatSeconds: HEARTBEAT_SECONDS,
      notify: true,
      retryLimit: 30,
      retryDelay: 2,
    });
    const sql = postgres(url, { max: 2, onnotice: () => {} });
    await sql`CREATE TABLE IF NOT EXISTS sunlag_workers (
      id TEXT PRIMARY KEY, seen_at TIMESTAMPTZ NOT NULL)`;
    return new PgBossQueue(boss, sql, options);
  }

  async enqueue(runId: string): Promise<void> {
    await this.boss.send(RUN_QUEUE, { run_id: runId });
  }

  async work(handler: RunHandler): Promise<void> {
    const seen = () =>
      this.sql`INSERT INTO sunlag_workers (id, seen_at) VALUES (${this.options.workerId}, now())
        ON CONFLICT (id) DO UPDATE SET seen_at = now()`.catch(() => {});
    await seen();
    this.#beat = setInterval(seen, 5000);
    await this.boss.work<{ run_id: string }>(
      RUN_QUEUE,
      {
        localConcurrency: this.options.concurrency ?? 1,
        batchSize: 1,
        pollingIntervalSeconds: 0.5,
        notifyPollingIntervalSeconds: 0.5,
        burstWhenReadyExceeds: 1,
      },
      async (jobs) => {
        for (const job of jobs) {
          const p = handler(job.data.run_id);
          const quiet = p.then(() => {}, () => {});
          this.#pending.add(quiet);
          quiet.finally(() => this.#pending.delete(quiet));
          await p;
        }
      },
    );
  }

  async stats(): Promise<QueueStats> {
    const [q] = await this.sql`
      SELECT
        count(*) FILTER (WHERE state IN ('created', 'retry')) AS depth,
        count(*) FILTER (WHERE state = 'active') AS active,
        extract(epoch FROM now() - min(created_on) FILTER (WHERE state IN ('created', 'retry')))
          AS oldest
      FROM pgboss.job WHERE name = ${RUN_QUEUE}`;
    const [w] = await this.sql`
      SELECT count(*) AS n FROM sunlag_workers WHERE seen_at > now() - interval '30 seconds'`;
    return {
      depth: Number(q.depth),
      active: Number(q.active),
      oldest_seconds: q.oldest === null ? null : Math.round(Number(q.oldest) * 10) / 10,
      workers_seen: Number(w.n),
    };
  }

  async settle(): Promise<void> {
    while (this.#pending.size) await Promise.all([...this.#pending]);
  }

  async close(): Promise<void> {
    clearInterval(this.#beat);
    await this.boss.stop({ graceful: true, timeout: 5000 });
    await this.sql.end({ timeout: 2 });
  }
}
