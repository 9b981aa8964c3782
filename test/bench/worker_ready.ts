/**
 * A compute worker's start on its own: the time from `new Worker` (api/workers/worker.ts with
 * the checkout's registry, as the pool starts it) to its `ready` message, then its warm-up, each
 * in a fresh process, for one or more checkouts in interleaved rounds. Medians and values, with
 * the load average before and after.
 *
 * Usage: deno run -A test/bench/worker_ready.ts [--rounds 5] [--root DIR]...
 * (no `--root`: this checkout only; a root needs its node_modules).
 *
 * @module
 */

const args = Deno.args;

if (args[0] === "--child") {
  // in the checkout's process: one worker, timed
  const root = Deno.cwd();
  const t0 = performance.now();
  const w = new Worker(`file://${root}/api/workers/worker.ts`, {
    type: "module",
    name: `file://${root}/api/analyses/registry.ts`,
  });
  const next = (type: string) =>
    new Promise<Record<string, unknown>>((resolve) => {
      w.onmessage = (e) => {
        if (e.data.type === type) resolve(e.data);
      };
    });
  await next("ready");
  const ready = performance.now() - t0;
  w.postMessage({ type: "warm", job: 1 });
  await next("done");
  console.log(JSON.stringify({ ready_ms: ready, warm_ms: performance.now() - t0 - ready }));
  w.terminate();
  Deno.exit(0);
}

const opt = (name: string, dflt: number) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? Number(args[i + 1]) : dflt;
};
const ROUNDS = opt("rounds", 5);
const roots = args.flatMap((a, i) => (a === "--root" ? [args[i + 1]] : []));
if (roots.length === 0) roots.push(new URL("../../", import.meta.url).pathname);
const median = (xs: number[]) => {
  const a = [...xs].sort((p, q) => p - q);
  return a.length % 2 ? a[(a.length - 1) / 2] : (a[a.length / 2 - 1] + a[a.length / 2]) / 2;
};
const loadAverage = () => Deno.readTextFileSync("/proc/loadavg").split(" ").slice(0, 3).map(Number);

const ready: Record<string, number[]> = {}, warm: Record<string, number[]> = {};
const before = loadAverage();
for (let r = 0; r < ROUNDS; r++) {
  for (const root of roots) {
    const out = await new Deno.Command(Deno.execPath(), {
      args: [
        "run",
        "-A",
        "--config",
        `${root}/deno.json`,
        new URL(import.meta.url).pathname,
        "--child",
      ],
      cwd: root,
      stdout: "piped",
      stderr: "inherit",
    }).output();
    const m = JSON.parse(new TextDecoder().decode(out.stdout).trim().split("\n").pop()!);
    (ready[root] ??= []).push(Math.round(m.ready_ms));
    (warm[root] ??= []).push(Math.round(m.warm_ms));
  }
}
console.log(JSON.stringify(
  {
    load_average_before: before,
    load_average_after: loadAverage(),
    checkouts: Object.fromEntries(roots.map((r) => [r, {
      ready_ms: { median: median(ready[r]), values: ready[r] },
      warm_ms: { median: median(warm[r]), values: warm[r] },
    }])),
  },
  null,
  1,
));
