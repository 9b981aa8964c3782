/**
 * The service over HTTP beside a Hono hello-world on Deno, in one interleaved run:
 *
 * 1. wrk (Debian; 2 threads, 50 connections, 10 s by default) against the service as
 *    `deno task start` runs it (api/main.ts, SQLite file in a temporary data directory, demo
 *    data) and a hello-world (test/bench/http_hello.ts), in alternating rounds: GET of a
 *    finished run (no If-None-Match), of its chart.svg, of a series as CSV, and 304s. Medians
 *    and ratios to the hello-world, with the load average.
 * 2. A series as CSV, cold (the first request after start) and warm (median of single GETs).
 * 3. A run's HTTP time beside its compute time: a cycles run on 3,000 months, and a
 *    calibration (about 17,000 days) plus a 153,000-day reconstruction; compute time is the
 *    analysis' own compute (the same request, in this process, no HTTP, no digest, no store).
 * 4. First heavy run after start (worker warm-up) beside the next one.
 * 5. Resident memory of the service (VmRSS, VmHWM from /proc) after one reconstruction in a
 *    fresh process, and after a sequence of runs (five lag runs with uploads, three
 *    153,000-day reconstructions), right after it and 10 s later.
 *
 * Usage: deno run -A test/bench/http_peers.ts [--seconds 10] [--rounds 3] [--threads 2]
 *   [--connections 50] [--only wrk|runs|memory|first] [--root DIR]
 * `--root` starts the service of another checkout (e.g. an export of an earlier commit) for a
 * before/after comparison; the hello-world and the in-process compute stay this checkout's.
 * Writes a JSON summary to $SUNLAG_BENCH_JSON when set.
 *
 * @module
 */
import { dailySpots, demoIds, firstRunLag, months3000 } from "./http_bench_inputs.ts";
import { makeTestApp, type TestService } from "../api/helpers.ts";
import { RUN_KINDS } from "../../api/analyses/registry.ts";
import { makeContext } from "../../api/runs/service.ts";

const args = Deno.args;
const opt = (name: string, dflt: number) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? Number(args[i + 1]) : dflt;
};
const only = (() => {
  const i = args.indexOf("--only");
  return i >= 0 ? args[i + 1].split(",") : null;
})();
const want = (part: string) => !only || only.includes(part);
const SECONDS = opt("seconds", 10);
const ROUNDS = opt("rounds", 3);
const THREADS = opt("threads", 2);
const CONNECTIONS = opt("connections", 50);
const HELLO_PORT = opt("hello-port", 18441);
const SERVICE_PORT = opt("service-port", 18442);
const ROOT = (() => {
  const i = args.indexOf("--root");
  return i >= 0 ? args[i + 1] : new URL("../../", import.meta.url).pathname;
})();

const median = (xs: number[]) => {
  const a = [...xs].sort((p, q) => p - q);
  return a.length % 2 ? a[(a.length - 1) / 2] : (a[a.length / 2 - 1] + a[a.length / 2]) / 2;
};
const r1 = (x: number) => Math.round(x * 10) / 10;
const loadAverage = () => Deno.readTextFileSync("/proc/loadavg").split(" ").slice(0, 3).map(Number);

/** VmRSS and VmHWM (peak) of a process, MiB. */
function memoryOf(pid: number): { rss_mib: number; peak_mib: number } {
  const s = Deno.readTextFileSync(`/proc/${pid}/status`);
  const kb = (k: string) => Number(new RegExp(`^${k}:\\s+(\\d+)`, "m").exec(s)?.[1] ?? NaN);
  return { rss_mib: r1(kb("VmRSS") / 1024), peak_mib: r1(kb("VmHWM") / 1024) };
}

interface Wrk {
  rps: number;
  p50_ms: number;
  p99_ms: number;
  bad: number;
}

function toMs(v: string): number {
  const m = /^([\d.]+)(us|ms|s|m)$/.exec(v.trim());
  if (!m) return NaN;
  const x = Number(m[1]);
  return m[2] === "us" ? x / 1000 : m[2] === "ms" ? x : m[2] === "s" ? x * 1000 : x * 60000;
}

