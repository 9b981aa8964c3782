/**
 * Chunks of one run computed by any worker on any machine. A run's `ctx.parallel(task,
 * chunks)` becomes one pg-boss job per chunk; the chunk's input and output travel through a
 * table of the store's database (V8 structured serialisation keeps typed arrays), and the run
 * that asked waits for all outputs, then takes them in input order, so the reduction and the
 * digest are the same for 1, 2 or 5 workers on 1 or 3 machines.
 *
 * A chunk job is idempotent: a chunk whose worker died is computed again by another and only
 * the first output is kept. Chunks of a run that ended (cancelled, failed, taken over) are
 * skipped; their rows are removed when the run's holder finishes or gives up, including the
 * rows a dead holder left behind. A chunk being computed when its run ends is stopped: the
 * worker's `local` function gets a `shouldStop` that turns true when the run is no longer
 * running or the chunk's row is gone (checked every {@link CHUNK_CHECK_MS}), beside the
 * cancel it hears on the event bus (RunService.startWorking), and its output is not written.
 *
 * @module
 */
import { deserialize, serialize } from "node:v8";
import { Buffer } from "node:buffer";
import type { PgBoss } from "pg-boss";
import postgres from "postgres";
import { CancelledError } from "../runs/kind.ts";

/** Queue of chunk jobs. */
export const CHUNK_QUEUE = "sunlag-chunks";

/** How often a computing chunk checks in the database that its run still runs, ms. */
export const CHUNK_CHECK_MS = 500;

/** The run a chunk belongs to, and whether the chunk must stop (its run ended). */
export interface ChunkControl {
  runId: string;
  shouldStop(): boolean;
}

/** Computes one chunk in this process: its task, its input, and its control. */
export type LocalChunkCompute = (
  task: string,
  input: unknown,
  chunk: ChunkControl,
) => Promise<unknown>;

/** Maps a task over chunks somewhere (the run's `ctx.parallel`). */
export interface ChunkRouter {
  map<I, O>(
    runId: string,
    task: string,
    chunks: I[],
    isCancelled: () => boolean,
  ): Promise<O[]>;
  /** Forget every chunk of a run (its holder finished, or took it over from a dead one). */
  release(runId: string): Promise<void>;
  /** Compute chunk jobs here with `local` (worker role). */
  work(local: LocalChunkCompute, concurrency: number): Promise<void>;
}

export class PgChunkRouter implements ChunkRouter {
  private constructor(readonly boss: PgBoss, readonly sql: postgres.Sql) {}

  static async open(boss: PgBoss, url: string): Promise<PgChunkRouter> {
    await boss.createQueue(CHUNK_QUEUE, {
      heartbeatSeconds: 10,
      notify: true,
      retryLimit: 30,
      retryDelay: 1,
    });
    const sql = postgres(url, { max: 4, onnotice: () => {} });
    await sql`CREATE TABLE IF NOT EXISTS sunlag_chunks (
      id BIGSERIAL PRIMARY KEY,
      run_id TEXT NOT NULL,
      batch TEXT NOT NULL,
      idx INTEGER NOT NULL,
      task TEXT NOT NULL,
      input BYTEA NOT NULL,
      output BYTEA,
      error TEXT,
      UNIQUE (batch, idx))`;
    await sql`CREATE INDEX IF NOT EXISTS sunlag_chunks_run ON sunlag_chunks (run_id)`;
    return new PgChunkRouter(boss, sql);
  }

  async map<I, O>(
    runId: string,
    task: string,
    chunks: I[],
    isCancelled: () => boolean,
  ): Promise<O[]> {
    if (chunks.length === 0) return [];
    const batch = crypto.randomUUID();
    const rows = chunks.map((c, idx) => ({
      run_id: runId,
      batch,
      idx,
      task,
      input: Buffer.from(serialize(c)),
    }));
    const ids = await this.sql`INSERT INTO sunlag_chunks ${this.sql(rows)} RETURNING id`;
    await this.boss.insert(CHUNK_QUEUE, ids.map((r) => ({ data: { chunk: String(r.id) } })));
    try {
      // Wait for every output (a short poll: chunks take from tens of ms to seconds).
      let delay = 20;
      while (true) {
        if (isCancelled()) throw new CancelledError();
        const [s] = await this.sql`
          SELECT count(*) FILTER (WHERE output IS NOT NULL) AS done,
                 min(error) AS error
          FROM sunlag_chunks WHERE batch = ${batch}`;
        if (s.error) throw new Error(`a chunk of task ${task} failed: ${s.error}`);
        if (Number(s.done) === chunks.length) break;
        await new Promise((r) => setTimeout(r, delay));
        delay = Math.min(250, delay * 1.5);
      }
      const out = await this.sql`
        SELECT output FROM sunlag_chunks WHERE batch = ${batch} ORDER BY idx`;
      return out.map((r) => deserialize(r.output as Uint8Array) as O);
    } finally {
      await this.sql`DELETE FROM sunlag_chunks WHERE batch = ${batch}`.catch(() => {});
    }
  }

  async release(runId: string): Promise<void> {
    await this.sql`DELETE FROM sunlag_chunks WHERE run_id = ${runId}`.catch(() => {});
  }

  async work(local: LocalChunkCompute, concurrency: number): Promise<void> {
    await this.boss.work<{ chunk: string }>(
      CHUNK_QUEUE,
      {
        localConcurrency: concurrency,
        batchSize: 1,
        pollingIntervalSeconds: 0.5,
        notifyPollingIntervalSeconds: 0.5,
        burstWhenReadyExceeds: 1,
      },
      async (jobs) => {
        for (const job of jobs) await this.#compute(job.data.chunk, local);
      },
    );
  }

  async #compute(id: string, local: LocalChunkCompute) {
    const [row] = await this.sql`
      SELECT c.run_id, c.task, c.input, c.output IS NOT NULL AS done, r.status
      FROM sunlag_chunks c LEFT JOIN runs r ON r.id = c.run_id WHERE c.id = ${id}`;
    // Gone (the batch finished or was abandoned), already computed, or its run ended.
    if (!row || row.done || row.status !== "running") return;
    let ended = false;
    const check = setInterval(() => {
      this.sql`
        SELECT r.status FROM sunlag_chunks c JOIN runs r ON r.id = c.run_id WHERE c.id = ${id}`
        .then(([now]) => {
          if (!now || now.status !== "running") ended = true;
        }, () => {});
    }, CHUNK_CHECK_MS);
    const control: ChunkControl = { runId: row.run_id as string, shouldStop: () => ended };
    try {
      const output = await local(row.task, deserialize(row.input as Uint8Array), control);
      await this.sql`UPDATE sunlag_chunks SET output = ${Buffer.from(serialize(output))}
        WHERE id = ${id} AND output IS NULL`;
    } catch (e) {
      // stopped because its run ended: nobody waits for this chunk any more
      if (e instanceof CancelledError || (e as Error)?.name === "CancelledError") return;
      await this.sql`UPDATE sunlag_chunks SET error = ${String((e as Error)?.message ?? e)}
        WHERE id = ${id} AND output IS NULL`;
    } finally {
      clearInterval(check);
    }
  }

  async close(): Promise<void> {
    await this.sql.end({ timeout: 2 });
  }
}
