/**
 * Downloads of succeeded runs on two checkouts of the service, interleaved: a reconstruction's
 * output as JSON, CSV and NetCDF (an ensemble of members on a realization axis), a forcing
 * run's NetCDF, a spectral reconstruction's spectrum as JSON, CSV and NetCDF, and a solar-signal
 * map as JSON, CSV and NetCDF, each service started as `deno task start` starts it (SQLite file
 * in a temporary directory, demo data). A makes the runs, stops, and both start on copies of
 * its database, so both must answer alike: every case is asked cold and warm, as GET and HEAD,
 * with and without `Accept-Encoding: gzip` and `If-None-Match`, and status, headers (but `Date`
 * and the request id) and the SHA-256 of the bytes are compared. Then, rounds alternating A and
 * B: the latency of single sequential requests (medians of 15 a round), and wrk (2 threads, 50
 * connections) beside a Hono hello-world, each wrk run followed by a wait until the service has
 * answered what wrk left queued. Prints medians, per-round B/A ratios and the load average.
 *
 * Use it to compare a change with the commit before it (`git archive <commit> | tar -x -C DIR`,
 * with node_modules linked in).
 *
 * Usage: deno run -A test/bench/http_downloads_ab.ts --a DIR_A --b DIR_B [--rounds 5]
 *   [--seconds 5] [--only output_json,map_netcdf,...] [--no-wrk]
 *
 * @module
 */
import { DEMO_FIELD, DEMO_SERIES } from "../../api/schemas/examples.ts";
import { type SpawnedService, spawnService } from "./spawn_service.ts";
import { abOptions, loadAverage } from "./ab_options.ts";

const { dirs, rounds: ROUNDS, seconds: SECONDS, only: ONLY } = abOptions({ rounds: 5 });
const WRK = !Deno.args.includes("--no-wrk");
const load = loadAverage;
const median = (xs: number[]) => {
  const a = [...xs].sort((p, q) => p - q);
  return a.length % 2 ? a[(a.length - 1) / 2] : (a[a.length / 2 - 1] + a[a.length / 2]) / 2;
};

async function post(base: string, path: string, body: unknown, headers = {}) {
  const res = await fetch(base + path, {
    method: "POST",
    headers: { "content-type": "application/json", ...headers },
    body: JSON.stringify(body),
  });
  const json = await res.json();
  if (res.status !== 201 && res.status !== 202 && res.status !== 200) {
    throw new Error(`${path}: ${res.status} ${JSON.stringify(json).slice(0, 400)}`);
  }
  return json;
}

async function finished(base: string, id: string) {
  for (;;) {
    const r = await (await fetch(`${base}/v1/runs/${id}`)).json();
    if (r.status === "succeeded") return r;
    if (r.status === "failed" || r.status === "cancelled") {
      throw new Error(`run ${id}: ${JSON.stringify(r).slice(0, 400)}`);
    }
    await new Promise((res) => setTimeout(res, 500));
  }
}

/** The runs of the README's tour that have downloads: their ids. */
async function makeRuns(base: string) {
  const D = DEMO_SERIES;
  const darkening = await post(base, "/v1/irradiance/darkening", { total_area: D.AREA });
  const psi = (await post(base, `/v1/runs/${darkening.id}/outputs/psi/series`, {})).id;
  const proxies = [{ term: "mg_ii", series: D.MG }, { term: "psi", series: psi }];
  const model = await post(base, "/v1/irradiance/models", {
    tsi: D.TSI,
    sunspot_number: D.SSN,
    terms: [
      { name: "mg_ii", series: D.MG, role: "facular" },
      { name: "psi", series: psi, role: "sunspot_darkening" },
    ],
  });
  const period = { start: "1700", end: "2025" };
  const rec = await post(base, "/v1/irradiance/reconstructions", {
    model: model.id,
    sunspot_number: D.SSN,
    resolution: "monthly",
    period,
    proxies,
    realizations: 100,
    seed: 3,
  });
  const forcing = await post(base, "/v1/forcing", {
    reconstruction: rec.id,
    reference: { kind: "period", period: { start: "1986", end: "1996" } },
  });
  const bands = JSON.parse(
    await Deno.readTextFile(new URL("../../fixtures/demo/spectral_bands.json", import.meta.url)),
  );
  const smodel = await post(base, "/v1/irradiance/spectral-models", {
    tsi_model: model.id,
    sunspot_number: D.SSN,
    proxies,
    bands,
  });
  const srec = await post(base, "/v1/irradiance/spectral-reconstructions", {
    model: smodel.id,
    sunspot_number: D.SSN,
    resolution: "monthly",
    period,
    ranges: [{ lower: 200, upper: 400 }],
    proxies,
  });
  const map = await post(base, "/v1/solar-signal-maps", {
    field: DEMO_FIELD,
    solar: D.TSIM,
    surrogates: 200,
    seed: 7,
  }, { Prefer: "respond-async" });
  await finished(base, map.id);
  for (const r of [rec, forcing, srec]) await finished(base, r.id);
  const outputOf = async (id: string) =>
    Object.keys((await (await fetch(`${base}/v1/runs/${id}`)).json()).result.outputs)[0];
  return {
    rec: rec.id as string,
    recOutput: await outputOf(rec.id),
    forcing: forcing.id as string,
    forcingOutput: await outputOf(forcing.id),
    srec: srec.id as string,
    map: map.id as string,
  };
}

