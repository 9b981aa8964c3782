/**
 * HTTP load benchmark (driven by test/bench/http_bench.sh): Debian's `wrk` against 127.0.0.1
 * only, every load bounded in time.
 *
 * 1. A Hono hello-world on Deno.serve (test/bench/http_hello.ts) as the baseline.
 * 2. The service as `deno task start` runs it (api/main.ts) on a spare port with an in-memory
 *    store and the demo data: cached GETs of a finished run (200 identity, 200 gzip-coded, and
 *    304 revalidation) and of its chart, and of a stored series' chart. Reported as req/s and as a ratio to the
 *    baseline (goal: at least 1/3).
 * 3. Health-check latency (p50/p99 from `wrk --latency`) while a 10,000-surrogate
 *    lag-correlation run is in progress on the worker pool (goal: p99 under 50 ms).
 *
 * Usage: deno run -A test/bench/http_load.ts [--seconds 5] [--connections 32] [--rounds 3]
 *
 * @module
 */

const args = Deno.args;
const opt = (name: string, dflt: number) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? Number(args[i + 1]) : dflt;
};
const SECONDS = opt("seconds", 5);
const CONNECTIONS = opt("connections", 32);
const HELLO_PORT = opt("hello-port", 18431);
const SERVICE_PORT = opt("service-port", 18432);
const ROOT = new URL("../../", import.meta.url).pathname;

interface WrkResult {
  requests_per_second: number;
  latency_ms: Record<string, number>;
  requests: number;
  non_2xx_3xx: number;
  errors: string | null;
}

function toMs(v: string): number {
  const m = /^([\d.]+)(us|ms|s|m)$/.exec(v.trim());
  if (!m) return NaN;
  const x = Number(m[1]);
  return m[2] === "us" ? x / 1000 : m[2] === "ms" ? x : m[2] === "s" ? x * 1000 : x * 60000;
}

async function wrk(
  url: string,
  opts: { seconds?: number; connections?: number; headers?: Record<string, string> } = {},
): Promise<WrkResult> {
  const a = [
    "-t1",
    `-c${opts.connections ?? CONNECTIONS}`,
    `-d${opts.seconds ?? SECONDS}s`,
    "--latency",
    "--timeout",
    "5s",
  ];
  for (const [k, v] of Object.entries(opts.headers ?? {})) a.push("-H", `${k}: ${v}`);
  a.push(url);
  const out = await new Deno.Command("wrk", { args: a, stdout: "piped", stderr: "piped" }).output();
  const text = new TextDecoder().decode(out.stdout);
  if (!out.success) throw new Error(`wrk failed: ${new TextDecoder().decode(out.stderr)}`);
  const rps = Number(/Requests\/sec:\s+([\d.]+)/.exec(text)?.[1] ?? NaN);
  const latency: Record<string, number> = {};
  for (const m of text.matchAll(/^\s+(50|75|90|99)%\s+(\S+)/gm)) latency[`p${m[1]}`] = toMs(m[2]);
  const requests = Number(/(\d+) requests in/.exec(text)?.[1] ?? NaN);
  const non = Number(/Non-2xx or 3xx responses:\s+(\d+)/.exec(text)?.[1] ?? 0);
  const errors = /Socket errors:.*$/m.exec(text)?.[0] ?? null;
  return { requests_per_second: rps, latency_ms: latency, requests, non_2xx_3xx: non, errors };
}

