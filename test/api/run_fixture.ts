/**
 * Test helper: store a run record with a given result directly, for tests of what is served
 * from stored results (charts, CSV, caching) independently of any analysis.
 *
 * @module
 */
import { uuidv7 } from "uuidv7";
import type { RunRecord, Store } from "../../api/store/types.ts";
import { resultDigest } from "../../api/runs/service.ts";

/** Store a succeeded run with the given result directly (charts read only stored results). */
export async function putFinishedRun(
  store: Store,
  kind: string,
  result: Record<string, unknown>,
  status: RunRecord["status"] = "succeeded",
): Promise<RunRecord> {
  const now = new Date().toISOString();
  const run: RunRecord = {
    id: uuidv7(),
    kind,
    created_at: now,
    updated_at: now,
    status,
    progress: status === "succeeded" ? 1 : 0,
    params: {},
    input_series: [],
    input_runs: [],
    service_version: "0.1.0",
    algorithm_version: "1",
    seed: null,
    result: status === "succeeded" ? result : null,
    result_digest: status === "succeeded" ? await resultDigest(result) : null,
    error: null,
    eta_seconds: null,
  };
  await store.putRun(run);
  return run;
}