async function wrk(url: string, headers: Record<string, string> = {}, seconds = SECONDS) {
  const a = [`-t${THREADS}`, `-c${CONNECTIONS}`, `-d${seconds}s`, "--latency", "--timeout", "5s"];
  for (const [k, v] of Object.entries(headers)) a.push("-H", `${k}: ${v}`);
  a.push(url);
  const out = await new Deno.Command("wrk", { args: a, stdout: "piped", stderr: "piped" }).output();
  const text = new TextDecoder().decode(out.stdout);
  if (!out.success) throw new Error(`wrk failed: ${new TextDecoder().decode(out.stderr)}`);
  const lat = (p: string) => toMs(new RegExp(`^\\s+${p}%\\s+(\\S+)`, "m").exec(text)?.[1] ?? "");
  return {
    rps: Number(/Requests\/sec:\s+([\d.]+)/.exec(text)?.[1] ?? NaN),
    p50_ms: lat("50"),
    p99_ms: lat("99"),
    bad: Number(/Non-2xx or 3xx responses:\s+(\d+)/.exec(text)?.[1] ?? 0),
  } satisfies Wrk;
}

interface Proc {
  pid: number;
  stop(): Promise<void>;
}

function spawn(argv: string[], env: Record<string, string> = {}): Proc {
  const child = new Deno.Command(Deno.execPath(), {
    args: argv,
    cwd: ROOT,
    env,
    stdout: "null",
    stderr: "inherit",
  }).spawn();
  return {
    pid: child.pid,
    async stop() {
      try {
        child.kill("SIGTERM");
      } catch {
        // already gone
      }
      await child.status;
    },
  };
}

async function waitFor(url: string, seconds = 120): Promise<number> {
  const t0 = performance.now();
  const until = Date.now() + seconds * 1000;
  while (Date.now() < until) {
    try {
      const r = await fetch(url);
      await r.body?.cancel();
      if (r.ok) return performance.now() - t0;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`${url} did not come up in ${seconds} s`);
}

/** The service as `deno task start` runs it, on a fresh SQLite file in a temporary directory. */
async function startService(port: number): Promise<Proc & { base: string; ready_ms: number }> {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-bench-" });
  const p = spawn(["run", "-A", "api/main.ts"], {
    PORT: String(port),
    HOST: "127.0.0.1",
    SUNLAG_STORE: `sqlite:${dir}/sunlag.db`,
    SUNLAG_LOG: "0",
  });
  const base = `http://127.0.0.1:${port}`;
  const ready_ms = await waitFor(`${base}/v1/health`);
  return {
    ...p,
    base,
    ready_ms,
    async stop() {
      await p.stop();
      await Deno.remove(dir, { recursive: true });
    },
  };
}

async function post(base: string, path: string, body: unknown, headers = {}) {
  const res = await fetch(`${base}${path}`, {
    method: "POST",
    headers: { "content-type": "application/json", ...headers },
    body: JSON.stringify(body),
  });
  const json = await res.json();
  if (res.status !== 201 && res.status !== 200) {
    throw new Error(`${path}: ${res.status} ${JSON.stringify(json).slice(0, 400)}`);
  }
  return json;
}

// ---- request bodies -------------------------------------------------------------------------

interface ReconstructionInputs {
  model: Record<string, unknown>;
  reconstruction: (model: string) => Record<string, unknown>;
}

// deno-lint-ignore no-explicit-any
type Poster = (path: string, body: unknown) => Promise<Record<string, any>>;

async function reconstructionInputs(
  send: Poster,
  ids: Record<string, string>,
  phase = 0,
): Promise<ReconstructionInputs> {
  const spots = (await send("/v1/series", dailySpots(phase))).series.id as string;
  const dark = await send("/v1/irradiance/darkening", {
    total_area: ids["sunspot_area_daily.csv"],
  });
  const psi = dark.saved_series.find((s: { output: string }) => s.output === "psi").id;
  return {
    model: {
      tsi: ids["tsi_daily.csv"],
      terms: [
        { name: "mg", role: "facular", series: ids["facular_index_daily.csv"], quiet_level: 0.15 },
        { name: "psi", role: "sunspot_darkening", series: psi },
      ],
      sunspot_number: spots,
    },
    reconstruction: (model) => ({
      model,
      proxies: [
        { term: "mg", series: ids["facular_index_daily.csv"] },
        { term: "psi", series: psi },
      ],
      sunspot_number: spots,
      period: { start: "1610", end: "2029" },
      resolution: "daily",
    }),
  };
}

const remote = (base: string): Poster => (path, body) => post(base, path, body);
const local = (svc: TestService): Poster => async (path, body) => {
  const res = await svc.post(path, body);
  const json = await res.json();
  if (res.status !== 201 && res.status !== 200) {
    throw new Error(`${path}: ${res.status} ${JSON.stringify(json).slice(0, 400)}`);
  }
  return json;
};

/** Milliseconds of one POST, response read to the end. */
async function timedPost(base: string, path: string, body: unknown) {
  const t0 = performance.now();
  const res = await fetch(`${base}${path}`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify(body),
  });
  const text = await res.text();
  const ms = performance.now() - t0;
  if (res.status !== 201) throw new Error(`${path}: ${res.status} ${text.slice(0, 300)}`);
  return { ms, bytes: text.length, json: JSON.parse(text) };
}

