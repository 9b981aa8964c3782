/**
 * Mapping a worker task over many chunks in bounded rounds: the run reports progress after
 * each round and checks between rounds whether it must stop (a cancel, the time limit), so a
 * stopped run never has more than one round of chunks handed out. Results come back in input
 * order, so the numbers do not depend on the round size or the number of workers.
 *
 * @module
 */
import { CancelledError, type RunContext } from "../../runs/kind.ts";

/** Chunks handed out per round by default. */
export const ROUND_CHUNKS = 16;

/**
 * `ctx.parallel(task, chunks)` in rounds of `round` chunks, with progress moving from
 * `progress[0]` to `progress[1]` over the rounds.
 *
 * @throws {CancelledError} when the run must stop (checked before every round)
 */
export async function parallelInRounds<I, O>(
  ctx: RunContext,
  task: string,
  chunks: I[],
  options: { round?: number; progress?: [number, number] } = {},
): Promise<O[]> {
  const round = options.round ?? ROUND_CHUNKS;
  const out: O[] = [];
  for (let c = 0; c < chunks.length; c += round) {
    if (ctx.cancelled()) throw new CancelledError();
    out.push(...await ctx.parallel<I, O>(task, chunks.slice(c, c + round)));
    if (options.progress) {
      const [from, to] = options.progress;
      ctx.progress(from + ((to - from) * out.length) / chunks.length);
    }
  }
  return out;
}
