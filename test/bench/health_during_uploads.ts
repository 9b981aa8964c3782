/**
 * Health-check latency while large uploads run: the service as `deno task start` runs it (a
 * SQLite file store, default workers) on a spare port; 20 concurrent uploads of about 20 MB of
 * JSON each (distinct contents, so every one is parsed, hashed and written) while a separate
 * worker probes `GET /v1/health` every 20 ms. Reports the probes' p50, p99 and maximum (goal:
 * p99 under 50 ms) and the uploads' statuses and wall time, beside the same probes against the
 * idle service just before (what the machine's other load alone costs).
 *
 * Usage: deno run -A test/bench/health_during_uploads.ts [--uploads 20] [--mb 20]
 *        [--root <checkout to measure, default this one>] [--port 18440]
 *
 * @module
 */
import { spawnService } from "./spawn_service.ts";

const opt = (name: string, dflt: string) => {
  const i = Deno.args.indexOf(`--${name}`);
  return i >= 0 ? Deno.args[i + 1] : dflt;
};
const UPLOADS = Number(opt("uploads", "20"));
const MB = Number(opt("mb", "20"));
const ROOT = opt("root", new URL("../../", import.meta.url).pathname);
const PORT = Number(opt("port", "18440"));
const IDLE_SECONDS = Number(opt("idle-seconds", "5"));

function body(k: number): Uint8Array<ArrayBuffer> {
  // About 27 bytes per point as JSON: decimal years and values with many digits.
  const n = Math.round((MB * 1e6) / 40);
  const time: number[] = new Array(n), value: number[] = new Array(n);
  for (let i = 0; i < n; i++) {
    time[i] = 1800 + i / 365.25 + 1e-7 * k;
    value[i] = Math.sin(i / 97 + k) * 100 + i * 1e-6;
  }
  return new TextEncoder().encode(JSON.stringify({
    name: `Upload ${k}`,
    quantity: "other",
    units: "1",
    time,
    value,
  }));
}

const dir = await Deno.makeTempDir({ prefix: "sunlag-health-" });
const server = await spawnService(ROOT, PORT, {
  SUNLAG_STORE: `sqlite:${dir}/bench.db`,
  SUNLAG_DEMO: "0",
  SUNLAG_BODY_LIMIT_MB: String(MB * 2),
}, Deno.env.get("BENCH_SERVER") ?? "api/main.ts");
const BASE = server.base;

try {
  console.error(`making ${UPLOADS} bodies of ~${MB} MB ...`);
  const bodies = Array.from({ length: UPLOADS }, (_, k) => body(k));
  console.error(`body size ${(bodies[0].length / 1e6).toFixed(1)} MB`);

  const probe = () =>
    new Worker(
      "data:text/javascript," + encodeURIComponent(`
      let stop = false; const lat = []; let failed = 0;
      self.onmessage = (e) => { if (e.data === "stop") stop = true; };
      (async () => {
        while (!stop) {
          const t0 = performance.now();
          try {
            const r = await fetch("${BASE}/v1/health", { signal: AbortSignal.timeout(2000) });
            await r.arrayBuffer();
            if (!r.ok) failed++;
            lat.push(performance.now() - t0);
          } catch { failed++; lat.push(2000); }
          await new Promise((r) => setTimeout(r, 20));
        }
        self.postMessage({ lat, failed });
      })();
    `),
      { type: "module" },
    );
  const collect = async (w: Worker) => {
    w.postMessage("stop");
    const out = await new Promise<{ lat: number[]; failed: number }>((ok) =>
      w.onmessage = (e) => ok(e.data)
    );
    w.terminate();
    return out;
  };
  const idleProber = probe();
  await new Promise((r) => setTimeout(r, IDLE_SECONDS * 1000));
  const idle = await collect(idleProber);
  const prober = probe();
  await new Promise((r) => setTimeout(r, 300));
  const t0 = performance.now();
  const statuses = await Promise.all(bodies.map(async (b) => {
    const r = await fetch(`${BASE}/v1/series`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: b,
    });
    await r.arrayBuffer();
    return r.status;
  }));
  const uploadSeconds = (performance.now() - t0) / 1000;
  await new Promise((r) => setTimeout(r, 300));
  const { lat, failed } = await collect(prober);
  const summary = (l: number[]) => {
    const s = [...l].sort((a, b) => a - b);
    const q = (p: number) => s[Math.min(s.length - 1, Math.floor(p * s.length))];
    return {
      p50: Math.round(q(0.5) * 10) / 10,
      p99: Math.round(q(0.99) * 10) / 10,
      max: Math.round(s[s.length - 1] * 10) / 10,
    };
  };
  console.log(JSON.stringify({
    root: ROOT,
    uploads: UPLOADS,
    body_mb: Math.round(bodies[0].length / 1e5) / 10,
    upload_statuses: Object.fromEntries(
      [...new Set(statuses)].map((s) => [s, statuses.filter((x) => x === s).length]),
    ),
    upload_wall_seconds: Math.round(uploadSeconds * 10) / 10,
    health_probes: lat.length,
    health_failed: failed,
    health_ms: summary(lat),
    idle_probes: idle.lat.length,
    idle_failed: idle.failed,
    idle_health_ms: summary(idle.lat),
  }));
} finally {
  await server.stop();
  await Deno.remove(dir, { recursive: true });
}
