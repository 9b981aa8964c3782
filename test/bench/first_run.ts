/**
 * The first heavy run after a service start, for one or more checkouts in interleaved rounds
 * (e.g. this one and an export of an earlier commit): each round starts every checkout's
 * service as `deno task start` runs it (api/main.ts, a fresh SQLite file, demo data, the
 * default workers), posts a lag-correlation run (1,000 surrogates) the moment `/v1/health`
 * answers, then the same run with another seed; and once per round a start whose first run
 * waits 5 s after the health check. Reports, per checkout, medians and values of: health up
 * (ms from spawn), the first run, the next one, the first run 5 s after health, the
 * service's own `startup_ms` and `workers_warm` times from its log, and each worker's time to
 * `ready` when the checkout logs it. With the load average before and after.
 *
 * Usage: deno run -A test/bench/first_run.ts [--rounds 3] [--root DIR]... [--port 18443]
 * (no `--root`: this checkout only). Writes a JSON summary to $SUNLAG_BENCH_JSON when set.
 *
 * @module
 */
import { demoIds, firstRunLag } from "./http_bench_inputs.ts";

const args = Deno.args;
const opt = (name: string, dflt: number) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? Number(args[i + 1]) : dflt;
};
const ROUNDS = opt("rounds", 3);
const PORT = opt("port", 18443);
const roots = args.flatMap((a, i) => (a === "--root" ? [args[i + 1]] : []));
if (roots.length === 0) roots.push(new URL("../../", import.meta.url).pathname);

const median = (xs: number[]) => {
  if (xs.length === 0) return null;
  const a = [...xs].sort((p, q) => p - q);
  return a.length % 2 ? a[(a.length - 1) / 2] : (a[a.length / 2 - 1] + a[a.length / 2]) / 2;
};
const loadAverage = () => Deno.readTextFileSync("/proc/loadavg").split(" ").slice(0, 3).map(Number);

interface Started {
  base: string;
  healthMs: number;
  /** The service's log lines (JSON objects), as they come. */
  log: Record<string, unknown>[];
  stop(): Promise<void>;
}

async function start(root: string): Promise<Started> {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-first-" });
  const t0 = performance.now();
  const child = new Deno.Command(Deno.execPath(), {
    args: ["run", "-A", "api/main.ts"],
    cwd: root,
    env: { PORT: String(PORT), HOST: "127.0.0.1", SUNLAG_STORE: `sqlite:${dir}/sunlag.db` },
    stdout: "piped",
    stderr: "inherit",
  }).spawn();
  const log: Record<string, unknown>[] = [];
  const reading = (async () => {
    let rest = "";
    for await (const chunk of child.stdout.pipeThrough(new TextDecoderStream())) {
      const lines = (rest + chunk).split("\n");
      rest = lines.pop() ?? "";
      for (const line of lines) {
        try {
          log.push(JSON.parse(line));
        } catch {
          // not a log line
        }
      }
    }
  })();
  const base = `http://127.0.0.1:${PORT}`;
  let healthMs = NaN;
  for (const until = Date.now() + 120_000; Date.now() < until;) {
    try {
      const r = await fetch(`${base}/v1/health`);
      await r.body?.cancel();
      if (r.ok) {
        healthMs = performance.now() - t0;
        break;
      }
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 20));
  }
  if (!Number.isFinite(healthMs)) throw new Error(`${root}: /v1/health did not answer`);
  return {
    base,
    healthMs,
    log,
    async stop() {
      child.kill("SIGTERM");
      await child.status;
      await reading;
      await Deno.remove(dir, { recursive: true });
    },
  };
}

async function timedPost(base: string, body: unknown): Promise<number> {
  const t0 = performance.now();
  const res = await fetch(`${base}/v1/lag-correlations`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify(body),
  });
  const text = await res.text();
  if (res.status !== 201) throw new Error(`lag-correlations: ${res.status} ${text.slice(0, 300)}`);
  return performance.now() - t0;
}

/** Wait until the service logs `event` (the workers' warm-up ends after the first run). */
async function logged(s: Started, event: string, ms = 20_000) {
  for (const until = Date.now() + ms; Date.now() < until;) {
    const line = s.log.find((l) => l.event === event);
    if (line) return line;
    await new Promise((r) => setTimeout(r, 50));
  }
  return null;
}

interface Figures {
  health_ms: number[];
  first_ms: number[];
  second_ms: number[];
  first_ms_5s_after_health: number[];
  startup_ms: number[];
  workers_warm_ms: number[];
  worker_ready_ms: number[];
}
const figures: Record<string, Figures> = Object.fromEntries(roots.map((r) => [r, {
  health_ms: [],
  first_ms: [],
  second_ms: [],
  first_ms_5s_after_health: [],
  startup_ms: [],
  workers_warm_ms: [],
  worker_ready_ms: [],
}]));

const loadBefore = loadAverage();
for (let round = 0; round < ROUNDS; round++) {
  for (const late of [false, true]) {
    for (const root of roots) {
      const f = figures[root];
      const s = await start(root);
      try {
        f.health_ms.push(Math.round(s.healthMs));
        if (late) await new Promise((r) => setTimeout(r, 5000));
        const ids = await demoIds(s.base);
        const body = firstRunLag(ids);
        const first = Math.round(await timedPost(s.base, body));
        if (late) f.first_ms_5s_after_health.push(first);
        else {
          f.first_ms.push(first);
          f.second_ms.push(Math.round(await timedPost(s.base, { ...body, seed: 2 })));
        }
        const listening = s.log.find((l) => l.event === "listening");
        if (typeof listening?.startup_ms === "number") f.startup_ms.push(listening.startup_ms);
        const warm = await logged(s, "workers_warm");
        if (typeof warm?.ms === "number") f.workers_warm_ms.push(warm.ms);
        for (const t of (warm?.timings ?? []) as { ready_ms?: number }[]) {
          if (typeof t.ready_ms === "number") f.worker_ready_ms.push(t.ready_ms);
        }
      } finally {
        await s.stop();
      }
    }
  }
}
const loadAfter = loadAverage();

const summary = {
  workload: "lag-correlations (demo monthly series, max_lag 36, 1,000 surrogates), sync POST " +
    "right after /v1/health answers, then seed 2; one start per round posts 5 s after health",
  rounds: ROUNDS,
  load_average_before: loadBefore,
  load_average_after: loadAfter,
  checkouts: Object.fromEntries(
    roots.map((r) => [r, {
      medians: Object.fromEntries(
        Object.entries(figures[r]).map(([k, v]) => [k, median(v)]),
      ),
      values: figures[r],
    }]),
  ),
};
console.log(JSON.stringify(summary, null, 1));
const out = Deno.env.get("SUNLAG_BENCH_JSON");
if (out) await Deno.writeTextFile(out, JSON.stringify(summary, null, 2) + "\n");