type Runs = Awaited<ReturnType<typeof makeRuns>>;

function pathsOf(t: Runs): Record<string, string> {
  const out = `/v1/runs/${t.rec}/outputs/${t.recOutput}`;
  return {
    output_json: out,
    output_csv: `${out}?format=csv`,
    output_netcdf: `${out}?format=netcdf`,
    output_netcdf_noleap: `${out}?format=netcdf&calendar=noleap`,
    forcing_netcdf: `/v1/runs/${t.forcing}/outputs/${t.forcingOutput}?format=netcdf`,
    spectrum_json: `/v1/runs/${t.srec}/spectrum`,
    spectrum_csv: `/v1/runs/${t.srec}/spectrum?format=csv`,
    spectrum_netcdf: `/v1/runs/${t.srec}/spectrum?format=netcdf&calendar=noleap`,
    map_json: `/v1/runs/${t.map}/map`,
    map_csv: `/v1/runs/${t.map}/map?format=csv`,
    map_netcdf: `/v1/runs/${t.map}/map?format=netcdf`,
  };
}

/** Status, headers but `Date` and the request id, and the SHA-256 of the body. */
async function snapshot(url: string, headers: Record<string, string>, method = "GET") {
  const r = await fetch(url, { method, headers: { "Accept-Encoding": "identity", ...headers } });
  const bytes = new Uint8Array(await r.arrayBuffer());
  const hs = [...r.headers].filter(([k]) => k !== "date" && k !== "x-request-id")
    .map(([k, v]) => `${k}: ${v}`).sort();
  const digest = new Uint8Array(await crypto.subtle.digest("SHA-256", bytes));
  const sha = Array.from(digest, (x) => x.toString(16).padStart(2, "0")).join("");
  return { status: r.status, headers: hs, sha, bytes: bytes.byteLength };
}

async function wrk(url: string, seconds = SECONDS) {
  const a = ["-t2", "-c50", `-d${seconds}s`, "--timeout", "10s", url];
  const out = await new Deno.Command("wrk", { args: a, stdout: "piped" }).output();
  const text = new TextDecoder().decode(out.stdout);
  const bad = Number(/Non-2xx or 3xx responses:\s+(\d+)/.exec(text)?.[1] ?? 0);
  if (!out.success || bad) throw new Error(`wrk ${url}: ${text}`);
  return Number(/Requests\/sec:\s+([\d.]+)/.exec(text)?.[1] ?? NaN);
}

/**
 * Wait until the service at `base` is idle again: a service that makes each answer anew is
 * still answering the requests wrk left queued when it stopped, which would be counted against
 * the next case. Idle: three health checks in a row answered within 10 ms.
 */
async function drained(base: string) {
  for (let ok = 0, k = 0; ok < 3 && k < 2000; k++) {
    const t0 = performance.now();
    await (await fetch(`${base}/v1/health`)).body?.cancel();
    ok = performance.now() - t0 < 10 ? ok + 1 : 0;
  }
}

/** Milliseconds of one GET read to its end. */
async function once(url: string) {
  const t0 = performance.now();
  const r = await fetch(url, { headers: { "Accept-Encoding": "identity" } });
  await r.arrayBuffer();
  if (r.status !== 200) throw new Error(`${url}: ${r.status}`);
  return performance.now() - t0;
}

const loadStart = load();
const tmp = await Deno.makeTempDir({ prefix: "sunlag-downloads-ab-" });
await Deno.mkdir(`${tmp}/a`);
const startOn = (root: string, port: number, dir: string) =>
  spawnService(root, port, { HOST: "127.0.0.1", SUNLAG_STORE: `sqlite:${dir}/sunlag.db` });
