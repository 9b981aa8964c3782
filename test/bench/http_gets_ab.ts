/**
 * GETs of immutable representations on two checkouts of the service, interleaved, beside a
 * Hono hello-world: wrk (2 threads, 50 connections) against a finished run's JSON, its
 * chart.svg and a series as CSV (200, no If-None-Match) and the chart's 304, on each service
 * started as `deno task start` starts it (SQLite file in a temporary directory, demo data),
 * rounds alternating A and B, with the hello-world (12 bytes, and as many bytes as each body)
 * in every round. Both serve copies of one database (A made the run, then stopped, and both
 * start on a copy), so both must answer with the same bytes and ETags, which is checked.
 * Prints medians, per-round B/A ratios, ratios to the hello-world, median p99 latencies and the
 * load average.
 * Use it to compare a change with the commit before it (`git archive <commit> | tar -x -C DIR`,
 * with node_modules linked in).
 *
 * Usage: deno run -A test/bench/http_gets_ab.ts --a DIR_A --b DIR_B [--rounds 5] [--seconds 5]
 *   [--only run_json,run_chart_svg,series_csv,run_chart_svg_304]
 *
 * @module
 */
import { demoFileEntries } from "../../api/demo.ts";
import { abOptions, loadAverage } from "./ab_options.ts";

const { dirs, rounds: ROUNDS, seconds: SECONDS, only: ONLY } = abOptions({ rounds: 5 });
const load = loadAverage;
const median = (xs: number[]) => {
  const a = [...xs].sort((p, q) => p - q);
  return a.length % 2 ? a[(a.length - 1) / 2] : (a[a.length / 2 - 1] + a[a.length / 2]) / 2;
};

async function waitFor(url: string) {
  for (let k = 0; k < 1200; k++) {
    try {
      const r = await fetch(url);
      await r.body?.cancel();
      if (r.ok) return;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`${url} did not come up`);
}

function spawn(root: string, argv: string[], env: Record<string, string> = {}) {
  return new Deno.Command(Deno.execPath(), {
    args: argv,
    cwd: root,
    env,
    stdout: "null",
    stderr: "inherit",
  }).spawn();
}

async function start(root: string, port: number, dir: string) {
  const child = spawn(root, ["run", "-A", "api/main.ts"], {
    PORT: String(port),
    HOST: "127.0.0.1",
    SUNLAG_STORE: `sqlite:${dir}/sunlag.db`,
    SUNLAG_LOG: "0",
  });
  const base = `http://127.0.0.1:${port}`;
  await waitFor(`${base}/v1/health`);
  return {
    base,
    async stop() {
      child.kill("SIGTERM");
      await child.status;
    },
  };
}

/** Requests per second of one wrk run; its 99th percentile latency (ms) goes to `p99s`. */
async function wrk(
  url: string,
  headers: Record<string, string> = {},
  seconds = SECONDS,
  p99s?: number[],
) {
  const a = ["-t2", "-c50", `-d${seconds}s`, "--timeout", "5s", "--latency"];
  for (const [k, v] of Object.entries(headers)) a.push("-H", `${k}: ${v}`);
  a.push(url);
  const out = await new Deno.Command("wrk", { args: a, stdout: "piped" }).output();
  const text = new TextDecoder().decode(out.stdout);
  const bad = Number(/Non-2xx or 3xx responses:\s+(\d+)/.exec(text)?.[1] ?? 0);
  if (!out.success || bad) throw new Error(`wrk ${url}: ${text}`);
  const p99 = /^\s*99%\s+([\d.]+)(us|ms|s)\s*$/m.exec(text);
  if (p99 && p99s) p99s.push(Number(p99[1]) * ({ us: 1e-3, ms: 1, s: 1e3 }[p99[2]] ?? NaN));
  return Number(/Requests\/sec:\s+([\d.]+)/.exec(text)?.[1] ?? NaN);
}

/** The targets of one service: a finished lag run on the demo series, its chart, a CSV. */
async function targets(base: string) {
  const entries = await demoFileEntries();
  const list = await (await fetch(`${base}/v1/series?limit=200`)).json();
  const id = (file: string) =>
    list.items.find((s: { name: string }) =>
      s.name === entries.find((e) => e.file === file)!.upload.name
    ).id;
  const res = await fetch(`${base}/v1/lag-correlations`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({
      solar: id("sunspot_number_monthly.csv"),
      climate: id("temperature_anomaly_monthly.csv"),
      max_lag: 36,
      surrogates: 1000,
      seed: 1,
    }),
  });
  const run = await res.json();
  if (run.status !== "succeeded") throw new Error(`run: ${JSON.stringify(run).slice(0, 300)}`);
  return { run: run.id as string, series: id("sunspot_number_monthly.csv") as string };
}

function urlsOf(base: string, t: { run: string; series: string }): Record<string, string> {
  const runUrl = `${base}/v1/runs/${t.run}`;
  return {
    run_json: runUrl,
    run_chart_svg: `${runUrl}/chart.svg`,
    series_csv: `${base}/v1/series/${t.series}?format=csv`,
  };
}

