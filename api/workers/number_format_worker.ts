/**
 * The number formatter of a compute worker (api/workers/number_formatter.ts):
 * `{ id, arrays: Float64Array[] }` → `{ id, bytes: Uint8Array[] }`, each the UTF-8 bytes of
 * `JSON.stringify(Array.from(a))` (transferred back). It imports one small module, so it
 * starts in a few milliseconds.
 *
 * @module
 */
/// <reference lib="deno.worker" />

import { plainNumbers } from "../runs/plain_numbers.ts";

const encoder = new TextEncoder();

self.onmessage = (e: MessageEvent) => {
  const { id, arrays } = e.data as { id: number; arrays: Float64Array[] };
  try {
    const bytes = arrays.map((a) => encoder.encode(JSON.stringify(plainNumbers(a))));
    self.postMessage({ id, bytes }, bytes.map((b) => b.buffer));
  } catch (err) {
    self.postMessage({ id, error: String((err as Error)?.message ?? err) });
  }
};
