/**
 * Bench-only Web Worker: runs `fieldSignificanceChunk` on each task it is sent, keeping one
 * WebAssembly engine, and transfers the tallies back (the service's pool does the same through
 * its task registry).
 *
 * @module
 */
/// <reference lib="deno.worker" />
import { fieldSignificanceChunk, wasmFloat32Product } from "../../core/field/mod.ts";

const engine = wasmFloat32Product();
self.onmessage = (e: MessageEvent) => {
  const out = fieldSignificanceChunk(e.data, engine);
  self.postMessage(out, { transfer: [out.units.buffer, out.exceed.buffer] as ArrayBuffer[] });
};
