/**
 * The worker pool stops a run's work when asked: chunks that poll their stop flag end within
 * milliseconds, chunks not started are dropped, and a worker that does not stop within the
 * grace period is terminated and replaced without losing the other runs it held.
 */
import assert from "node:assert/strict";
import { WorkerPool } from "../../api/workers/pool.ts";
import { CancelledError } from "../../api/runs/kind.ts";
import type { ComputeHooks } from "../../api/runs/service.ts";
import { spinKind, steadyKind, stubbornKind } from "./stop_kinds.ts";

const REGISTRY = new URL("./stop_kinds.ts", import.meta.url).href;
const NO_INPUTS = { series: {}, runs: {} };

/** Hooks whose cancel flag the test raises. */
function hooks(): ComputeHooks & { cancel(): void; started: Promise<void> } {
  let cancelled = false;
  let start = () => {};
  const started = new Promise<void>((r) => (start = r));
  return {
    progress: () => {},
    isCancelled: () => cancelled,
    onStart: () => start(),
    cancel: () => (cancelled = true),
    started,
  };
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Wait until every worker of the pool has loaded the analyses. */
async function loaded(pool: WorkerPool) {
  await until(() => pool.stats().ready === pool.size, 20_000, "workers loaded");
}

/** Wait until `f` holds (polling every 10 ms), or fail after `ms`. */
async function until(f: () => boolean, ms: number, what: string) {
  const t0 = performance.now();
  while (!f()) {
    if (performance.now() - t0 > ms) assert.fail(`timed out waiting for ${what}`);
    await sleep(10);
  }
}

Deno.test("worker pool: chunks that poll their stop flag end within milliseconds of a cancel", async () => {
  const pool = new WorkerPool(2, REGISTRY);
  try {
    await loaded(pool);
    const h = hooks();
    // 40 chunks of 2 s: about 40 s of work on two workers
    const run = pool.compute(spinKind, { chunks: 40, ms: 2000, polite: true }, NO_INPUTS, h);
    await h.started;
    await until(() => pool.stats().busy === 2, 10_000, "both workers busy");
    await sleep(200);
    // only the chunks being computed are in the workers; the rest wait in the pool
    assert.equal(pool.stats().in_flight, 3, "the run and one chunk per worker");
    assert.equal(pool.stats().queued, 38);
    const t0 = performance.now();
    h.cancel();
    await assert.rejects(run, CancelledError);
    const stopped = performance.now() - t0;
    await until(() => pool.stats().in_flight === 0, 1000, "no job left in a worker");
    const s = pool.stats();
    assert.equal(s.busy, 0);
    assert.equal(s.queued, 0, "chunks that had not started were dropped");
    assert.equal(s.replaced, 0, "cooperative chunks need no worker to be replaced");
    // the poll of the cancel flag runs every 50 ms; the chunks stop at their next check
    assert.ok(stopped < 500, `stopped after ${stopped.toFixed(0)} ms`);
    console.log(`cooperative chunks: stopped ${stopped.toFixed(0)} ms after the cancel`);
  } finally {
    pool.terminate();
  }
});

Deno.test("worker pool: a worker that ignores the cancel is replaced after the grace period; the other run it held is sent again and succeeds", async () => {
  const pool = new WorkerPool(2, REGISTRY, { graceMs: 300 });
  try {
    await loaded(pool);
    // run B waits for its chunks in worker 0 (its chunks go to worker 1 first)
    const hb = hooks();
    // (two chunks: one per round, so that B's worker holds only B while B waits)
    const b = pool.compute(steadyKind, { n: 100_000, chunks: 2, ms: 800 }, NO_INPUTS, hb);
    b.catch(() => {});
    await hb.started;
    await until(() => pool.stats().busy === 1 && pool.stats().in_flight === 2, 10_000, "B waits");
    // run A lands in worker 0 beside the waiting B and spins there without ever looking
    const ha = hooks();
    // (Deno cannot interrupt a busy worker thread: terminate() frees the slot, but the thread
    // runs on until its loop ends, so keep the loop short here)
    const a = pool.compute(stubbornKind, { ms: 2500 }, NO_INPUTS, ha);
    await ha.started;
    await sleep(100);
    const t0 = performance.now();
    ha.cancel();
    await assert.rejects(a, CancelledError);
    const stopped = performance.now() - t0;
    assert.ok(stopped < 300 + 400, `A stopped ${stopped.toFixed(0)} ms after its cancel`);
    assert.equal(pool.stats().replaced, 1, "the stubborn worker was replaced");
    // B was held by the replaced worker: it is computed again and gives the right answer
    const result = await b as { sum: number };
    assert.equal(result.sum, (100_000 * 99_999) / 2);
    await until(() => pool.stats().in_flight === 0, 1000, "pool empty");
    console.log(`stubborn run: worker replaced ${stopped.toFixed(0)} ms after the cancel`);
  } finally {
    pool.terminate();
  }
});

Deno.test("worker pool: chunks that ignore their stop flag are stopped by replacing their workers; a queued run of another caller then runs", async () => {
  const pool = new WorkerPool(2, REGISTRY, { graceMs: 300 });
  try {
    await loaded(pool);
    const ha = hooks();
    const a = pool.compute(spinKind, { chunks: 6, ms: 2500, polite: false }, NO_INPUTS, ha);
    await ha.started;
    await until(() => pool.stats().busy === 2, 10_000, "both workers busy");
    const hb = hooks();
    const b = pool.compute(steadyKind, { n: 1000, chunks: 4, ms: 10 }, NO_INPUTS, hb);
    b.catch(() => {});
    ha.cancel();
    await assert.rejects(a, CancelledError);
    // B is served by the fresh workers (the old threads spin on until their loops end: Deno
    // does not interrupt a busy worker on terminate(), so they only slow B down)
    assert.equal(((await b) as { sum: number }).sum, (1000 * 999) / 2);
    assert.equal(pool.stats().replaced, 2);
  } finally {
    pool.terminate();
  }
});

Deno.test("worker pool: a run cancelled while its worker is still loading ends without replacing the worker", async () => {
  const pool = new WorkerPool(1, REGISTRY, { graceMs: 100 });
  try {
    const h = hooks();
    const run = pool.compute(spinKind, { chunks: 2, ms: 5000, polite: false }, NO_INPUTS, h);
    h.cancel();
    await assert.rejects(run, CancelledError);
    assert.equal(pool.stats().replaced, 0, "a loading worker is not busy with the run");
    // the same worker serves the next run once it has loaded
    const ok = await pool.compute(steadyKind, { n: 10, chunks: 2, ms: 0 }, NO_INPUTS, hooks());
    assert.equal((ok as { sum: number }).sum, 45);
    assert.equal(pool.stats().replaced, 0);
  } finally {
    pool.terminate();
  }
});

Deno.test("worker pool: runs take turns chunk by chunk: a light run behind a heavy one waits for one chunk, not for all", async () => {
  const pool = new WorkerPool(1, REGISTRY);
  try {
    await loaded(pool);
    const ha = hooks();
    const a = pool.compute(spinKind, { chunks: 30, ms: 300, polite: true }, NO_INPUTS, ha);
    a.catch(() => {});
    await ha.started;
    await until(() => pool.stats().busy === 1 && pool.stats().queued > 20, 10_000, "A busy");
    const t0 = performance.now();
    const b = await pool.compute(steadyKind, { n: 100, chunks: 2, ms: 0 }, NO_INPUTS, hooks());
    const waited = performance.now() - t0;
    assert.equal((b as { sum: number }).sum, 4950);
    assert.ok(pool.stats().queued > 10, "A still has most of its chunks to do");
    console.log(`light run done ${waited.toFixed(0)} ms after it was submitted behind 30 chunks`);
    ha.cancel();
    await assert.rejects(a, CancelledError);
  } finally {
    pool.terminate();
  }
});
