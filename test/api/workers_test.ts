import assert from "node:assert/strict";
import { makeTestApp, monthlySeries } from "./helpers.ts";

/** Monthly values with gaps: two complete years and one with too few months. */
const monthly = monthlySeries(
  "probe monthly",
  "other",
  "m",
  1990,
  36,
  (i) => (i >= 30 ? null : Math.cos(i / 3) + i / 10),
);

/** Two 30-year monthly series with an 11-year cycle, the second following the first. */
const solar = monthlySeries(
  "probe solar",
  "sunspot_number",
  "1",
  1950,
  360,
  (i) => 80 + 70 * Math.sin((2 * Math.PI * i) / 132) + 10 * Math.sin(i * 1.7),
  { version: "2" },
);
const climate = monthlySeries(
  "probe climate",
  "temperature_anomaly",
  "K",
  1950,
  360,
  (i) => 0.1 * Math.sin((2 * Math.PI * (i - 6)) / 132) + 0.05 * Math.cos(i * 2.3),
);

const requests: [string, unknown][] = [
  ["/v1/resampling", { series: monthly, to: "annual" }],
  // Surrogates are farmed out to the workers in chunks (ctx.parallel).
  ["/v1/lag-correlations", { solar, climate, surrogates: 500, seed: 3 }],
  ["/v1/spectra", { series: solar }],
];

async function digests(workers: number): Promise<string[]> {
  const svc = await makeTestApp({ workers });
  const out: string[] = [];
  for (const [path, body] of requests) {
    const res = await svc.post(path, body);
    const run = await res.json();
    assert.equal(res.status, 201, JSON.stringify(run));
    const replay = await (await svc.post(`/v1/runs/${run.id}/replay`, {})).json();
    assert.equal(replay.identical, true, `${path} replays identically with ${workers} workers`);
    out.push(run.result_digest);
  }
  await svc.close();
  return out;
}

Deno.test("workers: in-thread, 1 and 2 workers give identical result digests", async () => {
  const inThread = await digests(0);
  assert.deepEqual(await digests(1), inThread);
  assert.deepEqual(await digests(2), inThread);
});

Deno.test("canonical digests agree across processes", async () => {
  const here = await digests(0);
  for (const [i, [path, body]] of requests.entries()) {
    const out = await new Deno.Command(Deno.execPath(), {
      args: [
        "run",
        "-A",
        new URL("./digest_child.ts", import.meta.url).pathname,
        path,
        JSON.stringify(body),
        "2",
      ],
      stdout: "piped",
      stderr: "piped",
    }).output();
    assert.equal(out.code, 0, new TextDecoder().decode(out.stderr));
    assert.equal(new TextDecoder().decode(out.stdout).trim(), here[i], path);
  }
});

Deno.test("workers: a worker that fails fails its jobs (no run waits for ever) and is replaced", async () => {
  const { WorkerPool } = await import("../../api/workers/pool.ts");
  let spawned = 0;
  class FailingFirst extends WorkerPool {
    protected override spawn(index: number): Worker {
      spawned++;
      if (spawned === 1) {
        return new Worker("data:text/javascript,throw new Error('cannot load')", {
          type: "module",
        });
      }
      return super.spawn(index);
    }
  }
  const origError = console.error;
  console.error = () => {};
  const pool = new FailingFirst(1);
  try {
    await assert.rejects(
      () => pool.parallel("no-such-task", [1]),
      /compute worker 0 failed|unknown worker task/,
    );
    // The next job gets a fresh worker that loads: it answers (here with an unknown-task error).
    await assert.rejects(() => pool.parallel("no-such-task", [1]), /unknown worker task/);
    assert.equal(spawned, 2);
  } finally {
    console.error = origError;
    pool.terminate();
  }
});