/** Milliseconds of the kind's own compute in this process (no HTTP, digest or store). */
async function computeMs(svc: TestService, path: string, body: Record<string, unknown>) {
  const kind = RUN_KINDS.find((k) => k.path === path)!;
  const params = kind.request.parse(body) as Record<string, unknown>;
  const prep = await svc.runs.prepare(kind, params);
  const ctx = makeContext(
    prep,
    { progress: () => {}, isCancelled: () => false },
    (task, c) => svc.runs.executor.parallel(task, c),
  );
  const t0 = performance.now();
  await kind.compute(prep.params as never, ctx);
  return performance.now() - t0;
}

// ---- the run --------------------------------------------------------------------------------

const results: Record<string, unknown> = {
  machine: { cores: navigator.hardwareConcurrency, deno: Deno.version.deno },
  wrk: { threads: THREADS, connections: CONNECTIONS, seconds: SECONDS, rounds: ROUNDS },
  load_average_at_start: loadAverage(),
};
const lines: string[] = [];
const say = (s: string) => {
  lines.push(s);
  console.log(s);
};

if (want("first")) {
  // First heavy run after start beside the next one (fresh process each time).
  const firsts: number[] = [], seconds: number[] = [], ready: number[] = [], late: number[] = [];
  for (let k = 0; k < 4; k++) {
    const s = await startService(SERVICE_PORT);
    try {
      ready.push(s.ready_ms);
      // the last start: the first run 5 s after the health check answers
      if (k === 3) await new Promise((r) => setTimeout(r, 5000));
      const ids = await demoIds(s.base);
      const body = firstRunLag(ids);
      const first = (await timedPost(s.base, "/v1/lag-correlations", body)).ms;
      if (k === 3) late.push(first);
      else firsts.push(first);
      seconds.push((await timedPost(s.base, "/v1/lag-correlations", { ...body, seed: 2 })).ms);
    } finally {
      await s.stop();
    }
  }
  results.first_run = {
    workload: "lag-correlations, 1,000 surrogates, sync POST right after /v1/health answers",
    health_ready_ms: ready.map(Math.round),
    first_ms: firsts.map(Math.round),
    first_ms_5s_after_health: late.map(Math.round),
    second_ms: seconds.map(Math.round),
  };
  say(
    `first heavy run after start: ${firsts.map(Math.round).join(", ")} ms; the next one ` +
      `${seconds.map(Math.round).join(", ")} ms; first run 5 s after the health check ` +
      `${late.map(Math.round).join(", ")} ms; /v1/health up after ${
        ready.map(Math.round).join(", ")
      } ms`,
  );
}

