/**
 * The upload worker: `{ job, req }` in (the body bytes transferred), `{ job, outcome }` out
 * (the series' arrays transferred). See api/ingest/upload.ts.
 *
 * @module
 */
/// <reference lib="deno.worker" />
import { ingestUpload, seriesBuffers, type UploadOutcome } from "./upload.ts";

self.onmessage = async (e: MessageEvent) => {
  const { job, req } = e.data;
  let outcome: UploadOutcome;
  try {
    outcome = await ingestUpload(req);
  } catch (err) {
    outcome = {
      ok: false,
      type: "validation",
      detail: `The upload could not be read: ${(err as Error)?.message ?? err}`.slice(0, 500),
      errors: [],
      omitted: 0,
    };
  }
  self.postMessage({ job, outcome }, outcome.ok ? seriesBuffers(outcome.series) : []);
};
