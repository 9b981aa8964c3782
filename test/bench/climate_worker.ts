/**
 * Bench-only Web Worker: runs `surrogateLagChunk` on the chunk it is sent and transfers the
 * result buffers back (the service's pool in api/workers does the same through TASKS).
 *
 * @module
 */
/// <reference lib="deno.worker" />
import { surrogateLagChunk } from "../../core/climate/surrogate_lag_test.ts";

self.onmessage = (e: MessageEvent) => {
  const out = surrogateLagChunk(e.data);
  const buffers = [out.exceed, out.maxAbs, out.sum, out.sumSq, out.absHistogram].map((a) =>
    a.buffer as ArrayBuffer
  );
  self.postMessage(out, { transfer: buffers });
};
