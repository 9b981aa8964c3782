/**
 * The worker pool finishes a run's result in the worker (canonical JSON bytes, transferred, and
 * their SHA-256) and replaces a worker that built a very large result by a fresh one once it
 * has been idle for a while (not while work keeps coming).
 */
import assert from "node:assert/strict";
import { WorkerPool } from "../../api/workers/pool.ts";
import type { ComputeHooks } from "../../api/runs/service.ts";
import { canonicalJson, sha256Hex } from "../../api/canonical.ts";
import { steadyKind } from "./stop_kinds.ts";

const REGISTRY = new URL("./stop_kinds.ts", import.meta.url).href;
const NO_INPUTS = { series: {}, runs: {} };
const hooks = (): ComputeHooks => ({
  progress: () => {},
  isCancelled: () => false,
  onStart: () => {},
});
const notes = [{ run: "r0", kind: "test-other", level: "caution" as const, text: "a caution" }];

Deno.test("worker pool: computeFinished() returns the canonical bytes, digest and notes; a large result recycles its worker", async () => {
  const pool = new WorkerPool(1, REGISTRY, { recycleBytes: 1, recycleIdleMs: 300 });
  try {
    const params = { n: 1000, chunks: 2, ms: 0 };
    const a = await pool.computeFinished(steadyKind, params, NO_INPUTS, hooks(), notes);
    const expected = { sum: 499500, inherited: notes };
    const text = new TextDecoder().decode(a.bytes);
    assert.equal(text, canonicalJson(expected), "bytes are the canonical JSON with the notes");
    assert.equal(a.digest, sha256Hex(text), "the digest is the SHA-256 of those bytes");
    // work given within the idle time keeps the worker
    const again = await pool.computeFinished(steadyKind, params, NO_INPUTS, hooks(), notes);
    assert.equal(again.digest, a.digest);
    assert.equal(pool.recycled, 0, "not replaced while work keeps coming");
    await new Promise((r) => setTimeout(r, 600));
    assert.equal(pool.recycled, 1, "replaced once idle");
    // the fresh worker computes the same run (after its warm-up)
    const b = await pool.computeFinished(steadyKind, params, NO_INPUTS, hooks(), notes);
    assert.equal(b.digest, a.digest);
    assert.equal(pool.stats().workers, 1);
  } finally {
    pool.terminate();
  }
});

Deno.test("worker pool: a result below the recycling size keeps its worker", async () => {
  const pool = new WorkerPool(1, REGISTRY);
  try {
    const r = await pool.computeFinished(
      steadyKind,
      { n: 10, chunks: 1, ms: 0 },
      NO_INPUTS,
      hooks(),
      [],
    );
    assert.equal(new TextDecoder().decode(r.bytes), '{"sum":45}');
    assert.equal(pool.recycled, 0);
  } finally {
    pool.terminate();
  }
});