async function waitFor(url: string, seconds = 60): Promise<void> {
  const until = Date.now() + seconds * 1000;
  while (Date.now() < until) {
    try {
      const r = await fetch(url);
      await r.body?.cancel();
      if (r.ok) return;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`${url} did not come up in ${seconds} s`);
}

function start(cmd: string[], env: Record<string, string> = {}): Deno.ChildProcess {
  return new Deno.Command(Deno.execPath(), {
    args: cmd,
    cwd: ROOT,
    env,
    stdout: "null",
    stderr: "inherit",
  }).spawn();
}

async function stop(p: Deno.ChildProcess) {
  try {
    p.kill("SIGTERM");
  } catch {
    // already gone
  }
  await p.status;
}

const results: Record<string, unknown> = {
  machine: { cores: navigator.hardwareConcurrency, deno: Deno.version.deno },
  wrk: { threads: 1, connections: CONNECTIONS, seconds: SECONDS },
};

const ROUNDS = opt("rounds", 3);
const median = (xs: number[]) => {
  const a = [...xs].sort((p, q) => p - q);
  return a.length % 2 ? a[(a.length - 1) / 2] : (a[a.length / 2 - 1] + a[a.length / 2]) / 2;
};
const loadAverage = () => {
  try {
    return Deno.readTextFileSync("/proc/loadavg").split(" ").slice(0, 3).map(Number);
  } catch {
    return null;
  }
};
results.load_average_at_start = loadAverage();

// Both servers run side by side; measurements alternate in rounds, so that a busy machine
// slows baseline and service alike, and the medians of the rounds are compared.
const hello = start(["run", "-A", "test/bench/http_hello.ts", String(HELLO_PORT)]);
const base = `http://127.0.0.1:${SERVICE_PORT}`;
const service = start(["run", "-A", "api/main.ts"], {
  PORT: String(SERVICE_PORT),
  HOST: "127.0.0.1",
  SUNLAG_STORE: "sqlite::memory:",
  SUNLAG_DEMO: "1",
  SUNLAG_LOG: "0",
});
const helloUrl = `http://127.0.0.1:${HELLO_PORT}/`;
let baseline = NaN;
try {
  await waitFor(helloUrl);
  await waitFor(`${base}/v1/health`);
  const list = await (await fetch(`${base}/v1/series?limit=100`)).json();
  const find = (q: string) =>
    list.items.find((s: { quantity: string }) => s.quantity === q)?.id as string;
  const spots = find("sunspot_number"), temp = find("temperature_anomaly");
  if (!spots || !temp) throw new Error("demo data lacks a sunspot number or temperature series");

  const body = { solar: spots, climate: temp, max_lag: 36, surrogates: 1000, seed: 1 };
  const created = await fetch(`${base}/v1/lag-correlations`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify(body),
  });
  const run = await created.json();
  if (created.status !== 201) {
    throw new Error(`run not created: ${created.status} ${JSON.stringify(run)}`);
  }
  const runUrl = `${base}/v1/runs/${run.id}`;
  // wrk sends no Accept-Encoding, so probe the identity representation (fetch would ask for gzip)
  const probe = async (u: string) => {
    const r = await fetch(u, { headers: { "Accept-Encoding": "identity" } });
    const bytes = (await r.arrayBuffer()).byteLength;
    const etag = r.headers.get("etag") ?? "";
    const again = await fetch(u, {
      headers: { "Accept-Encoding": "identity", "If-None-Match": etag },
    });
    await again.body?.cancel();
    if (again.status !== 304) {
      throw new Error(`${u}: expected 304 on revalidation, got ${again.status}`);
    }
    return { etag, bytes };
  };
  const targets: { name: string; url: string; headers?: Record<string, string>; bytes: number }[] =
    [];
  for (
    const [name, url] of [
      ["run_json", runUrl],
      ["run_chart_svg", `${runUrl}/chart.svg`],
      ["series_chart_svg", `${base}/v1/series/${spots}/chart.svg`],
      ["series_csv", `${base}/v1/series/${spots}?format=csv`],
    ]
  ) {
    const { etag, bytes } = await probe(url);
    targets.push({ name: `${name}_200`, url, bytes });
    targets.push({ name: `${name}_200_gzip`, url, headers: { "Accept-Encoding": "gzip" }, bytes });
    targets.push({ name: `${name}_304`, url, headers: { "If-None-Match": etag }, bytes: 0 });
  }
  // warm-up
  await wrk(helloUrl, { seconds: 1 });
  for (const t of targets) await wrk(t.url, { seconds: 1, headers: t.headers });
  const rps: Record<string, number[]> = { hello_world: [] };
  const last: Record<string, WrkResult> = {};
  for (let round = 0; round < ROUNDS; round++) {
    const h = await wrk(helloUrl);
    rps.hello_world.push(h.requests_per_second);
    last.hello_world = h;
    for (const t of targets) {
      const w = await wrk(t.url, { headers: t.headers });
      if (w.non_2xx_3xx) throw new Error(`${t.name}: ${w.non_2xx_3xx} bad responses`);
      (rps[t.name] ??= []).push(w.requests_per_second);
      last[t.name] = w;
    }
  }
  baseline = median(rps.hello_world);
  const served: Record<string, unknown> = {};
  for (const [name, xs] of Object.entries(rps)) {
    const t = targets.find((q) => q.name === name);
    served[name] = {
      url: t ? t.url.replace(base, "") : "/ (hello-world)",
      body_bytes: t?.bytes,
      rounds_rps: xs.map(Math.round),
      median_rps: Math.round(median(xs)),
      ratio_to_hello: median(xs) / baseline,
      last_latency_ms: last[name].latency_ms,
    };
  }
  results.cached_gets = served;

  // ---- 3. health latency during a 10,000-surrogate run: with the default pool (one worker per
  // core), then with one worker, which leaves a core to the request thread.
  results.health_during_heavy_run = {
    default_workers: await healthDuringHeavyRun(base, body),
  };
  await stop(service);
  const one = start(["run", "-A", "api/main.ts"], {
    PORT: String(SERVICE_PORT + 1),
    HOST: "127.0.0.1",
    SUNLAG_STORE: "sqlite::memory:",
    SUNLAG_DEMO: "1",
    SUNLAG_LOG: "0",
    SUNLAG_WORKERS: "1",
  });
  try {
    const base1 = `http://127.0.0.1:${SERVICE_PORT + 1}`;
    await waitFor(`${base1}/v1/health`);
    (results.health_during_heavy_run as Record<string, unknown>).one_worker =
      await healthDuringHeavyRun(base1, body);
  } finally {
    await stop(one);
  }
} finally {
  await stop(service);
  await stop(hello);
}

