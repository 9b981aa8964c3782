/**
 * Cancel stops work, for every analysis that can be heavy: a heavy run of each (lag
 * correlations with 100,000 high-passed surrogates, spectra with 10,000 Monte Carlo
 * replicates, cycle forecasts with 5,000 replicates and 2,000 per hindcast case, an
 * attribution searching 301 lags of four regressors, a monthly reconstruction back to 1700
 * with 1,000 ensemble members, composites with 100,000 random sets, a
 * solar-signal map of the demo field over 121 lags with 100,000 surrogates, a field composite
 * of 100 + 100 epochs with 100,000 random sets) is cancelled once the workers are busy, and the process' CPU must go idle, and the worker pool
 * empty, within a second, by the analyses' own checks (no worker replaced). Measured in a child
 * process (test/api/cancel_idle_child.ts), so that the CPU time is only the service's.
 */
import assert from "node:assert/strict";

interface Outcome {
  kind: string;
  cancel_status: number;
  busy_cores_before: number;
  cancel_to_idle_ms: number;
  cancel_to_pool_empty_ms: number;
  status: string;
  replaced_workers: number;
}

Deno.test("cancel: the CPU goes idle within a second of the cancel, for every heavy kind", async () => {
  const out = await new Deno.Command(Deno.execPath(), {
    args: ["run", "-A", new URL("./cancel_idle_child.ts", import.meta.url).pathname],
    stdout: "piped",
    stderr: "piped",
  }).output();
  const stderr = new TextDecoder().decode(out.stderr);
  assert.equal(out.code, 0, stderr);
  const rows: Outcome[] = new TextDecoder().decode(out.stdout).trim().split("\n")
    .filter((l) => l.startsWith("{")).map((l) => JSON.parse(l));
  assert.deepEqual(
    rows.map((r) => r.kind),
    [
      "lag-correlations",
      "spectra",
      "cycle-forecasts",
      "attributions",
      "irradiance-reconstructions",
      "composites",
      "solar-signal-maps",
      "field-composites",
    ],
  );
  console.log("kind                 cancel → CPU idle   cancel → pool empty");
  for (const r of rows) {
    console.log(
      `${r.kind.padEnd(20)} ${String(r.cancel_to_idle_ms).padStart(10)} ms ` +
        `${String(r.cancel_to_pool_empty_ms).padStart(15)} ms`,
    );
  }
  for (const r of rows) {
    assert.equal(r.cancel_status, 200, `${r.kind}: the cancel was accepted`);
    assert.equal(r.status, "cancelled", `${r.kind}: the run ends cancelled`);
    assert.ok(r.busy_cores_before > 0.1, `${r.kind}: the run was computing when cancelled`);
    assert.ok(r.cancel_to_idle_ms <= 1000, `${r.kind}: CPU idle ${r.cancel_to_idle_ms} ms after`);
    assert.ok(
      r.cancel_to_pool_empty_ms <= 1000,
      `${r.kind}: pool empty ${r.cancel_to_pool_empty_ms} ms after`,
    );
  }
  // every heavy loop polls its stop flag: no worker had to be replaced
  assert.equal(rows[rows.length - 1].replaced_workers, 0);
});