if (want("runs")) {
  const svc = await makeTestApp();
  const s = await startService(SERVICE_PORT);
  try {
    const ids = await demoIds(s.base);
    // the same inputs in the in-process app (content ids are the same)
    const { loadDemo } = await import("../../api/demo.ts");
    await loadDemo(svc.store);
    const cycSeries = (await post(s.base, "/v1/series", months3000())).series.id;
    await local(svc)("/v1/series", months3000());
    const cycles = { series: cycSeries };
    const rec = await reconstructionInputs(remote(s.base), ids);
    const recLocal = await reconstructionInputs(local(svc), ids);
    const n = 7;
    const http = {
      cycles: [] as number[],
      calibration: [] as number[],
      reconstruction: [] as number[],
    };
    const comp = {
      cycles: [] as number[],
      calibration: [] as number[],
      reconstruction: [] as number[],
    };
    let recBytes = 0;
    const model0 = (await timedPost(s.base, "/v1/irradiance/models", rec.model)).json.id;
    // the model run in the in-process app, for the reconstruction's compute time
    const localModel = await local(svc)("/v1/irradiance/models", recLocal.model);
    // The cycles rounds first, on their own: right after a 38 MB reconstruction the service
    // (checkpointing that result's WAL) and this process (its garbage) are still busy with it,
    // and a run of a few milliseconds measured then times that work, not its own. Both sides
    // first run it untimed 5 times (common practice for a benchmark's warm-up): the service's
    // two workers and its finishing path (canonical JSON, digest, store) are compiled by then,
    // as the in-process compute is after its first runs; untimed, the first run over HTTP took
    // 25 ms and the next ones 16, 11, 10, 14, then about 8.
    for (let k = 0; k < 5 + n; k++) {
      const h = (await timedPost(s.base, "/v1/cycles", cycles)).ms;
      const c = await computeMs(svc, "/v1/cycles", cycles);
      if (k < 5) continue;
      http.cycles.push(h);
      comp.cycles.push(c);
    }
    for (let k = 0; k < n; k++) {
      http.calibration.push((await timedPost(s.base, "/v1/irradiance/models", rec.model)).ms);
      comp.calibration.push(await computeMs(svc, "/v1/irradiance/models", recLocal.model));
      const r = await timedPost(
        s.base,
        "/v1/irradiance/reconstructions",
        rec.reconstruction(model0),
      );
      http.reconstruction.push(r.ms);
      recBytes = r.bytes;
      comp.reconstruction.push(
        await computeMs(
          svc,
          "/v1/irradiance/reconstructions",
          recLocal.reconstruction(localModel.id),
        ),
      );
    }
    const row = (name: string, h: number[], c: number[]) => {
      const hm = median(h), cm = median(c);
      say(
        `${name.padEnd(34)} HTTP ${hm.toFixed(1).padStart(7)} ms  compute ${
          cm.toFixed(1).padStart(7)
        } ms  ratio ${(hm / cm).toFixed(1).padStart(5)}  goal ≤ ${(2 * cm + 5).toFixed(1)} ms`,
      );
      return { http_ms: r1(hm), compute_ms: r1(cm), ratio: r1(hm / cm), goal_ms: r1(2 * cm + 5) };
    };
    results.runs = {
      rounds: n,
      response_bytes_reconstruction: recBytes,
      cycles_3000_months: row("cycles, 3,000 months", http.cycles, comp.cycles),
      calibration: row("calibration (irradiance-models)", http.calibration, comp.calibration),
      reconstruction_153000_days: row(
        "reconstruction, 153,000 days",
        http.reconstruction,
        comp.reconstruction,
      ),
      calibration_plus_reconstruction: row(
        "calibration + reconstruction",
        http.calibration.map((x, i) => x + http.reconstruction[i]),
        comp.calibration.map((x, i) => x + comp.reconstruction[i]),
      ),
    };
  } finally {
    await s.stop();
    await svc.close();
  }
}

