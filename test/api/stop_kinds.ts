/**
 * Run kinds for testing how the worker pool stops work (not registered in the service): a
 * run that spins in chunks that poll their stop flag or ignore it, one that spins in its own
 * worker without ever looking, and a steady one whose chunks sum numbers.
 *
 * @module
 */
import { z } from "@hono/zod-openapi";
import type { RunKind, Task } from "../../api/runs/kind.ts";
import { StoppedError } from "../../core/stop_signal.ts";

/** Busy for `ms` milliseconds; polls `shouldStop` when `polite`. */
function spin(ms: number, polite: boolean, shouldStop?: () => boolean): number {
  const t0 = performance.now();
  let x = 0;
  while (performance.now() - t0 < ms) {
    for (let i = 0; i < 1000; i++) x += Math.sqrt(i);
    if (polite && shouldStop?.()) throw new StoppedError("spin");
  }
  return x;
}

const tasks: Record<string, Task> = {
  "test.spin": (input: { ms: number; polite: boolean }, control) =>
    spin(input.ms, input.polite, control?.shouldStop),
  "test.sum": (input: { from: number; to: number; ms: number }) => {
    spin(input.ms, false);
    let s = 0;
    for (let i = input.from; i < input.to; i++) s += i;
    return s;
  },
};

const empty = z.object({});

/** Chunks that spin for `ms` each, polling their stop flag (`polite`) or not. */
export const spinKind: RunKind = {
  kind: "test-spin",
  path: "/v1/test-spin",
  algorithmVersion: "1",
  tag: "Test",
  summary: "spin",
  description: "spins in chunks",
  request: z.object({
    chunks: z.number().int(),
    ms: z.number(),
    polite: z.boolean(),
  }),
  result: empty.passthrough(),
  async compute(p, ctx) {
    const chunk = { ms: p.ms, polite: p.polite };
    await ctx.parallel("test.spin", Array.from({ length: p.chunks }, () => chunk));
    return { done: true };
  },
  tasks,
};

/** Spins `ms` in its own worker and never looks at `ctx.cancelled()`. */
export const stubbornKind: RunKind = {
  kind: "test-stubborn",
  path: "/v1/test-stubborn",
  algorithmVersion: "1",
  tag: "Test",
  summary: "stubborn",
  description: "spins without checking",
  request: z.object({ ms: z.number() }),
  result: empty.passthrough(),
  compute(p) {
    spin(p.ms, false);
    return { done: true };
  },
};

/** Sums 0..n−1 in `chunks` chunks that take `ms` each, in two rounds. */
export const steadyKind: RunKind = {
  kind: "test-steady",
  path: "/v1/test-steady",
  algorithmVersion: "1",
  tag: "Test",
  summary: "steady",
  description: "sums in chunks",
  request: z.object({ n: z.number().int(), chunks: z.number().int(), ms: z.number() }),
  result: empty.passthrough(),
  async compute(p, ctx) {
    const per = Math.ceil(p.n / p.chunks);
    const parts = Array.from({ length: p.chunks }, (_, k) => ({
      from: k * per,
      to: Math.min(p.n, (k + 1) * per),
      ms: p.ms,
    }));
    const half = Math.ceil(parts.length / 2);
    const a = await ctx.parallel<typeof parts[0], number>("test.sum", parts.slice(0, half));
    const b = await ctx.parallel<typeof parts[0], number>("test.sum", parts.slice(half));
    return { sum: [...a, ...b].reduce((x, y) => x + y, 0) };
  },
  tasks,
};

/** The analyses of this module, for a worker pool serving them (`new WorkerPool(n, url)`). */
export const RUN_KINDS: readonly RunKind[] = [spinKind, stubbornKind, steadyKind];