/** Latencies (ms) of /v1/health from 4 sequential clients until `stop()` says so. */
async function probeHealth(base: string, stop: () => boolean) {
  const ms: number[] = [];
  const client = async () => {
    while (!stop()) {
      const t0 = performance.now();
      const r = await fetch(`${base}/v1/health`);
      await r.body?.cancel();
      ms.push(performance.now() - t0);
    }
  };
  await Promise.all([client(), client(), client(), client()]);
  ms.sort((a, b) => a - b);
  const q = (p: number) => ms[Math.min(ms.length - 1, Math.floor(p * ms.length))];
  const r3 = (x: number) => Math.round(x * 1000) / 1000;
  return {
    samples: ms.length,
    p50_ms: r3(q(0.5)),
    p99_ms: r3(q(0.99)),
    max_ms: r3(ms[ms.length - 1]),
  };
}

/**
 * /v1/health latency idle and while a 10,000-surrogate lag-correlation run is in progress:
 * wrk for a fixed window, and 4 sequential fetch clients that run exactly while the run is
 * queued or running (so the whole sample falls inside the run).
 */
async function healthDuringHeavyRun(base: string, body: Record<string, unknown>) {
  const list = await (await fetch(`${base}/v1/series?limit=100`)).json();
  const find = (q: string) =>
    list.items.find((s: { quantity: string }) => s.quantity === q)?.id as string;
  const req = { ...body, solar: find("sunspot_number"), climate: find("temperature_anomaly") };
  const idle = await wrk(`${base}/v1/health`, { seconds: 3, connections: 4 });
  const idleUntil = Date.now() + 3000;
  const idleProbe = await probeHealth(base, () => Date.now() > idleUntil);
  const submit = async () => {
    const heavy = await fetch(`${base}/v1/lag-correlations`, {
      method: "POST",
      headers: { "content-type": "application/json", Prefer: "respond-async" },
      body: JSON.stringify({ ...req, surrogates: 10_000, seed: 2 }),
    });
    const run = await heavy.json();
    if (heavy.status !== 202) throw new Error(`heavy run not async: ${heavy.status}`);
    return run.id as string;
  };
  const status = async (id: string) => (await (await fetch(`${base}/v1/runs/${id}`)).json());
  // 1. wrk over a fixed window from the submission
  const id1 = await submit();
  const during = await wrk(`${base}/v1/health`, { seconds: SECONDS, connections: 4 });
  const afterLoad = await status(id1);
  let s1 = afterLoad;
  const until = Date.now() + 120_000;
  while ((s1.status === "queued" || s1.status === "running") && Date.now() < until) {
    await new Promise((r) => setTimeout(r, 200));
    s1 = await status(id1);
  }
  // 2. probe exactly while a second run (another seed) is queued or running
  const t0 = Date.now();
  const id2 = await submit();
  let running = true;
  const deadline = Date.now() + 180_000;
  const watch = (async () => {
    while (running) {
      const s = await status(id2);
      running = (s.status === "queued" || s.status === "running") && Date.now() < deadline;
      if (running) await new Promise((r) => setTimeout(r, 100));
    }
  })();
  const probe = await probeHealth(base, () => !running);
  await watch;
  return {
    surrogates: 10_000,
    idle,
    idle_probe: idleProbe,
    during,
    run_status_when_load_ended: afterLoad.status as string,
    run_progress_when_load_ended: afterLoad.progress as number,
    run_final_status: s1.status as string,
    during_run_probe: probe,
    probed_run_seconds: (Date.now() - t0) / 1000,
  };
}

