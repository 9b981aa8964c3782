/**
 * Round trips of POST runs on two checkouts of the service, interleaved: a cycles run on 3,000
 * months and a 153,000-day reconstruction, each service started as `deno task start` starts it
 * (SQLite file in a temporary directory, demo data), requests alternating between the two.
 * Prints medians, per-round ratios and the load average. Use it to compare a change with the
 * commit before it (`git archive <commit> | tar -x -C DIR`, with node_modules linked in).
 *
 * Usage: deno run -A test/bench/http_runs_ab.ts --a DIR_A --b DIR_B [--rounds 15]
 *   [--rec-rounds 5]
 *
 * @module
 */
import { periodKeyRange, periodSequence } from "../../core/series/mod.ts";
import { demoFileEntries } from "../../api/demo.ts";
import { sha256Hex } from "../../api/canonical.ts";

const args = Deno.args;
const arg = (name: string, dflt?: string) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? args[i + 1] : dflt;
};
const dirs = { a: arg("a")!, b: arg("b")! };
const ROUNDS = Number(arg("rounds", "15"));
const REC_ROUNDS = Number(arg("rec-rounds", "5"));
const load = () => Deno.readTextFileSync("/proc/loadavg").split(" ").slice(0, 3).join(" ");
const median = (xs: number[]) => {
  const a = [...xs].sort((p, q) => p - q);
  return a.length % 2 ? a[(a.length - 1) / 2] : (a[a.length / 2 - 1] + a[a.length / 2]) / 2;
};

async function start(root: string, port: number) {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-ab-" });
  const child = new Deno.Command(Deno.execPath(), {
    args: ["run", "-A", "api/main.ts"],
    cwd: root,
    env: {
      PORT: String(port),
      HOST: "127.0.0.1",
      SUNLAG_STORE: `sqlite:${dir}/sunlag.db`,
      SUNLAG_LOG: "0",
    },
    stdout: "null",
    stderr: "inherit",
  }).spawn();
  const base = `http://127.0.0.1:${port}`;
  for (let k = 0; k < 1200; k++) {
    try {
      const r = await fetch(`${base}/v1/health`);
      await r.body?.cancel();
      if (r.ok) break;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  return {
    base,
    pid: child.pid,
    async stop() {
      child.kill("SIGTERM");
      await child.status;
      await Deno.remove(dir, { recursive: true });
    },
  };
}

async function post(base: string, path: string, body: unknown) {
  const t0 = performance.now();
  const res = await fetch(`${base}${path}`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify(body),
  });
  const text = await res.text();
  const ms = performance.now() - t0;
  if (res.status !== 201) throw new Error(`${path}: ${res.status} ${text.slice(0, 300)}`);
  return { ms, json: JSON.parse(text) };
}

/** Demo series ids by file name (the committed demo: the same content ids in both). */
async function ids(base: string): Promise<Record<string, string>> {
  const entries = await demoFileEntries();
  const list = await (await fetch(`${base}/v1/series?limit=200`)).json();
  const out: Record<string, string> = {};
  for (const e of entries) {
    const hit = list.items.find((s: { name: string }) => s.name === e.upload.name);
    if (hit) out[e.file] = hit.id;
  }
  return out;
}

function months3000() {
  const time: string[] = [], value: number[] = [];
  for (let i = 0; i < 3000; i++) {
    time.push(`${1750 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, "0")}`);
    const cyc = 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / 131);
    const amp = 120 + 60 * Math.sin((2 * Math.PI * i) / 1000);
    value.push(Math.max(0, amp * cyc ** 1.5 + 15 * Math.sin(0.7331 * i) * Math.sin(1.913 * i)));
  }
  return { name: "ab months", quantity: "sunspot_number", units: "1", version: "2", time, value };
}

function dailySpots() {
  const days = periodKeyRange(1610, 2030, "daily");
  const time = Array.from(periodSequence(days.first, days.last, "daily").middle);
  const value = time.map((t) => Math.max(0, 100 * (1 + Math.sin((2 * Math.PI * t) / 11))));
  return { name: "ab daily", quantity: "sunspot_number", units: "1", version: "2", time, value };
}