async function get(url: string, headers: Record<string, string> = {}) {
  const r = await fetch(url, { headers: { "Accept-Encoding": "identity", ...headers } });
  return { status: r.status, etag: r.headers.get("etag") ?? "", body: await r.text() };
}

const HELLO_PORT = 18451;
const loadStart = load();
const hello = spawn(new URL("../../", import.meta.url).pathname, [
  "run",
  "-A",
  new URL("./http_hello.ts", import.meta.url).pathname,
  String(HELLO_PORT),
]);
const helloUrl = `http://127.0.0.1:${HELLO_PORT}/`;
const tmp = await Deno.makeTempDir({ prefix: "sunlag-gets-ab-" });
await Deno.mkdir(`${tmp}/a`);
let a = await start(dirs.a, 18452, `${tmp}/a`);
const made = await targets(a.base);
await a.stop();
await new Deno.Command("cp", { args: ["-r", `${tmp}/a`, `${tmp}/b`] }).output();
a = await start(dirs.a, 18452, `${tmp}/a`);
const b = await start(dirs.b, 18453, `${tmp}/b`);
try {
  await waitFor(helloUrl);
  const ta = { urls: urlsOf(a.base, made) }, tb = { urls: urlsOf(b.base, made) };
  const cases: {
    name: string;
    a: [string, Record<string, string>];
    b: [string, Record<string, string>];
    bytes: number;
  }[] = [];
  for (const name of Object.keys(ta.urls)) {
    const ra = await get(ta.urls[name]), rb = await get(tb.urls[name]);
    const same = ra.status === 200 && ra.body === rb.body && ra.etag === rb.etag;
    console.log(
      `${name}: ${
        new TextEncoder().encode(ra.body).byteLength
      } bytes, A and B serve the same bytes and ETag: ${same}`,
    );
    cases.push({
      name,
      a: [ta.urls[name], {}],
      b: [tb.urls[name], {}],
      bytes: new TextEncoder().encode(ra.body).byteLength,
    });
    if (name === "run_chart_svg") {
      const na = await get(ta.urls[name], { "If-None-Match": ra.etag });
      const nb = await get(tb.urls[name], { "If-None-Match": rb.etag });
      console.log(`${name} with If-None-Match: A ${na.status}, B ${nb.status}`);
      cases.push({
        name: `${name}_304`,
        a: [ta.urls[name], { "If-None-Match": ra.etag }],
        b: [tb.urls[name], { "If-None-Match": rb.etag }],
        bytes: 12,
      });
    }
  }
  const chosen = cases.filter((c) => !ONLY || ONLY.includes(c.name));
  // warm-up
  await wrk(helloUrl, {}, 2);
  for (const c of chosen) {
    await wrk(...c.a, 2);
    await wrk(...c.b, 2);
  }
  const rps: Record<string, { a: number[]; b: number[]; same: number[] }> = {};
  const p99: Record<string, { a: number[]; b: number[]; same: number[] }> = {};
  const helloRps: number[] = [];
  for (const c of chosen) {
    rps[c.name] = { a: [], b: [], same: [] };
    p99[c.name] = { a: [], b: [], same: [] };
  }
  for (let k = 0; k < ROUNDS; k++) {
    helloRps.push(await wrk(helloUrl));
    for (const c of chosen) {
      const order = k % 2 ? ["b", "a"] as const : ["a", "b"] as const;
      for (const w of order) {
        rps[c.name][w].push(await wrk(...c[w], SECONDS, p99[c.name][w]));
      }
      rps[c.name].same.push(
        await wrk(`${helloUrl}bytes/${c.bytes}`, {}, SECONDS, p99[c.name].same),
      );
    }
  }
  const h = median(helloRps);
  console.log(
    `wrk 2 threads, 50 connections, ${SECONDS} s, ${ROUNDS} rounds; hello-world ${
      h.toFixed(0)
    } req/s (median)`,
  );
  for (const c of chosen) {
    const r = rps[c.name];
    const ma = median(r.a), mb = median(r.b), ms = median(r.same);
    console.log(
      `${c.name} (${c.bytes} B): A ${ma.toFixed(0)}, B ${mb.toFixed(0)} req/s; B/A ${
        (mb / ma).toFixed(2)
      } (per round ${r.a.map((x, i) => (r.b[i] / x).toFixed(2)).join(" ")}); of hello A ${
        (ma / h).toFixed(3)
      } B ${(mb / h).toFixed(3)}; same-bytes hello ${ms.toFixed(0)}: A ${(ma / ms).toFixed(2)} B ${
        (mb / ms).toFixed(2)
      }; p99 latency (median) A ${median(p99[c.name].a).toFixed(1)} ms, B ${
        median(p99[c.name].b).toFixed(1)
      } ms, same-bytes hello ${median(p99[c.name].same).toFixed(1)} ms`,
    );
  }
  console.log(`load average at start ${loadStart}, at end ${load()}`);
} finally {
  await a.stop();
  await b.stop();
  hello.kill("SIGTERM");
  await hello.status;
  await Deno.remove(tmp, { recursive: true });
}
