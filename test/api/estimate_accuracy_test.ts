/**
 * Estimates are right to within a factor of three for every analysis: representative
 * requests of each kind (test/api/estimate_cases.ts, the small ones CI can afford) are
 * computed and their CPU time compared with the cost model scaled by the machine-speed factor
 * measured beside them (api/runs/estimate.ts). And a request estimated long goes asynchronous
 * (cancellable) without being computed first: the spectrum of 50,000 daily values on its
 * default grid, which once ran for half a minute on the request.
 */
import assert from "node:assert/strict";
import { makeTestApp } from "./helpers.ts";
import { loadDemo } from "../../api/demo.ts";
import { RUN_KINDS } from "../../api/analyses/registry.ts";
import { estimateRunSeconds, measureMachineSpeedFactor } from "../../api/runs/estimate.ts";
import {
  estimateCases,
  inventedDaily,
  measureCase,
  type Measured,
  storeCase,
} from "./estimate_cases.ts";

Deno.test("estimates: measured / estimated time within [1/3, 3] for every kind", async () => {
  const svc = await makeTestApp({ config: { asyncSeconds: 1e9 } });
  try {
    await loadDemo(svc.store);
    const runs: Record<string, string> = {};
    const rows: Measured[] = [];
    const factor = measureMachineSpeedFactor();
    const inRange = (r: Measured) =>
      r.measured / r.estimate >= 1 / 3 && r.measured / r.estimate <= 3;
    for (const c of await estimateCases(svc)) {
      if (!c.ci) continue; // the others (and the runs they store) are the calibration script's
      let row = await measureCase(svc, c, runs, 2, factor);
      // The speed factor was measured at the start; when other test files load the machine
      // differently by now, a case is measured once more beside a fresh factor. An estimate
      // that is wrong stays out of range then.
      if (!inRange(row)) row = await measureCase(svc, c, runs, 2, measureMachineSpeedFactor());
      rows.push(row);
      await storeCase(svc, c, runs);
    }
    console.log(
      "kind                                 request                             measured  estimate  ratio",
    );
    for (const r of rows) {
      console.log(
        `${r.kind.padEnd(36)} ${r.label.padEnd(35)} ${r.measured.toFixed(4).padStart(8)} s ` +
          `${r.estimate.toFixed(4).padStart(8)} s ${
            (r.measured / r.estimate).toFixed(2).padStart(6)
          }`,
      );
    }
    console.log(`machine-speed factor ${rows[0].factor.toFixed(2)}`);
    // every kind is checked
    assert.deepEqual(
      [...new Set(rows.map((r) => r.kind))].sort(),
      RUN_KINDS.map((k) => k.kind).sort(),
    );
    for (const r of rows) {
      assert.ok(
        inRange(r),
        `${r.kind} (${r.label}): measured ${r.measured.toFixed(4)} s, estimated ` +
          `${r.estimate.toFixed(4)} s`,
      );
    }
  } finally {
    await svc.close();
  }
});

Deno.test("estimates: a long spectrum goes asynchronous on its estimate alone, and is cancellable", async () => {
  const svc = await makeTestApp();
  try {
    const body = { series: inventedDaily(50_000) };
    const kind = RUN_KINDS.find((k) => k.kind === "spectra")!;
    const prep = await svc.runs.prepare(kind, kind.request.parse(body) as Record<string, unknown>);
    const estimate = estimateRunSeconds(kind, prep.params, prep);
    // 50,000 points × 125,000 default frequencies
    assert.ok(estimate > svc.config.asyncSeconds, `estimated ${estimate.toFixed(1)} s`);
    const t0 = performance.now();
    const res = await svc.post("/v1/spectra", body);
    const run = await res.json();
    assert.equal(res.status, 202, JSON.stringify(run));
    assert.ok(performance.now() - t0 < 5000, "answered before computing");
    assert.equal((await svc.post(`/v1/runs/${run.id}/cancel`, {})).status, 200);
    await svc.runs.settle();
    assert.equal((await (await svc.get(`/v1/runs/${run.id}`)).json()).status, "cancelled");
    console.log(`estimated ${estimate.toFixed(1)} s: answered 202, then cancelled`);
  } finally {
    await svc.close();
  }
});