if (want("memory")) {
  // One reconstruction in a fresh process: its peak.
  const single = await startService(SERVICE_PORT);
  let singlePeak = NaN;
  try {
    const ids = await demoIds(single.base);
    const rec = await reconstructionInputs(remote(single.base), ids);
    const model = await post(single.base, "/v1/irradiance/models", rec.model);
    await post(single.base, "/v1/irradiance/reconstructions", rec.reconstruction(model.id));
    singlePeak = memoryOf(single.pid).peak_mib;
  } finally {
    await single.stop();
  }
  // A sequence: five lag runs with uploads, then three reconstructions.
  const s = await startService(SERVICE_PORT);
  try {
    const ids = await demoIds(s.base);
    const atStart = memoryOf(s.pid);
    for (let k = 0; k < 5; k++) {
      const up = await post(s.base, "/v1/series", {
        name: `bench climate ${k}`,
        quantity: "temperature_anomaly",
        units: "K",
        time: Array.from({ length: 1800 }, (_, i) => 1870 + (i + 0.5) / 12),
        value: Array.from({ length: 1800 }, (_, i) => 0.1 * Math.sin(i / (7 + k)) + 1e-3 * i),
      });
      await post(s.base, "/v1/lag-correlations", {
        solar: ids["sunspot_number_monthly.csv"],
        climate: up.series.id,
        max_lag: 36,
        surrogates: 2000,
        seed: k,
      });
    }
    const afterLag = memoryOf(s.pid);
    for (let k = 0; k < 3; k++) {
      const rec = await reconstructionInputs(remote(s.base), ids, k);
      const model = await post(s.base, "/v1/irradiance/models", rec.model);
      await post(s.base, "/v1/irradiance/reconstructions", rec.reconstruction(model.id));
    }
    const afterRec = memoryOf(s.pid);
    // settled: past the idle time after which a worker that built a very large result is
    // replaced (api/workers/pool.ts, RECYCLE_IDLE_MS = 5 s)
    await new Promise((r) => setTimeout(r, 10_000));
    const settled = memoryOf(s.pid);
    // the request thread's heap (the rest of the resident set: compute workers, code, buffers)
    const metrics = await (await fetch(`${s.base}/metrics`)).text();
    const mem = (k: string) =>
      r1(
        Number(
          new RegExp(`^sunlag_process_memory_bytes\\{kind="${k}"\\} (\\S+)`, "m")
            .exec(metrics)?.[1] ?? NaN,
        ) / 1048576,
      );
    const mainHeap = { heap_used_mib: mem("heap_used"), heap_total_mib: mem("heap_total") };
    results.memory = {
      single_reconstruction_peak_mib: singlePeak,
      sequence: {
        at_start: atStart,
        after_5_lag_runs: afterLag,
        after_3_reconstructions: afterRec,
      },
      settled_10s: settled,
      request_thread_heap: mainHeap,
      ratio_to_single_peak: r1(settled.rss_mib / singlePeak * 100) / 100,
    };
    say(
      `memory: one reconstruction in a fresh process peaks at ${singlePeak} MiB; a sequence ` +
        `starts at ${atStart.rss_mib} MiB, ${afterLag.rss_mib} after 5 lag runs with uploads, ` +
        `${afterRec.rss_mib} after 3 reconstructions (${settled.rss_mib} 10 s later, peak ` +
        `${settled.peak_mib}); ratio ${(settled.rss_mib / singlePeak).toFixed(2)} (goal ≤ 1.5); ` +
        `request thread heap ${mainHeap.heap_used_mib} used of ${mainHeap.heap_total_mib} MiB`,
    );
  } finally {
    await s.stop();
  }
}

