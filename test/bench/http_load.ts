/**
 * HTTP load benchmark (driven by test/bench/http_bench.sh): Debian's `wrk` against 127.0.0.1
 * only, every load bounded in time.
 *
 * 1. A Hono hello-world on Deno.serve (test/bench/http_hello.ts) as the baseline.
 * 2. The service as `deno task start` runs it (api/main.ts) on a spare port with an in-memory
 *    store and the demo data: cached GETs of a finished run (200, and 304 revalidation) and of
 *    its chart, and of a stored series' chart. Reported as req/s and as a ratio to the
 *    baseline (goal: at least 1/3).
 * 3. Health-check latency (p50/p99 from `wrk --latency`) while a 10,000-surrogate
 *    lag-correlation run is in progress on the worker pool (goal: p99 under 50 ms).
 *
 * Usage: deno run -A test/bench/http_load.ts [--seconds 5] [--connections 32]
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

// ---- 1. baseline
const hello = start(["run", "-A", "test/bench/http_hello.ts", String(HELLO_PORT)]);
let baseline: WrkResult;
try {
  await waitFor(`http://127.0.0.1:${HELLO_PORT}/`);
  await wrk(`http://127.0.0.1:${HELLO_PORT}/`, { seconds: 1 }); // warm-up
  baseline = await wrk(`http://127.0.0.1:${HELLO_PORT}/`);
  results.hello_world = baseline;
} finally {
  await stop(hello);
}

// ---- 2. the service
const base = `http://127.0.0.1:${SERVICE_PORT}`;
const service = start(["run", "-A", "api/main.ts"], {
  PORT: String(SERVICE_PORT),
  HOST: "127.0.0.1",
  SUNLAG_STORE: "sqlite::memory:",
  SUNLAG_DEMO: "1",
  SUNLAG_LOG: "0",
});
try {
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
  const etagOf = async (u: string) => {
    const r = await fetch(u);
    const bytes = (await r.arrayBuffer()).byteLength;
    return { etag: r.headers.get("etag") ?? "", bytes };
  };
  const targets: [string, string][] = [
    ["run_json", runUrl],
    ["run_chart_svg", `${runUrl}/chart.svg`],
    ["series_chart_svg", `${base}/v1/series/${spots}/chart.svg`],
  ];
  const served: Record<string, unknown> = {};
  for (const [name, url] of targets) {
    const { etag, bytes } = await etagOf(url);
    await wrk(url, { seconds: 1 }); // warm-up
    const full = await wrk(url);
    const revalidated = await wrk(url, { headers: { "If-None-Match": etag } });
    served[name] = {
      url: url.replace(base, ""),
      body_bytes: bytes,
      get_200: full,
      get_304: revalidated,
      ratio_200_to_hello: full.requests_per_second / baseline.requests_per_second,
      ratio_304_to_hello: revalidated.requests_per_second / baseline.requests_per_second,
    };
  }
  results.cached_gets = served;

  // ---- 3. health latency during a 10,000-surrogate run
  const healthIdle = await wrk(`${base}/v1/health`, { seconds: 3, connections: 4 });
  const t0 = Date.now();
  const heavy = await fetch(`${base}/v1/lag-correlations`, {
    method: "POST",
    headers: { "content-type": "application/json", Prefer: "respond-async" },
    body: JSON.stringify({ ...body, surrogates: 10_000, seed: 2 }),
  });
  const heavyRun = await heavy.json();
  if (heavy.status !== 202) throw new Error(`heavy run not async: ${heavy.status}`);
  const during = await wrk(`${base}/v1/health`, { seconds: SECONDS, connections: 4 });
  const afterLoad = await (await fetch(`${base}/v1/runs/${heavyRun.id}`)).json();
  let final = afterLoad;
  while (final.status === "queued" || final.status === "running") {
    await new Promise((r) => setTimeout(r, 250));
    final = await (await fetch(`${base}/v1/runs/${heavyRun.id}`)).json();
  }
  results.health_during_heavy_run = {
    surrogates: 10_000,
    idle: healthIdle,
    during,
    run_status_when_load_ended: afterLoad.status,
    run_progress_when_load_ended: afterLoad.progress,
    run_final_status: final.status,
    run_wall_seconds: (Date.now() - t0) / 1000,
  };
} finally {
  await stop(service);
}

console.log(JSON.stringify(results, null, 2));
const r = (x: number) => Math.round(x);
const cg = results.cached_gets as Record<string, {
  get_200: WrkResult;
  get_304: WrkResult;
  ratio_200_to_hello: number;
  ratio_304_to_hello: number;
}>;
console.log("\nsummary (req/s; ratio to hello-world)");
console.log(`hello-world            ${r(baseline.requests_per_second)}`);
for (const [k, v] of Object.entries(cg)) {
  console.log(
    `${k.padEnd(22)} 200: ${r(v.get_200.requests_per_second)} (${
      v.ratio_200_to_hello.toFixed(2)
    })  ` +
      `304: ${r(v.get_304.requests_per_second)} (${v.ratio_304_to_hello.toFixed(2)})`,
  );
}
const h = results.health_during_heavy_run as {
  idle: WrkResult;
  during: WrkResult;
  run_status_when_load_ended: string;
};
console.log(
  `health idle p50/p99 ms ${h.idle.latency_ms.p50}/${h.idle.latency_ms.p99}; during 10k-surrogate run ` +
    `p50/p99 ms ${h.during.latency_ms.p50}/${h.during.latency_ms.p99} (run ${h.run_status_when_load_ended} when the load ended)`,
);
