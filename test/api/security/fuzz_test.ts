/**
 * Fuzzing at CI size (300 hostile requests over every route): never a 5xx, every error an
 * RFC 9457 problem. test/bench/fuzz_http.ts runs 10,000.
 */
import assert from "node:assert/strict";
import fc from "fast-check";
import { makeTestApp, uploadSeries } from "../helpers.ts";
import { fuzzRequest, responseFault } from "./fuzz_cases.ts";
import { smallSeries } from "./shared_instance.ts";

Deno.test("fuzz: 300 hostile requests over every route give no 5xx and only problems", async () => {
  const svc = await makeTestApp({ config: { bodyLimitBytes: 100_000 } });
  try {
    const sid = await uploadSeries(svc, smallSeries("fuzz"));
    const run = await (await svc.post("/v1/smoothing", {
      series: sid,
      method: "running_mean",
      window: 3,
    })).json();
    const faults: string[] = [];
    await fc.assert(
      fc.asyncProperty(fuzzRequest({ series: [sid], runs: [run.id] }), async (req) => {
        const res = await svc.app.request(req.url, {
          method: req.method,
          headers: req.headers,
          body: req.body,
        });
        const fault = responseFault(res);
        await res.body?.cancel();
        if (fault) faults.push(`${req.method} ${req.url}: ${fault}`);
        return fault === null;
      }),
      { numRuns: 300, seed: 20260101 },
    );
    assert.deepEqual(faults, []);
  } finally {
    await svc.close();
  }
});
