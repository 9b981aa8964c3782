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
import { dailySpots, demoIds, months3000 } from "./http_bench_inputs.ts";
import { spawnService } from "./spawn_service.ts";
import { abOptions, loadAverage } from "./ab_options.ts";
import { sha256Hex } from "../../api/canonical.ts";

const { arg, dirs, rounds: ROUNDS } = abOptions({ rounds: 15 });
const REC_ROUNDS = Number(arg("rec-rounds", "5"));
const load = loadAverage;
const median = (xs: number[]) => {
  const a = [...xs].sort((p, q) => p - q);
  return a.length % 2 ? a[(a.length - 1) / 2] : (a[a.length / 2 - 1] + a[a.length / 2]) / 2;
};

/** The service of checkout `root` as `deno task start` runs it, on a SQLite file of its own. */
async function start(root: string, port: number) {
  const dir = await Deno.makeTempDir({ prefix: "sunlag-ab-" });
  const svc = await spawnService(root, port, {
    HOST: "127.0.0.1",
    SUNLAG_STORE: `sqlite:${dir}/sunlag.db`,
  });
  return {
    ...svc,
    async stop() {
      await svc.stop();
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

/** The requests of one service: a cycles body and a reconstruction body. */
async function bodies(base: string) {
  const by = await demoIds(base);
  const cyc = (await post(base, "/v1/series", months3000("ab months"))).json.series.id;
  const spots = (await post(base, "/v1/series", dailySpots(0, "ab daily"))).json.series.id;
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