results.load_average_at_end = loadAverage();
const outPath = Deno.env.get("SUNLAG_BENCH_JSON");
if (outPath) await Deno.writeTextFile(outPath, JSON.stringify(results, null, 2) + "\n");
console.log(JSON.stringify(results, null, 2));
const cg = results.cached_gets as Record<
  string,
  { median_rps: number; ratio_to_hello: number; rounds_rps: number[] }
>;
console.log(
  `\nsummary: median req/s over ${ROUNDS} alternating rounds of ${SECONDS} s; ratio to hello-world`,
);
for (const [k, v] of Object.entries(cg)) {
  console.log(
    `${k.padEnd(26)} ${String(v.median_rps).padStart(7)}  ${v.ratio_to_hello.toFixed(2)}  [${
      v.rounds_rps.join(", ")
    }]`,
  );
}
type Health = Awaited<ReturnType<typeof healthDuringHeavyRun>>;
for (const [k, h] of Object.entries(results.health_during_heavy_run as Record<string, Health>)) {
  console.log(
    `health (${k}) wrk idle p50/p99 ms ${h.idle.latency_ms.p50}/${h.idle.latency_ms.p99}; wrk from ` +
      `submission of a 10,000-surrogate run p50/p99 ms ${h.during.latency_ms.p50}/` +
      `${h.during.latency_ms.p99} (run ${h.run_status_when_load_ended} when the load ended)`,
  );
  console.log(
    `health (${k}) probe idle p50/p99/max ms ${h.idle_probe.p50_ms}/${h.idle_probe.p99_ms}/` +
      `${h.idle_probe.max_ms}; probe during the whole run (${h.probed_run_seconds.toFixed(1)} s, ` +
      `${h.during_run_probe.samples} requests) p50/p99/max ms ${h.during_run_probe.p50_ms}/` +
      `${h.during_run_probe.p99_ms}/${h.during_run_probe.max_ms}`,
  );
}
console.log(
  `load average start ${JSON.stringify(results.load_average_at_start)}, end ${
    JSON.stringify(results.load_average_at_end)
  }`,
);
