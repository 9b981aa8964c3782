/**
 * The run transport a process uses, from its configuration: for a PostgreSQL store the pg-boss
 * queue, chunk jobs and LISTEN/NOTIFY events on the same database (any number of API and
 * worker instances); for SQLite this process' own queue and events (one process owns the file).
 *
 * @module
 */
import type { Config } from "../config.ts";
import type { RunTransport } from "../runs/service.ts";
import { LocalEventBus, PostgresEventBus } from "./events.ts";
import { InProcessQueue } from "./in_process.ts";
import { PgBossQueue } from "./pg_boss.ts";
import { PgChunkRouter } from "./chunks.ts";

export async function openTransport(config: Config, holder: string): Promise<RunTransport> {
  if (config.store.startsWith("postgres://") || config.store.startsWith("postgresql://")) {
    const queue = await PgBossQueue.open(config.store, {
      workerId: holder,
      concurrency: config.runConcurrency,
    });
    const events = await PostgresEventBus.open(config.store);
    const chunks = await PgChunkRouter.open(queue.boss, config.store);
    return { queue, events, holder, chunks };
  }
  if (config.role !== "all") {
    throw new RangeError(
      `Cannot start: SUNLAG_ROLE=${config.role} needs a shared PostgreSQL store ` +
        "(SUNLAG_STORE=postgres://...); a SQLite store is served by one process (role all)",
    );
  }
  return { queue: new InProcessQueue(), events: new LocalEventBus(), holder };
}
