/**
 * Run events (progress, status) between the process computing a run and every process serving
 * its Server-Sent Events or holding it. In one process an in-memory bus; across machines
 * PostgreSQL LISTEN/NOTIFY on one channel, so an SSE stream on any instance shows the same
 * events and a cancel reaches the worker holding the run.
 *
 * @module
 */
import postgres from "postgres";

export type RunEvent =
  | { type: "progress"; id: string; status: string; progress: number; eta_seconds: number | null }
  | { type: "status"; id: string; status: string; progress: number };

/** Publish and subscribe run events by run id. */
export interface RunEventBus {
  publish(e: RunEvent): void;
  /** Listen to one run's events; returns the unsubscribe function. */
  subscribe(id: string, fn: (e: RunEvent) => void): () => void;
  close(): Promise<void>;
}

/** Delivers to the subscribers of this process. */
export class LocalEventBus implements RunEventBus {
  readonly #subs = new Map<string, Set<(e: RunEvent) => void>>();

  publish(e: RunEvent): void {
    this.deliver(e);
  }

  /** Hand an event to this process' subscribers of its run. */
  deliver(e: RunEvent): void {
    for (const fn of this.#subs.get(e.id) ?? []) {
      try {
        fn(e);
      } catch {
        // A subscriber's failure (a closed stream) never stops the others.
      }
    }
  }

  subscribe(id: string, fn: (e: RunEvent) => void): () => void {
    let set = this.#subs.get(id);
    if (!set) this.#subs.set(id, set = new Set());
    set.add(fn);
    return () => {
      set!.delete(fn);
      if (set!.size === 0 && this.#subs.get(id) === set) this.#subs.delete(id);
    };
  }

  close(): Promise<void> {
    this.#subs.clear();
    return Promise.resolve();
  }
}

/** The NOTIFY channel of run events. */
export const RUN_EVENTS_CHANNEL = "sunlag_run_events";

/**
 * Run events through PostgreSQL LISTEN/NOTIFY: every instance listens on one channel and
 * delivers to its own subscribers. Progress events are rate-limited per run (one every
 * `progressMs`) so a fast loop cannot flood the channel; status events always go.
 */
export class PostgresEventBus extends LocalEventBus {
  readonly #sql: postgres.Sql;
  readonly #lastProgress = new Map<string, number>();
  #listening: unknown = null;

  private constructor(url: string, readonly progressMs: number) {
    super();
    this.#sql = postgres(url, { max: 2, onnotice: () => {} });
  }

  /** Connect and start listening. */
  static async open(url: string, progressMs = 100): Promise<PostgresEventBus> {
    const bus = new PostgresEventBus(url, progressMs);
    bus.#listening = await bus.#sql.listen(RUN_EVENTS_CHANNEL, (payload) => {
      try {
        bus.deliver(JSON.parse(payload) as RunEvent);
      } catch {
        // Not one of ours: ignore.
      }
    });
    return bus;
  }

  override publish(e: RunEvent): void {
    if (e.type === "progress") {
      const now = Date.now();
      if (now - (this.#lastProgress.get(e.id) ?? 0) < this.progressMs) return;
      this.#lastProgress.set(e.id, now);
    } else {
      this.#lastProgress.delete(e.id);
    }
    this.#sql.notify(RUN_EVENTS_CHANNEL, JSON.stringify(e)).catch(() => {
      // The database is away: deliver locally at least.
      this.deliver(e);
    });
  }

  override async close(): Promise<void> {
    await super.close();
    this.#listening = null;
    await this.#sql.end({ timeout: 2 });
  }
}
