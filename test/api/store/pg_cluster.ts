/**
 * An ephemeral PostgreSQL cluster for the store tests: `initdb -A trust` in a temp dir and
 * `pg_ctl start` on a free loopback port, stopped and removed when the test process unloads.
 * Uses the Debian server binaries (`/usr/lib/postgresql/<major>/bin`) or those on PATH; as
 * root it runs them as the `postgres` user, since the server refuses to run as root.
 *
 * Set `SUNLAG_TEST_POSTGRES_URL` to use an existing server instead (each test creates and
 * drops its own database there).
 *
 * @module
 */
import { join } from "node:path";

/** A running server the tests may create databases on. */
export interface PgServer {
  /** URL of the maintenance database `postgres`. */
  adminUrl: string;
  /** URL of a database on this server. */
  urlFor(database: string): string;
}

function findBin(name: string): string | null {
  const dirs: string[] = [];
  try {
    const majors = [...Deno.readDirSync("/usr/lib/postgresql")].map((e) => e.name)
      .filter((n) => /^\d+$/.test(n)).sort((a, b) => Number(b) - Number(a));
    for (const m of majors) dirs.push(`/usr/lib/postgresql/${m}/bin`);
  } catch {
    // no Debian server package
  }
  dirs.push(...(Deno.env.get("PATH") ?? "").split(":").filter(Boolean));
  for (const d of dirs) {
    try {
      if (Deno.statSync(join(d, name)).isFile) return join(d, name);
    } catch {
      // not here
    }
  }
  return null;
}

function freePort(): number {
  const l = Deno.listen({ hostname: "127.0.0.1", port: 0 });
  const port = (l.addr as Deno.NetAddr).port;
  l.close();
  return port;
}

function asServerUser(cmd: string[], isRoot: boolean): Deno.CommandOptions & { cmd: string } {
  return isRoot
    ? { cmd: "runuser", args: ["-u", "postgres", "--", ...cmd], stdout: "piped", stderr: "piped" }
    : { cmd: cmd[0], args: cmd.slice(1), stdout: "piped", stderr: "piped" };
}

function run(cmd: string[], isRoot: boolean): void {
  const { cmd: exe, ...opts } = asServerUser(cmd, isRoot);
  const out = new Deno.Command(exe, opts).outputSync();
  if (!out.success) {
    throw new Error(
      `${cmd.join(" ")} failed: ${new TextDecoder().decode(out.stderr).slice(0, 2000)}`,
    );
  }
}

let started: Promise<PgServer | null> | null = null;

/** Why no server is available, when {@link startPgServer} returned null. */
export let pgUnavailableReason = "";

/**
 * Start (once per process) the ephemeral cluster, or return the external server. Resolves
 * null when neither is available, with the reason in {@link pgUnavailableReason}.
 */
export function startPgServer(): Promise<PgServer | null> {
  started ??= start();
  return started;
}

function start(): Promise<PgServer | null> {
  const external = Deno.env.get("SUNLAG_TEST_POSTGRES_URL");
  if (external) {
    const base = new URL(external);
    return Promise.resolve({
      adminUrl: external,
      urlFor: (db) => {
        const u = new URL(base);
        u.pathname = "/" + db;
        return u.toString();
      },
    });
  }
  const initdb = findBin("initdb");
  const pgCtl = findBin("pg_ctl");
  if (!initdb || !pgCtl) {
    pgUnavailableReason = "no PostgreSQL server binaries (initdb, pg_ctl) on this machine";
    return Promise.resolve(null);
  }
  const isRoot = Deno.uid?.() === 0;
  const dir = Deno.makeTempDirSync({ prefix: "sunlag-pg-" });
  const data = join(dir, "data");
  if (isRoot) {
    Deno.chmodSync(dir, 0o755);
    run(["true"], isRoot); // fails early when the postgres user is missing
    Deno.chownSync(dir, userId("postgres"), null);
  }
  const port = freePort();
  run([initdb, "-A", "trust", "-U", "postgres", "-D", data, "--no-sync", "-E", "UTF8"], isRoot);
  run([
    pgCtl,
    "-D",
    data,
    "-l",
    join(dir, "server.log"),
    "-o",
    `-h 127.0.0.1 -p ${port} -k ${dir} -c fsync=off -c max_connections=200`,
    "-w",
    "start",
  ], isRoot);
  globalThis.addEventListener("unload", () => {
    try {
      run([pgCtl, "-D", data, "-m", "immediate", "-w", "stop"], isRoot);
    } finally {
      Deno.removeSync(dir, { recursive: true });
    }
  });
  const url = (db: string) => `postgres://postgres@127.0.0.1:${port}/${db}`;
  return Promise.resolve({ adminUrl: url("postgres"), urlFor: url });
}

function userId(name: string): number {
  const out = new Deno.Command("id", { args: ["-u", name], stdout: "piped" }).outputSync();
  if (!out.success) throw new Error(`no user "${name}" to run the PostgreSQL server as`);
  return Number(new TextDecoder().decode(out.stdout).trim());
}
