/**
 * Bench-only Web Worker: runs `solarSignalMapCells` on each block of cells (`{ kind: "map" }`)
 * and `fieldSignificanceChunk` on each Monte Carlo task it is sent, keeping one WebAssembly
 * engine, and transfers the tallies back (the service's pool does the same through
 * its task registry).
 *
 * @module
 */
/// <reference lib="deno.worker" />
import {
  fieldSignificanceChunk,
  solarSignalMapCells,
  wasmFloat32Product,
} from "../../core/field/mod.ts";

const engine = wasmFloat32Product();
self.onmessage = (e: MessageEvent) => {
  if (e.data.kind === "map") {
    self.postMessage(solarSignalMapCells(e.data.inputs));
    return;
  }
  const out = fieldSignificanceChunk(e.data, engine);
  self.postMessage(out, { transfer: [out.units.buffer, out.exceed.buffer] as ArrayBuffer[] });
};
