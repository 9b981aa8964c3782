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

const requests: [string, unknown][] = [
  ["/v1/resampling", { series: monthly, to: "annual" }],
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
