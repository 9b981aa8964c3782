/**
 * A local sunlag cluster on loopback: an ephemeral PostgreSQL cluster (Debian's server
 * binaries, `initdb` in a temporary folder), API instances and worker instances started as
 * separate processes of `api/main.ts` against it. For trying several instances by hand:
 *
 * ```sh
 * deno task cluster            # 1 API on http://127.0.0.1:8080, 2 workers; Ctrl-C stops all
 * ```
 *
 * and for the multi-instance tests, which import {@link startLocalCluster}.
 *
 * @module
 */
import postgres from "postgres";
import { pgUnavailableReason, startPgServer } from "../api/store/pg_cluster.ts";

/** One sunlag process of the cluster. */
export interface Instance {
  role: "api" | "worker";
  /** Base URL (API instances). */
  url: string | null;
  pid: number;
  /** Stop with SIGKILL (no clean shutdown: a crash). */
  kill(): Promise<void>;
  /** Stop with SIGTERM and wait. */
  stop(): Promise<void>;
  /** Lines the process printed so far. */
  log: string[];
}

export interface LocalCluster {
  /** The store URL every instance uses. */
  storeUrl: string;
  apis: Instance[];
  workers: Instance[];
  /** Start one more instance. */
  start(role: "api" | "worker", env?: Record<string, string>): Promise<Instance>;
  close(): Promise<void>;
}

function freePort(): number {
  const l = Deno.listen({ hostname: "127.0.0.1", port: 0 });
  const port = (l.addr as Deno.NetAddr).port;
  l.close();
  return port;
}

const MAIN = new URL("../../api/main.ts", import.meta.url).pathname;

async function startInstance(
  storeUrl: string,
  role: "api" | "worker",
  env: Record<string, string>,
  port?: number,
): Promise<Instance> {
  const p = port ?? freePort();
  const child = new Deno.Command(Deno.execPath(), {
    args: ["run", "-A", MAIN],
    env: {
      SUNLAG_STORE: storeUrl,
      SUNLAG_ROLE: role,
      SUNLAG_LOG: "0",
      SUNLAG_DEMO: "1",
      SUNLAG_WORKERS: "1",
      HOST: "127.0.0.1",
      PORT: String(p),
      ...env,
    },
    stdout: "piped",
    stderr: "piped",
  }).spawn();
  const log: string[] = [];
  let ready: (ok: boolean) => void;
  const readyP = new Promise<boolean>((r) => ready = r);
  const pump = async (stream: ReadableStream<Uint8Array>) => {
    let buf = "";
    const decoder = new TextDecoder();
    for await (const bytes of stream) {
      const chunk = decoder.decode(bytes, { stream: true });
      buf += chunk;
      let i;
      while ((i = buf.indexOf("\n")) >= 0) {
        const line = buf.slice(0, i);
        buf = buf.slice(i + 1);
        log.push(line);
        if (/"event":"(listening|worker_ready)"/.test(line)) ready(true);
      }
    }
    ready(false);
  };
  const pumps = Promise.all([pump(child.stdout), pump(child.stderr)]);
  const timer = setTimeout(() => ready(false), 60_000);
  const ok = await readyP;
  clearTimeout(timer);
  if (!ok) {
    try {
      child.kill("SIGKILL");
    } catch { /* already gone */ }
    await child.status;
    throw new Error(`sunlag ${role} did not start:\n${log.slice(-20).join("\n")}`);
  }
  let ended = false;
  const end = async (signal: Deno.Signal) => {
    if (ended) return;
    ended = true;
    try {
      child.kill(signal);
    } catch { /* already gone */ }
    await child.status;
    await pumps;
  };
  return {
    role,
    url: role === "api" ? `http://127.0.0.1:${p}` : null,
    pid: child.pid,
    kill: () => end("SIGKILL"),
    stop: () => end("SIGTERM"),
    log,
  };
}

/**
 * Start PostgreSQL (or use `SUNLAG_TEST_POSTGRES_URL`), create a fresh database, and start
 * the instances. Null when no PostgreSQL server is available (the reason is in
 * `pgUnavailableReason` of api/store/pg_cluster.ts).
 */
export async function startLocalCluster(
  opts: { apis?: number; workers?: number; env?: Record<string, string>; port?: number } = {},
): Promise<LocalCluster | null> {
  const server = await startPgServer();
  if (!server) return null;
  const name = `sunlag_cluster_${Deno.pid}_${Date.now() % 1e6}`;
  const admin = postgres(server.adminUrl, { max: 1, onnotice: () => {} });
  await admin.unsafe(`CREATE DATABASE ${name}`);
  await admin.end();
  const storeUrl = server.urlFor(name);
  const env = opts.env ?? {};
  const instances: Instance[] = [];
  const cluster: LocalCluster = {
    storeUrl,
    apis: [],
    workers: [],
    async start(role, extra = {}) {
      const inst = await startInstance(storeUrl, role, { ...env, ...extra });
      instances.push(inst);
      (role === "api" ? cluster.apis : cluster.workers).push(inst);
      return inst;
    },
    async close() {
      await Promise.all(instances.map((i) => i.stop()));
      const a = postgres(server.adminUrl, { max: 1, onnotice: () => {} });
      await a.unsafe(`DROP DATABASE IF EXISTS ${name} WITH (FORCE)`);
      await a.end();
    },
  };
  // The first API instance migrates the schema and loads the demo; the others follow.
  for (let i = 0; i < (opts.apis ?? 1); i++) {
    const inst = await startInstance(
      storeUrl,
      "api",
      env,
      i === 0 ? opts.port : undefined,
    );
    instances.push(inst);
    cluster.apis.push(inst);
  }
  await Promise.all(Array.from({ length: opts.workers ?? 2 }, () => cluster.start("worker")));
  return cluster;
}

if (import.meta.main) {
  const cluster = await startLocalCluster({
    apis: 1,
    workers: 2,
    port: Number(Deno.env.get("PORT") ?? 8080),
    env: { SUNLAG_WORKERS: Deno.env.get("SUNLAG_WORKERS") ?? "1" },
  });
  if (!cluster) {
    console.error(`No PostgreSQL server: ${pgUnavailableReason}`);
    Deno.exit(1);
  }
  console.log(JSON.stringify({
    event: "cluster_ready",
    store: cluster.storeUrl,
    api: cluster.apis.map((a) => a.url),
    workers: cluster.workers.map((w) => w.pid),
  }));
  Deno.addSignalListener("SIGINT", async () => {
    await cluster.close();
    Deno.exit(0);
  });
}
