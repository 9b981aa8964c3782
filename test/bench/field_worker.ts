/**
 * Bench-only Web Worker: runs `solarSignalMapCells` on each block of cells (`{ kind: "map" }`)
 * and the service's own chunk task (api/analyses/solar_signal_maps/tasks.ts, which takes this
 * thread's product engine) on each Monte Carlo task it is sent, and transfers the tallies
 * back (the service's pool does the same through its task registry). The worker's name
 * chooses the engine: `off` (WebAssembly), `auto` (OpenBLAS with one thread where it loads,
 * the service's default) or `auto-default-threads` (OpenBLAS with its own thread count).
 *
 * @module
 */
/// <reference lib="deno.worker" />
import {
  fieldSignificanceChunk,
  type FieldSignificanceChunkInput,
  solarSignalMapCells,
} from "../../core/field/mod.ts";
import {
  FIELD_SIGNIFICANCE_CHUNK,
  solarSignalMapTasks,
} from "../../api/analyses/solar_signal_maps/tasks.ts";
import {
  chooseFloat32Engine,
  setProductEngineSetting,
} from "../../api/workers/openblas_product.ts";
import type { FieldChunkTally } from "../../core/field/mod.ts";

const own = self.name === "auto-default-threads"
  ? chooseFloat32Engine("auto", { threads: "default" })
  : null;
setProductEngineSetting(self.name === "off" ? "off" : "auto");
const chunk = (input: FieldSignificanceChunkInput): FieldChunkTally =>
  own
    ? fieldSignificanceChunk(input, own)
    : solarSignalMapTasks[FIELD_SIGNIFICANCE_CHUNK](input, {}) as FieldChunkTally;

self.onmessage = (e: MessageEvent) => {
  if (e.data.kind === "map") {
    self.postMessage(solarSignalMapCells(e.data.inputs));
    return;
  }
  const out = chunk(e.data);
  self.postMessage(out, { transfer: [out.units.buffer, out.exceed.buffer] as ArrayBuffer[] });
};