if (want("wrk")) {
  const hello = spawn([
    "run",
    "-A",
    new URL("./http_hello.ts", import.meta.url).pathname,
    String(HELLO_PORT),
  ]);
  const s = await startService(SERVICE_PORT);
  const helloUrl = `http://127.0.0.1:${HELLO_PORT}/`;
  try {
    await waitFor(helloUrl);
    const ids = await demoIds(s.base);
    const run = await post(s.base, "/v1/lag-correlations", {
      solar: ids["sunspot_number_monthly.csv"],
      climate: ids["temperature_anomaly_monthly.csv"],
      max_lag: 36,
      surrogates: 1000,
      seed: 1,
    });
    const runUrl = `${s.base}/v1/runs/${run.id}`;
    const csvUrl = (id: string) => `${s.base}/v1/series/${id}?format=csv`;
    // cold: the first request of each daily demo series' CSV; warm: the same again
    const cold: number[] = [], warm: number[] = [];
    const daily = Object.entries(ids).filter(([f]) => f.includes("daily")).map(([, id]) => id);
    const get = async (u: string, h: Record<string, string> = {}) => {
      const t0 = performance.now();
      const r = await fetch(u, { headers: { "Accept-Encoding": "identity", ...h } });
      const b = await r.arrayBuffer();
      return { ms: performance.now() - t0, etag: r.headers.get("etag") ?? "", bytes: b.byteLength };
    };
    let csvBytes = 0;
    for (const id of daily) {
      cold.push((await get(csvUrl(id))).ms);
      for (let k = 0; k < 5; k++) {
        const w = await get(csvUrl(id));
        warm.push(w.ms);
        csvBytes = w.bytes;
      }
    }
    const spots = ids["sunspot_number_monthly.csv"];
    const targets: { name: string; url: string; headers?: Record<string, string> }[] = [];
    const sizes: Record<string, number> = {};
    for (
      const [name, url] of [
        ["run_json", runUrl],
        ["run_chart_svg", `${runUrl}/chart.svg`],
        ["series_csv", csvUrl(spots)],
      ] as const
    ) {
      const { etag, bytes } = await get(url);
      sizes[name] = bytes;
      targets.push({ name: `${name}_200`, url });
      // the hello-world answering as many bytes: the ceiling for a body of this size
      targets.push({ name: `hello_${name}_bytes`, url: `${helloUrl}bytes/${bytes}` });
      // what Python's requests and browsers ask for (Accept-Encoding: gzip)
      if (name !== "run_chart_svg") {
        targets.push({ name: `${name}_200_gzip`, url, headers: { "Accept-Encoding": "gzip" } });
      }
      targets.push({ name: `${name}_304`, url, headers: { "If-None-Match": etag } });
    }
    results.body_bytes = sizes;
    await wrk(helloUrl, {}, 2);
    for (const t of targets) await wrk(t.url, t.headers, 2);
    const rps: Record<string, number[]> = { hello_world: [] };
    const p99: Record<string, number[]> = { hello_world: [] };
    for (let round = 0; round < ROUNDS; round++) {
      const h = await wrk(helloUrl);
      rps.hello_world.push(h.rps);
      p99.hello_world.push(h.p99_ms);
      for (const t of targets) {
        const w = await wrk(t.url, t.headers);
        if (w.bad) throw new Error(`${t.name}: ${w.bad} responses not 2xx/3xx`);
        (rps[t.name] ??= []).push(w.rps);
        (p99[t.name] ??= []).push(w.p99_ms);
      }
    }
    const base = median(rps.hello_world);
    const table: Record<string, unknown> = {};
    say(
      `wrk ${THREADS} threads, ${CONNECTIONS} connections, ${SECONDS} s, ${ROUNDS} rounds ` +
        `(bodies: ${JSON.stringify(sizes)} bytes); ratio to the hello-world (12 bytes):`,
    );
    for (const [name, xs] of Object.entries(rps)) {
      const m = median(xs);
      table[name] = {
        median_rps: Math.round(m),
        rounds_rps: xs.map(Math.round),
        ratio_to_hello: Math.round(m / base * 1000) / 1000,
        median_p99_ms: median(p99[name]),
      };
      say(
        `  ${name.padEnd(20)} ${String(Math.round(m)).padStart(7)} req/s  ${
          (m / base).toFixed(3)
        }  p99 ${median(p99[name])} ms`,
      );
    }
    results.wrk_table = table;
    results.series_csv = {
      bytes: csvBytes,
      cold_ms: cold.map(r1),
      warm_median_ms: r1(median(warm)),
    };
    say(
      `series CSV (daily demo series, ~${(csvBytes / 1e6).toFixed(1)} MB): cold ${
        cold.map((x) => x.toFixed(0)).join(", ")
      } ms; warm median ${median(warm).toFixed(1)} ms`,
    );
  } finally {
    await s.stop();
    await hello.stop();
  }
}

results.load_average_at_end = loadAverage();
say(
  `load average at start ${(results.load_average_at_start as number[]).join(" ")}, at end ${
    (results.load_average_at_end as number[]).join(" ")
  }`,
);
const outPath = Deno.env.get("SUNLAG_BENCH_JSON");
if (outPath) await Deno.writeTextFile(outPath, JSON.stringify(results, null, 2) + "\n");
