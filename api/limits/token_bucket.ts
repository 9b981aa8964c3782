/**
 * Request-rate limiting by token bucket (Turner, "New directions in communications", 1986;
 * the usual formulation: a bucket of `burst` tokens refilled at `rate` per second, one token
 * per request). Buckets are kept per key (an owner, or a client address) in memory; idle
 * buckets, which are full again, are dropped so the map stays small.
 *
 * @module
 */

/** The outcome of taking a token: allowed, or refused with the seconds until one is back. */
export type Take = { ok: true } | { ok: false; retryAfterSeconds: number };

interface Bucket {
  tokens: number;
  at: number;
}

/**
 * Per-key token buckets.
 *
 * @example
 * ```ts
 * import assert from "node:assert/strict";
 * import { TokenBuckets } from "./token_bucket.ts";
 * let t = 0;
 * const b = new TokenBuckets(2, 3, () => t); // 2 per second, bursts of 3
 * assert.ok([1, 2, 3].every(() => b.take("k").ok));
 * assert.deepEqual(b.take("k"), { ok: false, retryAfterSeconds: 1 });
 * t = 0.5; // one token back after half a second
 * assert.equal(b.take("k").ok, true);
 * ```
 */
export class TokenBuckets {
  #buckets = new Map<string, Bucket>();

  /**
   * @param rate tokens added per second
   * @param burst bucket size
   * @param now clock in seconds (default: a monotonic clock)
   */
  constructor(
    readonly rate: number,
    readonly burst: number,
    readonly now: () => number = () => performance.now() / 1000,
  ) {
    if (!(rate > 0) || !(burst >= 1)) {
      throw new RangeError(
        `Cannot make token buckets: rate must be > 0 and burst >= 1, got ${rate} and ${burst}`,
      );
    }
  }

  /** Take one token from `key`'s bucket. */
  take(key: string): Take {
    const t = this.now();
    const b = this.#buckets.get(key) ?? { tokens: this.burst, at: t };
    b.tokens = Math.min(this.burst, b.tokens + (t - b.at) * this.rate);
    b.at = t;
    this.#buckets.set(key, b);
    if (this.#buckets.size > 10_000) this.#prune(t);
    if (b.tokens >= 1) {
      b.tokens -= 1;
      return { ok: true };
    }
    return { ok: false, retryAfterSeconds: Math.max(1, Math.ceil((1 - b.tokens) / this.rate)) };
  }

  /** Drop the buckets that have refilled completely (their state is the default again). */
  #prune(t: number): void {
    for (const [k, b] of this.#buckets) {
      if (b.tokens + (t - b.at) * this.rate >= this.burst) this.#buckets.delete(k);
    }
  }

  /** Number of buckets held (for tests). */
  get size(): number {
    return this.#buckets.size;
  }
}
