/**
 * Start the service as `deno task start` runs it (api/main.ts of a checkout) on a spare port
 * for a benchmark, and wait until it answers its health check.
 *
 * @module
 */

/** A running service process and its base URL. */
export interface SpawnedService {
  base: string;
  pid: number;
  stop(): Promise<void>;
}

/** Start `api/main.ts` of `root` with `env` on `port`; resolves once `/v1/health` answers. */
export async function spawnService(
  root: string,
  port: number,
  env: Record<string, string>,
  entry = "api/main.ts",
): Promise<SpawnedService> {
  const base = `http://127.0.0.1:${port}`;
  const child = new Deno.Command(Deno.execPath(), {
    args: ["run", "-A", entry],
    cwd: root,
    env: { PORT: String(port), SUNLAG_LOG: "0", ...env },
    stdout: "null",
    stderr: "inherit",
  }).spawn();
  for (let i = 0; i < 300; i++) {
    try {
      if ((await fetch(`${base}/v1/health`)).ok) break;
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
    },
  };
}
