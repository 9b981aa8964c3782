/**
 * Error amplification: the hostile bodies that once produced answers far larger than
 * themselves, sent to the service as `deno task start` runs it (spare port, in-memory store, no
 * demo). For each: request bytes, answer bytes, their ratio, wall time, and the server's
 * resident memory after. Run it against another checkout with `--root` to compare.
 *
 * 1. A 25 MB JSON analysis request with two million unknown keys.
 * 2. A JSON upload whose 2 million values are all strings (2 million field errors).
 * 3. A CSV with a million columns.
 *
 * Usage: deno run -A test/bench/amplification.ts [--root <checkout>] [--port 18450]
 *
 * @module
 */
import { spawnService } from "./spawn_service.ts";

const opt = (name: string, dflt: string) => {
  const i = Deno.args.indexOf(`--${name}`);
  return i >= 0 ? Deno.args[i + 1] : dflt;
};
const ROOT = opt("root", new URL("../../", import.meta.url).pathname);
const PORT = Number(opt("port", "18450"));

const server = await spawnService(ROOT, PORT, {
  SUNLAG_STORE: "sqlite::memory:",
  SUNLAG_DEMO: "0",
  SUNLAG_BODY_LIMIT_MB: "64",
});
const BASE = server.base;

function rssMb(pid: number): number {
  try {
    const m = /VmRSS:\s+(\d+) kB/.exec(Deno.readTextFileSync(`/proc/${pid}/status`));
    return m ? Math.round(Number(m[1]) / 1024) : NaN;
  } catch {
    return NaN;
  }
}

async function attack(name: string, path: string, type: string, body: Uint8Array<ArrayBuffer>) {
  const t0 = performance.now();
  const res = await fetch(BASE + path, { method: "POST", headers: { "content-type": type }, body });
  const answer = new Uint8Array(await res.arrayBuffer());
  const ms = performance.now() - t0;
  return {
    attack: name,
    status: res.status,
    request_bytes: body.length,
    answer_bytes: answer.length,
    ratio: Number((answer.length / body.length).toPrecision(3)),
    ms: Math.round(ms),
    server_rss_mb_after: rssMb(server.pid),
  };
}

const enc = (s: string) => new TextEncoder().encode(s) as Uint8Array<ArrayBuffer>;

try {
  const results = [];
  {
    const parts = ['{"series":"sha256:' + "0".repeat(64) + '"'];
    for (let i = 0; i < 2_000_000; i++) parts.push(`,"k${i}":${i}`);
    results.push(
      await attack("2M unknown keys", "/v1/spectra", "application/json", enc(parts.join("") + "}")),
    );
  }
  {
    const n = 2_000_000;
    const t = Array.from({ length: n }, (_, i) => (1000 + i / 1000).toFixed(3)).join(",");
    const v = Array(n).fill('"x"').join(",");
    const body = `{"name":"a","quantity":"other","units":"1","time":[${t}],"value":[${v}]}`;
    results.push(await attack("2M bad values", "/v1/series", "application/json", enc(body)));
  }
  {
    const cols = 1_000_000;
    const row = (x: string) => Array.from({ length: cols }, () => x).join(",");
    results.push(
      await attack(
        "1M columns CSV",
        "/v1/series?name=w&quantity=other&units=1",
        "text/csv",
        enc(`${row("c")}\n${row("1")}\n${row("2")}\n`),
      ),
    );
  }
  for (const r of results) console.log(JSON.stringify({ root: ROOT, ...r }));
} finally {
  await server.stop();
}
