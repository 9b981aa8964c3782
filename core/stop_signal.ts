/**
 * Stopping a long computation on request: the caller passes `shouldStop`, the computation
 * polls it between units of work (a surrogate, a replicate, a block of frequencies, a fit)
 * and throws {@link StoppedError} when it answers true. The core never knows why (a cancelled
 * run, a time limit): the caller decides and translates the error. Polling is cheap (a
 * function call per unit), so units are chosen to take well under a millisecond to a few
 * milliseconds, and a request to stop is obeyed that quickly.
 *
 * Common practice (the cooperative cancellation of `AbortSignal.throwIfAborted` in the DOM
 * standard, here as a plain callback so that typed-array kernels stay free of host objects).
 *
 * @module
 */

/** Options of a computation that can be asked to stop. */
export interface StopOptions {
  /**
   * Polled between units of work; once it returns true the computation throws
   * {@link StoppedError}. It must be cheap and must not throw.
   * @default never stops
   */
  shouldStop?: () => boolean;
}

/**
 * Thrown by a computation whose `shouldStop` answered true. It carries no partial result.
 *
 * @example
 * ```ts
 * import { StoppedError } from "./stop_signal.ts";
 * import assert from "node:assert/strict";
 * const e = new StoppedError("compute periodogram");
 * assert.equal(e.name, "StoppedError");
 * assert.match(e.message, /periodogram: stopped on request/);
 * ```
 */
export class StoppedError extends Error {
  /** @param what the computation that stopped, e.g. "compute periodogram" */
  constructor(readonly what: string) {
    super(`Cannot ${what}: stopped on request`);
    this.name = "StoppedError";
  }
}

/**
 * Throw {@link StoppedError} when `options.shouldStop` answers true.
 *
 * @param options the computation's options (without `shouldStop` this never throws)
 * @param what the computation, for the message
 * @throws {StoppedError} when asked to stop
 * @example
 * ```ts
 * import { StoppedError, throwIfStopped } from "./stop_signal.ts";
 * import assert from "node:assert/strict";
 * throwIfStopped({}, "sum");
 * throwIfStopped({ shouldStop: () => false }, "sum");
 * assert.throws(() => throwIfStopped({ shouldStop: () => true }, "sum"), StoppedError);
 * ```
 */
export function throwIfStopped(options: StopOptions | undefined, what: string): void {
  if (options?.shouldStop?.()) throw new StoppedError(what);
}