/** The requests of one service: a cycles body and a reconstruction body. */
async function bodies(base: string) {
  const by = await ids(base);
  const cyc = (await post(base, "/v1/series", months3000())).json.series.id;
  const spots = (await post(base, "/v1/series", dailySpots())).json.series.id;
  const area = by["sunspot_area_daily.csv"], fac = by["facular_index_daily.csv"];
  const tsi = by["tsi_daily.csv"];
  const dark = (await post(base, "/v1/irradiance/darkening", { total_area: area })).json;
  const psi = dark.saved_series.find((s: { output: string }) => s.output === "psi").id;
  const model = (await post(base, "/v1/irradiance/models", {
    tsi,
    terms: [
      { name: "mg", role: "facular", series: fac, quiet_level: 0.15 },
      { name: "psi", role: "sunspot_darkening", series: psi },
    ],
    sunspot_number: spots,
  })).json.id;
  return {
    cycles: { series: cyc },
    rec: {
      model,
      proxies: [{ term: "mg", series: fac }, { term: "psi", series: psi }],
      sunspot_number: spots,
      period: { start: "1610", end: "2029" },
      resolution: "daily",
    },
  };
}

const loadStart = load();
const a = await start(dirs.a, 18461), b = await start(dirs.b, 18462);
try {
  const ba = await bodies(a.base), bb = await bodies(b.base);
  const t = {
    a: { cyc: [] as number[], rec: [] as number[] },
    b: { cyc: [] as number[], rec: [] as number[] },
  };
  for (let k = 0; k < 3; k++) {
    await post(a.base, "/v1/cycles", ba.cycles);
    await post(b.base, "/v1/cycles", bb.cycles);
  }
  const cycDigest = { a: "", b: "" };
  for (let k = 0; k < ROUNDS; k++) {
    const [first, second] = k % 2 ? ["b", "a"] as const : ["a", "b"] as const;
    for (const w of [first, second]) {
      const s = w === "a" ? a : b, body = w === "a" ? ba : bb;
      const r = await post(s.base, "/v1/cycles", body.cycles);
      t[w].cyc.push(r.ms);
      cycDigest[w] = r.json.result_digest;
    }
  }
  const digest = { a: "", b: "" };
  for (let k = 0; k < REC_ROUNDS; k++) {
    const [first, second] = k % 2 ? ["b", "a"] as const : ["a", "b"] as const;
    for (const w of [first, second]) {
      const s = w === "a" ? a : b, body = w === "a" ? ba : bb;
      const r = await post(s.base, "/v1/irradiance/reconstructions", body.rec);
      t[w].rec.push(r.ms);
      // the result names the model run (a random run id) and the darkening series: the same
      // numbers give the same text once those ids are replaced
      const text = JSON.stringify(r.json.result)
        .replaceAll(body.rec.model, "MODEL")
        .replaceAll(body.rec.proxies[1].series, "PSI");
      digest[w] = sha256Hex(text);
    }
  }
  for (
    const [name, key] of [["cycles, 3,000 months", "cyc"], [
      "reconstruction, 153,000 days",
      "rec",
    ]] as const
  ) {
    const ma = median(t.a[key]), mb = median(t.b[key]);
    const ratios = t.a[key].map((x, i) => (t.b[key][i] / x).toFixed(2));
    console.log(
      `${name}: a ${ma.toFixed(1)} ms, b ${mb.toFixed(1)} ms (medians of ${t.a[key].length}); b/a ${
        (mb / ma).toFixed(2)
      }; per round ${ratios.join(" ")}`,
    );
  }
  console.log(`cycles digests equal: ${cycDigest.a === cycDigest.b} (${cycDigest.b})`);
  console.log(
    `reconstruction results equal once run ids are replaced: ${digest.a === digest.b}`,
  );
  console.log(`load average at start ${loadStart}, at end ${load()}`);
} finally {
  await a.stop();
  await b.stop();
}
