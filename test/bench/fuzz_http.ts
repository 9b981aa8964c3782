/**
 * The full fuzz run: 10,000 hostile requests over every route (test/api/security/fuzz_cases.ts)
 * against an in-process service in single-user mode and against a shared instance with keys,
 * reporting the count of each status and every fault (a 5xx, or an error without an RFC 9457
 * problem). The test suite runs 300 of them.
 *
 * Usage: deno run -A test/bench/fuzz_http.ts [--runs 10000] [--seed 20260101]
 *
 * @module
 */
import fc from "fast-check";
import { makeTestApp, uploadSeries } from "../api/helpers.ts";
import { fuzzRequest, responseFault } from "../api/security/fuzz_cases.ts";
import { sharedInstance, smallSeries } from "../api/security/shared_instance.ts";

const opt = (name: string, dflt: number) => {
  const i = Deno.args.indexOf(`--${name}`);
  return i >= 0 ? Number(Deno.args[i + 1]) : dflt;
};
const RUNS = opt("runs", 10_000);
const SEED = opt("seed", 20260101);

async function fuzz(label: string, keyed: boolean) {
  const svc = keyed
    ? await sharedInstance({ config: { bodyLimitBytes: 100_000 } })
    : await makeTestApp({ config: { bodyLimitBytes: 100_000 } });
  const headers: Record<string, string> = keyed
    ? { Authorization: `Bearer ${(svc as Awaited<ReturnType<typeof sharedInstance>>).admin.key}` }
    : {};
  const sid = keyed
    ? (await (await svc.app.request("/v1/series", {
      method: "POST",
      headers: { ...headers, "content-type": "application/json" },
      body: JSON.stringify(smallSeries("fuzz")),
    })).json()).series.id
    : await uploadSeries(svc, smallSeries("fuzz"));
  const run = await (await svc.app.request("/v1/smoothing", {
    method: "POST",
    headers: { ...headers, "content-type": "application/json" },
    body: JSON.stringify({ series: sid, method: "running_mean", window: 3 }),
  })).json();
  const statuses = new Map<number, number>();
  const faults: string[] = [];
  const t0 = performance.now();
  await fc.assert(
    fc.asyncProperty(
      fuzzRequest({ series: [sid], runs: [run.id] }, headers.Authorization),
      async (req) => {
        const res = await svc.app.request(req.url, {
          method: req.method,
          headers: req.headers,
          body: req.body,
        });
        statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1);
        const fault = responseFault(res);
        await res.body?.cancel();
        if (fault) faults.push(`${req.method} ${req.url}: ${fault}`);
        return true;
      },
    ),
    { numRuns: RUNS, seed: SEED },
  );
  const seconds = (performance.now() - t0) / 1000;
  await svc.close();
  const fiveXX = [...statuses].filter(([s]) => s >= 500).reduce((a, [, n]) => a + n, 0);
  console.log(JSON.stringify({
    instance: label,
    requests: RUNS,
    seconds: Math.round(seconds * 10) / 10,
    five_xx: fiveXX,
    faults: faults.length,
    statuses: Object.fromEntries([...statuses].sort((a, b) => a[0] - b[0])),
    first_faults: faults.slice(0, 10),
  }));
}

await fuzz("single-user (no keys)", false);
await fuzz("shared (keys required)", true);