let a: SpawnedService | null = await startOn(dirs.a, 18462, `${tmp}/a`);
let b: SpawnedService | null = null;
let hello: Deno.ChildProcess | null = null;
try {
  const runs = await makeRuns(a.base);
  await a.stop();
  await new Deno.Command("cp", { args: ["-r", `${tmp}/a`, `${tmp}/b`] }).output();
  a = await startOn(dirs.a, 18462, `${tmp}/a`);
  b = await startOn(dirs.b, 18463, `${tmp}/b`);
  const paths = Object.entries(pathsOf(runs)).filter(([n]) => !ONLY || ONLY.includes(n));
  // parity: cold and warm, GET and HEAD, gzip asked or not, If-None-Match
  let differ = 0;
  for (const [name, path] of paths) {
    const first = await snapshot(a.base + path, {});
    const etag = first.headers.find((h) => h.startsWith("etag: "))?.slice(6) ?? '"none"';
    const variants: [Record<string, string>, string][] = [
      [{}, "GET"],
      [{}, "GET"],
      [{}, "HEAD"],
      [{ "Accept-Encoding": "gzip, deflate" }, "GET"],
      [{ "If-None-Match": etag }, "GET"],
      [{ "If-None-Match": `W/${etag}` }, "HEAD"],
    ];
    let same = true;
    for (const [h, method] of variants) {
      const sa = await snapshot(a.base + path, h, method);
      const sb = await snapshot(b.base + path, h, method);
      if (JSON.stringify(sa) !== JSON.stringify(sb)) {
        same = false;
        differ++;
        console.log(
          `DIFFERENT ${name} ${method} ${JSON.stringify(h)}:\nA ${JSON.stringify(sa)}\nB ${
            JSON.stringify(sb)
          }`,
        );
      }
    }
    console.log(
      `${name}: ${first.bytes} bytes, status ${first.status}; A and B answer alike: ${same}`,
    );
  }
  console.log(`parity: ${differ} difference(s)`);

  // single requests, sequential, rounds alternating
  const lat: Record<string, { a: number[]; b: number[] }> = {};
  for (const [name] of paths) lat[name] = { a: [], b: [] };
  for (let k = 0; k < ROUNDS; k++) {
    for (const [name, path] of paths) {
      for (const w of k % 2 ? ["b", "a"] as const : ["a", "b"] as const) {
        const base = w === "a" ? a.base : b.base;
        const xs = [];
        for (let i = 0; i < 15; i++) xs.push(await once(base + path));
        lat[name][w].push(median(xs));
      }
    }
  }
  console.log(`single GETs, sequential: median of 15 per round, ${ROUNDS} rounds`);
  for (const [name] of paths) {
    const r = lat[name];
    console.log(
      `${name}: A ${median(r.a).toFixed(2)} ms, B ${median(r.b).toFixed(2)} ms; B/A ${
        (median(r.b) / median(r.a)).toFixed(3)
      } (per round ${r.a.map((x, i) => (r.b[i] / x).toFixed(2)).join(" ")})`,
    );
  }
  if (WRK) {
    const HELLO = 18461;
    hello = new Deno.Command(Deno.execPath(), {
      args: ["run", "-A", new URL("./http_hello.ts", import.meta.url).pathname, String(HELLO)],
      stdout: "null",
      stderr: "inherit",
    }).spawn();
    const helloUrl = `http://127.0.0.1:${HELLO}/`;
    for (let i = 0; i < 100; i++) {
      try {
        await (await fetch(helloUrl)).body?.cancel();
        break;
      } catch {
        await new Promise((r) => setTimeout(r, 100));
      }
    }
    const rps: Record<string, { a: number[]; b: number[] }> = {};
    const helloRps: number[] = [];
    for (const [name, path] of paths) {
      rps[name] = { a: [], b: [] };
      await wrk(a.base + path, 1);
      await drained(a.base);
      await wrk(b.base + path, 1);
      await drained(b.base);
    }
    for (let k = 0; k < ROUNDS; k++) {
      helloRps.push(await wrk(helloUrl));
      for (const [name, path] of paths) {
        for (const w of k % 2 ? ["b", "a"] as const : ["a", "b"] as const) {
          const base = w === "a" ? a.base : b.base;
          rps[name][w].push(await wrk(base + path));
          await drained(base);
        }
      }
    }
    const h = median(helloRps);
    console.log(
      `wrk 2 threads, 50 connections, ${SECONDS} s, ${ROUNDS} rounds; hello-world ${
        h.toFixed(0)
      } req/s (median)`,
    );
    for (const [name] of paths) {
      const r = rps[name];
      const ma = median(r.a), mb = median(r.b);
      console.log(
        `${name}: A ${ma.toFixed(0)}, B ${mb.toFixed(0)} req/s; B/A ${(mb / ma).toFixed(2)} ` +
          `(per round ${r.a.map((x, i) => (r.b[i] / x).toFixed(2)).join(" ")}); of hello A ${
            (ma / h).toFixed(3)
          } B ${(mb / h).toFixed(3)}`,
      );
    }
  }
  console.log(`load average at start ${loadStart}, at end ${load()}`);
} finally {
  await a?.stop();
  await b?.stop();
  if (hello) {
    hello.kill("SIGTERM");
    await hello.status;
  }
  await Deno.remove(tmp, { recursive: true });
}
