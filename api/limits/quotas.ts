/**
 * Per-owner quotas on runs and storage, kept by this service instance: runs computing at once
 * (more wait, queued), runs waiting, compute seconds in the last hour, and bytes held. A
 * request over a quota is refused with a 429 problem and `Retry-After`. Only owners that are
 * not admins are limited (see api/config.ts); the counts live in memory, so with several
 * instances each enforces its own share.
 *
 * @module
 */
import type { Quotas } from "../config.ts";
import { ProblemError } from "../problems.ts";
import type { RunAdmission, RunTicket } from "../runs/service.ts";
import type { Store } from "../store/types.ts";

interface OwnerState {
  running: number;
  queued: number;
  /** Finished compute: [end time in seconds, seconds used], oldest first. */
  ledger: [number, number][];
  waiters: (() => void)[];
}

const HOUR = 3600;

function quotaProblem(detail: string, retryAfterSeconds: number): ProblemError {
  const s = Math.max(1, Math.ceil(retryAfterSeconds));
  return new ProblemError("quota-exceeded", detail, { retry_after_seconds: s }, {
    "Retry-After": String(s),
  });
}

/** Run admission by the run quotas of {@link Quotas}. */
export class RunQuotas implements RunAdmission {
  #owners = new Map<string, OwnerState>();

  constructor(
    readonly quotas: Quotas,
    readonly now: () => number = () => performance.now() / 1000,
  ) {}

  #state(owner: string): OwnerState {
    let s = this.#owners.get(owner);
    if (!s) {
      s = { running: 0, queued: 0, ledger: [], waiters: [] };
      this.#owners.set(owner, s);
    }
    return s;
  }

  /** Compute seconds `owner` used in the last hour, and when enough of it expires. */
  usage(owner: string): { seconds: number; ledger: [number, number][] } {
    const s = this.#state(owner);
    const t = this.now();
    while (s.ledger.length && s.ledger[0][0] <= t - HOUR) s.ledger.shift();
    return { seconds: s.ledger.reduce((a, [, x]) => a + x, 0), ledger: s.ledger };
  }

  admit(owner: string, mode: "sync" | "async"): RunTicket {
    const q = this.quotas;
    const s = this.#state(owner);
    const { seconds, ledger } = this.usage(owner);
    if (seconds >= q.computeSecondsPerHour) {
      // Wait until the oldest entries leave the hour and bring usage under the limit.
      let left = seconds, wait = 1;
      for (const [end, x] of ledger) {
        left -= x;
        wait = end + HOUR - this.now();
        if (left < q.computeSecondsPerHour) break;
      }
      throw quotaProblem(
        `Owner ${owner} used ${
          seconds.toFixed(1)
        } compute seconds in the last hour; the quota is ` +
          `${q.computeSecondsPerHour} (SUNLAG_QUOTA_COMPUTE_SECONDS)`,
        wait,
      );
    }
    if (mode === "sync" && s.running >= q.concurrentRuns) {
      throw quotaProblem(
        `Owner ${owner} has ${s.running} run(s) computing; the quota is ${q.concurrentRuns} at ` +
          "once (SUNLAG_QUOTA_CONCURRENT_RUNS); ask with `Prefer: respond-async` to queue",
        5,
      );
    }
    // Runs may wait for the free slots plus the queue quota.
    if (mode === "async" && s.queued >= q.queuedRuns + Math.max(0, q.concurrentRuns - s.running)) {
      throw quotaProblem(
        `Owner ${owner} has ${s.queued} run(s) waiting; the quota is ${q.queuedRuns} ` +
          "(SUNLAG_QUOTA_QUEUED_RUNS)",
        10,
      );
    }
    s.queued++;
    let state: "queued" | "running" | "done" = "queued";
    const release = () => {
      if (state === "queued") s.queued--;
      else if (state === "running") {
        s.running--;
        s.waiters.shift()?.();
      }
      state = "done";
    };
    return {
      slot: async () => {
        while (s.running >= q.concurrentRuns) {
          await new Promise<void>((ok) => s.waiters.push(ok));
        }
        s.queued--;
        s.running++;
        state = "running";
      },
      done: (secondsUsed: number) => {
        if (state === "done") return;
        if (state === "running" && secondsUsed > 0) s.ledger.push([this.now(), secondsUsed]);
        release();
      },
    };
  }

  /** Runs `owner` has computing and waiting (for tests and the admin view). */
  counts(owner: string): { running: number; queued: number } {
    const s = this.#state(owner);
    return { running: s.running, queued: s.queued };
  }
}

/**
 * Refuse with a 429 problem when storing `addBytes` more would take `owner` over its storage
 * quota (SUNLAG_QUOTA_STORED_MB).
 */
export async function checkStorage(
  store: Store,
  owner: string,
  addBytes: number,
  quotas: Quotas,
): Promise<void> {
  const held = await store.storedBytes(owner);
  if (held + addBytes > quotas.storedBytes) {
    throw quotaProblem(
      `Owner ${owner} holds ${held} bytes; storing ${addBytes} more would pass the quota of ` +
        `${quotas.storedBytes} bytes (SUNLAG_QUOTA_STORED_MB): delete series you no longer need`,
      HOUR,
    );
  }
}
